import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "~/db/schema";
import { env } from "./env.server";
import { requestStore } from "./request-store.server";

export type Db = NodePgDatabase<typeof schema>;
/** A transaction handle has the same query API as the database. */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
export type DbOrTx = Db | Tx;

const globalForDb = globalThis as unknown as { __benchreelPool?: pg.Pool; __benchreelDb?: Db };

/** The queries a request made and the time they took, kept in its request store. */
type QueryTally = { count: number; ms: number };
const TALLY = "db-queries";

/**
 * Counts a query into the request that started it. The store is read when the query is made,
 * in the caller's own async context: a query waiting for a free connection finishes in another
 * request's, which would otherwise get the count.
 */
function tallied<T>(started: Promise<T>): Promise<T> {
  const tally = requestStore.getStore();
  if (!tally) return started;
  const t0 = performance.now();
  const add = () => {
    const sum = (tally.get(TALLY) as QueryTally | undefined) ?? { count: 0, ms: 0 };
    tally.set(TALLY, { count: sum.count + 1, ms: sum.ms + performance.now() - t0 });
  };
  started.then(add, add);
  return started;
}

/**
 * A client that counts the queries code makes on it (a transaction's, on a checked-out client).
 * The pool's own `query` calls it with a callback after a checkout, possibly in another request's
 * context; those are counted by `CountingPool.query` instead, where they start.
 */
class CountingClient extends pg.Client {
  // biome-ignore lint/suspicious/noExplicitAny: pg's overloads cannot be restated; the arguments go through untouched.
  override query(...args: any[]): any {
    const result = (super.query as (...a: unknown[]) => unknown)(...args);
    if (typeof args[args.length - 1] === "function" || !(result instanceof Promise)) return result;
    return tallied(result);
  }
}

class CountingPool extends pg.Pool {
  // biome-ignore lint/suspicious/noExplicitAny: as above.
  override query(...args: any[]): any {
    const result = (super.query as (...a: unknown[]) => unknown)(...args);
    return result instanceof Promise ? tallied(result) : result;
  }
}

/**
 * Server-Timing for this request's database work: `db;desc="N queries";dur=<ms>` (the count in
 * the description, the summed query time as the duration), or null when it made none. Read by
 * the integration tests and `npm run bench` to see how many queries a render makes.
 */
export function queryTiming(): string | null {
  const sum = requestStore.getStore()?.get(TALLY) as QueryTally | undefined;
  if (!sum) return null;
  return `db;desc="${sum.count} ${sum.count === 1 ? "query" : "queries"}";dur=${sum.ms.toFixed(1)}`;
}

export function pool(): pg.Pool {
  if (!globalForDb.__benchreelPool) {
    const p = new CountingPool({ connectionString: env().DATABASE_URL, max: 10, connectionTimeoutMillis: 3000, Client: CountingClient });
    p.on("error", (err) => console.error("[db] idle client error:", err.message));
    // The pool handles errors of idle clients only. A client checked out when PostgreSQL goes
    // away (a restart, `pg_ctl stop`) emits 'error' itself, and an unhandled 'error' ends the
    // process: the query in flight fails anyway, so the error is logged here and the process
    // stays up to serve the "database unavailable" answer and reconnect when it returns.
    p.on("connect", (client) => client.on("error", (err) => console.error("[db] client error:", err.message)));
    globalForDb.__benchreelPool = p;
  }
  return globalForDb.__benchreelPool;
}

export function db(): Db {
  globalForDb.__benchreelDb ??= drizzle(pool(), { schema });
  return globalForDb.__benchreelDb;
}

/** True when an error means "could not reach PostgreSQL" rather than a bad query. */
export function isDatabaseDown(err: unknown): boolean {
  const e = err as { code?: string; message?: string; cause?: unknown } | undefined;
  if (!e) return false;
  const codes = ["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "57P01", "57P03", "08006", "08001"];
  if (e.code && codes.includes(e.code)) return true;
  if (/timeout exceeded when trying to connect|Connection terminated|connect ECONNREFUSED/i.test(e.message ?? "")) return true;
  return e.cause ? isDatabaseDown(e.cause) : false;
}
