import { ERRORS, type Lock, type Locker, type RequestRelease } from "@tus/server";
import pg from "pg";
import { env } from "../env.server";

/**
 * tus's lock on an upload that holds across app instances: a PostgreSQL session advisory lock
 * (one key per upload id) on a connection held while the request works on the upload. Another
 * instance that wants the lock asks the holder to let go (NOTIFY on RELEASE_CHANNEL, heard by
 * every instance; the holder's tus request then ends, as with tus's in-memory locker), and
 * takes it when it is free. A holder that dies loses its connection, and with it the lock.
 */
const RELEASE_CHANNEL = "benchreel_tus_release";
/** The first half of each advisory key: "tus" in ASCII, apart from any other advisory lock. */
const LOCK_CLASS = 0x747573;
const ACQUIRE_TIMEOUT_MS = 30_000;
const RETRY_MS = 50;

type Shared = { pool: pg.Pool; held: Map<string, RequestRelease>; listening: Promise<void> | null };
const g = globalThis as unknown as { __benchreelTusLocks?: Shared };

function shared(): Shared {
  if (!g.__benchreelTusLocks) {
    // Its own small pool: a PATCH holds its connection for as long as the bytes flow, which must
    // never starve the pages' pool.
    const pool = new pg.Pool({ connectionString: env().DATABASE_URL, max: 25, application_name: "benchreel-upload-locks" });
    pool.on("error", (err) => console.error("[uploads] lock connection:", err.message));
    g.__benchreelTusLocks = { pool, held: new Map(), listening: null };
  }
  return g.__benchreelTusLocks;
}

/** One LISTEN connection per process, for other instances' requests to release a lock held here. */
function listen(s: Shared): Promise<void> {
  s.listening ??= (async () => {
    const client = new pg.Client({ connectionString: env().DATABASE_URL, application_name: "benchreel-upload-locks-listen" });
    const reset = () => {
      s.listening = null;
      void client.end().catch(() => {});
    };
    client.on("error", reset);
    client.on("end", reset);
    client.on("notification", (n) => {
      const release = n.payload ? s.held.get(n.payload) : undefined;
      if (release) void Promise.resolve(release()).catch(() => {});
    });
    await client.connect();
    await client.query(`LISTEN ${RELEASE_CHANNEL}`);
  })().catch((err) => {
    s.listening = null;
    throw err;
  });
  return s.listening;
}

class PgLock implements Lock {
  private client: pg.PoolClient | null = null;
  constructor(private readonly id: string) {}

  async lock(stopSignal: AbortSignal, requestRelease: RequestRelease): Promise<void> {
    const s = shared();
    await listen(s);
    const client = await s.pool.connect();
    const deadline = Date.now() + ACQUIRE_TIMEOUT_MS;
    let asked = false;
    try {
      for (;;) {
        const { rows } = await client.query<{ ok: boolean }>("select pg_try_advisory_lock($1, hashtext($2)) as ok", [LOCK_CLASS, this.id]);
        if (rows[0].ok) break;
        if (!asked) {
          await client.query("select pg_notify($1, $2)", [RELEASE_CHANNEL, this.id]);
          asked = true;
        }
        if (stopSignal.aborted || Date.now() > deadline) throw ERRORS.ERR_LOCK_TIMEOUT;
        await new Promise((r) => setTimeout(r, RETRY_MS));
      }
    } catch (err) {
      client.release();
      throw err;
    }
    this.client = client;
    s.held.set(this.id, requestRelease);
  }

  async unlock(): Promise<void> {
    const client = this.client;
    if (!client) throw new Error("Releasing an unlocked lock!");
    this.client = null;
    shared().held.delete(this.id);
    try {
      await client.query("select pg_advisory_unlock($1, hashtext($2))", [LOCK_CLASS, this.id]);
      client.release();
    } catch (err) {
      // A connection that failed may still hold the lock: it is closed, which lets go of it.
      client.release(err as Error);
    }
  }
}

export class PgAdvisoryLocker implements Locker {
  newLock(id: string): Lock {
    return new PgLock(id);
  }
}
