import pg from "pg";
import PgBoss from "pg-boss";
import { env } from "../env.server";

/**
 * The processing queue: pg-boss on the app's own PostgreSQL (schema "pgboss"). Jobs survive
 * restarts of the app and the worker; a job that throws or whose worker dies is retried.
 */
export const PROCESS_QUEUE = "recording-process";
export const JOB_OPTIONS = { retryLimit: 3, retryDelay: 5, retryBackoff: true, expireInSeconds: 6 * 3600 } as const;
/**
 * The decode of a not-transcoded file's pictures after "Ready": a job of its own, so a worker
 * that dies during it leaves the job to the next worker instead of the file unchecked.
 */
export const DECODE_QUEUE = "recording-decode-check";
/** The hourly sweep of abandoned uploads (tus-sweep.server.ts), made with the others so no two processes make queues at odd times. */
export const UPLOAD_SWEEP_QUEUE = "uploads-sweep";
/**
 * pg-boss's own queue for schedules: its timekeeper makes it as a worker starts, outside the lock
 * below, and gives up silently if that fails; listed here, a missing one is made under the lock.
 */
const SCHEDULES_QUEUE = "__pgboss__send-it";
const QUEUES = [PROCESS_QUEUE, DECODE_QUEUE, UPLOAD_SWEEP_QUEUE, SCHEDULES_QUEUE];

const g = globalThis as unknown as { __benchreelBoss?: Promise<PgBoss> };

/** A started pg-boss for sending (the app) or working (the worker), created once per process. */
export function boss(opts: { worker?: boolean } = {}): Promise<PgBoss> {
  g.__benchreelBoss ??= (async () => {
    const b = new PgBoss({
      connectionString: env().DATABASE_URL,
      max: opts.worker ? 4 : 2,
      // Only the worker does maintenance and scheduling; the app just sends.
      supervise: Boolean(opts.worker),
      schedule: Boolean(opts.worker),
    });
    b.on("error", (err) => console.error("[queue]", err.message));
    try {
      await b.start();
      await createMissingQueues(b);
      return b;
    } catch (err) {
      // A half-started pg-boss keeps its pool and timers: stopped, so that a retry leaves none behind.
      await b.stop({ graceful: false, wait: false }).catch(() => {});
      throw err;
    }
  })().catch((err) => {
    g.__benchreelBoss = undefined;
    throw err;
  });
  return g.__benchreelBoss;
}

/** The advisory lock under which one process at a time makes queues ("que" in ASCII, apart from the others' classes). */
const QUEUE_LOCK: [number, number] = [0x717565, 1];

/** PostgreSQL's code for the transaction it chose to end to break a deadlock. */
const DEADLOCK = "40P01";

/**
 * Runs `fn` again (up to `attempts` times in all, after a short random pause) when PostgreSQL
 * ended it to break a deadlock, as PostgreSQL's manual advises; any other error is thrown at once.
 * pg-boss makes a queue as a partition of its job table, and its own queue for schedules
 * (made by a worker as it starts, outside the lock below) can deadlock with a job being sent
 * on a new database: the sender that loses tries again.
 */
export async function retryOnDeadlock<T>(fn: () => Promise<T>, attempts = 4, pauseMs = 100): Promise<T> {
  for (let i = 1; ; i++) {
    try {
      return await fn();
    } catch (err) {
      if ((err as { code?: string }).code !== DEADLOCK || i >= attempts) throw err;
      await new Promise((r) => setTimeout(r, pauseMs * (0.5 + Math.random())));
    }
  }
}

/**
 * Makes the queues that do not exist yet, one process at a time: pg-boss makes a queue as a
 * partition of its job table, and two processes doing that at once (an app finishing its first
 * upload while a worker starts, two workers starting) can deadlock in PostgreSQL, which failed
 * the upload. Once the queues exist, nothing is locked.
 */
async function createMissingQueues(b: PgBoss) {
  const missing = async () =>
    (await Promise.all(QUEUES.map(async (name) => ((await b.getQueue(name)) ? null : name)))).filter((n) => n !== null);
  if (!(await missing()).length) return;
  const client = new pg.Client({ connectionString: env().DATABASE_URL, application_name: "benchreel-queues" });
  await client.connect();
  try {
    await client.query("select pg_advisory_lock($1, $2)", QUEUE_LOCK);
    for (const name of await missing())
      await retryOnDeadlock(() => b.createQueue(name, name === SCHEDULES_QUEUE ? { name } : { name, ...JOB_OPTIONS }));
  } finally {
    await client.query("select pg_advisory_unlock($1, $2)", QUEUE_LOCK).catch(() => {});
    await client.end().catch(() => {});
  }
}

/** Wakes the worker when a job is sent (it polls once a second as well, in case it missed one). */
export const WAKE_CHANNEL = "benchreel_recording_jobs";

export async function enqueueProcessing(recordingId: string): Promise<void> {
  const b = await retryOnDeadlock(() => boss());
  await retryOnDeadlock(() => b.send(PROCESS_QUEUE, { recordingId }, JOB_OPTIONS));
  // Best effort: the worker polls every second as well.
  await b
    .getDb()
    .executeSql("select pg_notify($1, '')", [WAKE_CHANNEL])
    .catch(() => {});
}

/** Sent by the worker just before it marks the recording ready; a job that starts earlier is retried. */
export async function enqueueDecodeCheck(recordingId: string, expectedS: number): Promise<void> {
  const b = await retryOnDeadlock(() => boss());
  await retryOnDeadlock(() => b.send(DECODE_QUEUE, { recordingId, expectedS }, JOB_OPTIONS));
}

/**
 * The worker's side: a LISTEN connection that calls `wake` on every job sent, so a finished
 * upload is picked up at once instead of at the next poll. A dropped connection is opened
 * again after a pause; meanwhile the poll still finds the jobs.
 */
export function listenForJobs(wake: () => void): { stop: () => Promise<void> } {
  let client: pg.Client | null = null;
  let stopped = false;
  const open = async () => {
    if (stopped) return;
    const c = new pg.Client({ connectionString: env().DATABASE_URL, application_name: "benchreel-recording-jobs", keepAlive: true });
    const drop = () => {
      if (client !== c) return;
      client = null;
      void c.end().catch(() => {});
      if (!stopped) setTimeout(open, 2000).unref();
    };
    c.on("error", drop);
    c.on("end", drop);
    c.on("notification", wake);
    client = c;
    try {
      await c.connect();
      await c.query(`LISTEN ${WAKE_CHANNEL}`);
    } catch {
      drop();
    }
  };
  void open();
  return {
    async stop() {
      stopped = true;
      const c = client;
      client = null;
      await c?.end().catch(() => {});
    },
  };
}

export async function stopBoss(): Promise<void> {
  const p = g.__benchreelBoss;
  g.__benchreelBoss = undefined;
  if (p) await (await p).stop({ graceful: true, wait: true });
}
