import { env } from "./env.server";
import { createTransport, drainOutbox } from "./mail.server";
import { pool } from "./db.server";
import { ensureRecordingJobs } from "./recordings/processing.server";
import { drainSearchOutbox, repairIndex } from "./search/indexer.server";

/**
 * A periodic task of the worker: it is called every `everyMs`, never twice at once, and an
 * error is logged and retried on the next tick (rows stay pending until done).
 */
export type PeriodicTask = { name: string; everyMs: number; run: () => Promise<unknown> };

export function periodicTasks(): PeriodicTask[] {
  const transport = createTransport(env().SMTP_URL);
  const retryBaseMs = env().MAIL_RETRY_BASE_MS;
  return [
    { name: "mail-outbox", everyMs: env().MAIL_POLL_MS, run: () => drainOutbox({ transport, retryBaseMs }) },
    // recordings: starts the pg-boss worker for the processing queue (once; again after a failure)
    { name: "recordings-queue", everyMs: 5000, run: ensureRecordingJobs },
    // (the sweep of abandoned uploads is a pg-boss schedule the recordings queue's worker registers: tus-sweep.server.ts)
    ...(env().MEILI_HOST
      ? [
          { name: "search-outbox", everyMs: env().SEARCH_POLL_MS, run: () => drainSearchOutbox() },
          // search: rebuilds the index when the service has lost it (replaced, reset)
          { name: "search-index-check", everyMs: env().SEARCH_CHECK_MS, run: () => repairIndex() },
        ]
      : []),
  ];
}

export async function startWorker(tasks: PeriodicTask[] = periodicTasks()) {
  let stopped = false;
  const timers: NodeJS.Timeout[] = [];
  const running = new Set<Promise<unknown>>();
  for (const task of tasks) {
    let busy = false;
    const tick = async () => {
      if (busy || stopped) return;
      busy = true;
      const p = task.run().catch((err) => console.error(`[worker] ${task.name}:`, (err as Error).message));
      running.add(p);
      await p;
      running.delete(p);
      busy = false;
    };
    void tick();
    timers.push(setInterval(tick, task.everyMs));
  }
  return {
    async stop() {
      stopped = true;
      for (const t of timers) clearInterval(t);
      await Promise.all(running);
      await pool().end();
    },
  };
}
