import { sql } from "drizzle-orm";
import { db } from "~/lib/db.server";
import { env } from "~/lib/env.server";
import { mailStatus } from "~/lib/mail.server";
import { searchBacklog } from "~/lib/search/indexer.server";

// Public on purpose (for the shop's monitoring); it reveals only up/down and queue sizes.
// `search.setAside` counts records the worker could not index; admins see which and why on
// /admin/search.
export async function loader() {
  const started = Date.now();
  let database: { ok: boolean; latencyMs?: number; error?: string };
  let mail: { ok: boolean; pending?: number; failing?: number } = { ok: false };
  let search: { ok: boolean; pending?: number; failing?: number; setAside?: number } | undefined;
  try {
    await db().execute(sql`select 1`);
    database = { ok: true, latencyMs: Date.now() - started };
    const m = await mailStatus();
    mail = { ok: m.failing === 0, ...m };
    if (env().MEILI_HOST) {
      const s = await searchBacklog();
      search = { ok: s.failing === 0 && s.setAside === 0, pending: s.pending, failing: s.failing, setAside: s.setAside };
    }
  } catch (err) {
    database = { ok: false, error: "database unreachable" };
  }
  return Response.json(
    { status: database.ok ? "ok" : "down", database, mail, ...(search ? { search } : {}) },
    { status: database.ok ? 200 : 503, headers: { "Cache-Control": "no-store" } },
  );
}
