import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "~/db/schema";
import { env } from "./env.server";

export type Db = NodePgDatabase<typeof schema>;
/** A transaction handle has the same query API as the database. */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
export type DbOrTx = Db | Tx;

const globalForDb = globalThis as unknown as { __benchreelPool?: pg.Pool; __benchreelDb?: Db };

export function pool(): pg.Pool {
  if (!globalForDb.__benchreelPool) {
    const p = new pg.Pool({ connectionString: env().DATABASE_URL, max: 10, connectionTimeoutMillis: 3000 });
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
