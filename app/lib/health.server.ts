import { sql } from "drizzle-orm";
import { db } from "./db.server";
import { env } from "./env.server";
import { mailStatus } from "./mail.server";
import { searchBacklog } from "./search/indexer.server";

export type Health = {
  status: "ok" | "down";
  database: { ok: boolean; latencyMs?: number; error?: string };
  mail: { ok: boolean; pending?: number; failing?: number };
  search?: { ok: boolean; pending?: number; failing?: number; setAside?: number };
};

/**
 * What `/healthz` reports to the shop's monitoring: only up/down and queue sizes. Any failure
 * on the way reads as the database being down (the queues live in it too); `search.setAside`
 * counts records the worker could not index, which admins see by name on /admin/search.
 */
export async function health(): Promise<Health> {
  const started = Date.now();
  let mail: Health["mail"] = { ok: false };
  try {
    await db().execute(sql`select 1`);
    const database = { ok: true, latencyMs: Date.now() - started };
    const m = await mailStatus();
    mail = { ok: m.failing === 0, ...m };
    if (!env().MEILI_HOST) return { status: "ok", database, mail };
    const s = await searchBacklog();
    return {
      status: "ok",
      database,
      mail,
      search: { ok: s.failing === 0 && s.setAside === 0, pending: s.pending, failing: s.failing, setAside: s.setAside },
    };
  } catch {
    return { status: "down", database: { ok: false, error: "database unreachable" }, mail };
  }
}
