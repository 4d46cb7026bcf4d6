import PgBoss from "pg-boss";
import { env } from "../env.server";

/**
 * The processing queue: pg-boss on the app's own PostgreSQL (schema "pgboss"). Jobs survive
 * restarts of the app and the worker; a job that throws or whose worker dies is retried.
 */
export const PROCESS_QUEUE = "recording-process";
export const JOB_OPTIONS = { retryLimit: 3, retryDelay: 5, retryBackoff: true, expireInSeconds: 6 * 3600 } as const;

const g = globalThis as unknown as { __benchreelBoss?: Promise<PgBoss> };

/** A started pg-boss for sending (the app) or working (the worker), created once per process. */
export function boss(opts: { worker?: boolean } = {}): Promise<PgBoss> {
  g.__benchreelBoss ??= (async () => {
    const b = new PgBoss({
      connectionString: env().DATABASE_URL,
      max: opts.worker ? 4 : 2,
      // Only the worker does maintenance and scheduling; the app just sends.
      supervise: Boolean(opts.worker),
      schedule: false,
    });
    b.on("error", (err) => console.error("[queue]", err.message));
    await b.start();
    if (!(await b.getQueue(PROCESS_QUEUE))) {
      await b.createQueue(PROCESS_QUEUE, { name: PROCESS_QUEUE, ...JOB_OPTIONS }).catch(async (err) => {
        if (!(await b.getQueue(PROCESS_QUEUE))) throw err; // lost a race with the other process: fine
      });
    }
    return b;
  })().catch((err) => {
    g.__benchreelBoss = undefined;
    throw err;
  });
  return g.__benchreelBoss;
}

export async function enqueueProcessing(recordingId: string): Promise<void> {
  const b = await boss();
  await b.send(PROCESS_QUEUE, { recordingId }, JOB_OPTIONS);
}

export async function stopBoss(): Promise<void> {
  const p = g.__benchreelBoss;
  g.__benchreelBoss = undefined;
  if (p) await (await p).stop({ graceful: true, wait: true });
}
