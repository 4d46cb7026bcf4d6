import type PgBoss from "pg-boss";
import { UPLOAD_SWEEP_QUEUE } from "./queue.server";
import { cleanUpExpiredUploads } from "./tus.server";

/**
 * The sweep of abandoned uploads as a pg-boss schedule: pg-boss sends one job per hour for the
 * whole shop (not one per worker), and whichever worker is free takes it. The job's own check
 * is `cleanUpExpiredUploads` (the age is UPLOAD_EXPIRY_DAYS). Sending a job to the queue runs
 * a sweep at once (the storage suite does, to see a worker do it). Hourly, at a minute of its own.
 */
const UPLOAD_SWEEP_CRON = "23 * * * *";

/** Registers the schedule (its queue is made with the others by `boss()`) and works the queue. */
export async function scheduleUploadSweep(b: PgBoss): Promise<void> {
  await b.schedule(UPLOAD_SWEEP_QUEUE, UPLOAD_SWEEP_CRON);
  await b.work(UPLOAD_SWEEP_QUEUE, { batchSize: 1, pollingIntervalSeconds: 5 }, async () => {
    const swept = await cleanUpExpiredUploads();
    console.log(`[uploads] sweep: ${swept} abandoned upload${swept === 1 ? "" : "s"} discarded`);
  });
}
