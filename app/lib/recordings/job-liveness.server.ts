import pg from "pg";
import type PgBoss from "pg-boss";
import { env } from "../env.server";

/**
 * Which worker is alive on which job, with several workers on one database: a worker holds a
 * PostgreSQL advisory lock (keyed by the pg-boss job id) on a connection of its own while it
 * works a job. A worker that dies, however it dies, loses its connection and so the lock.
 * Every worker looks now and then for active jobs whose lock nobody holds and fails them into
 * pg-boss's retry, so another worker takes the job over at once instead of at the job's
 * expiry (hours for a transcode).
 */
const JOB_CLASS = 0x6a6f62; // "job" in ASCII, apart from tus's upload locks
/** A job fetched this recently may not have its lock yet. */
const GRACE_SECONDS = 5;

const g = globalThis as unknown as { __benchreelJobLocks?: pg.Pool };
function lockPool(): pg.Pool {
  if (!g.__benchreelJobLocks) {
    g.__benchreelJobLocks = new pg.Pool({ connectionString: env().DATABASE_URL, max: 6, application_name: "benchreel-job-locks" });
    g.__benchreelJobLocks.on("error", (err) => console.error("[jobs] lock connection:", err.message));
  }
  return g.__benchreelJobLocks;
}

/** Runs the job's work while holding its liveness lock. */
export async function holdingJobLock<T>(jobId: string, work: () => Promise<T>): Promise<T> {
  const client = await lockPool().connect();
  try {
    await client.query("select pg_advisory_lock($1, hashtext($2))", [JOB_CLASS, jobId]);
    return await work();
  } finally {
    await client.query("select pg_advisory_unlock($1, hashtext($2))", [JOB_CLASS, jobId]).then(
      () => client.release(),
      (err: Error) => client.release(err),
    );
  }
}

/** Active jobs of these queues that no live worker holds: failed into their retry. Returns their ids. */
export async function takeOverOrphans(b: PgBoss, queues: string[]): Promise<string[]> {
  const client = await lockPool().connect();
  const taken: string[] = [];
  try {
    const { rows } = await client.query<{ id: string; name: string }>(
      `select id, name from pgboss.job where name = any($1) and state = 'active' and started_on < now() - make_interval(secs => $2)`,
      [queues, GRACE_SECONDS],
    );
    for (const job of rows) {
      const { rows: got } = await client.query<{ ok: boolean }>("select pg_try_advisory_lock($1, hashtext($2)) as ok", [JOB_CLASS, job.id]);
      if (!got[0].ok) continue;
      await client.query("select pg_advisory_unlock($1, hashtext($2))", [JOB_CLASS, job.id]);
      await b.fail(job.name, job.id);
      taken.push(job.id);
    }
  } finally {
    client.release();
  }
  if (taken.length) console.warn(`[recordings] took over ${taken.length} job(s) of a worker that stopped: ${taken.join(", ")}`);
  return taken;
}

/** Looks for orphaned jobs every few seconds (and once at start). */
export function watchForOrphans(b: PgBoss, queues: string[], everyMs = 3000): { stop: () => void } {
  const look = () => takeOverOrphans(b, queues).catch((err) => console.error("[recordings] orphan check:", (err as Error).message));
  void look();
  const timer = setInterval(look, everyMs);
  timer.unref();
  return { stop: () => clearInterval(timer) };
}
