import { sql } from "drizzle-orm";
import { db } from "~/lib/db.server";
import { mailStatus } from "~/lib/mail.server";

// Public on purpose (for the shop's monitoring); it reveals only up/down and queue sizes.
export async function loader() {
  const started = Date.now();
  let database: { ok: boolean; latencyMs?: number; error?: string };
  let mail: { ok: boolean; pending?: number; failing?: number } = { ok: false };
  try {
    await db().execute(sql`select 1`);
    database = { ok: true, latencyMs: Date.now() - started };
    const m = await mailStatus();
    mail = { ok: m.failing === 0, ...m };
  } catch (err) {
    database = { ok: false, error: "database unreachable" };
  }
  return Response.json(
    { status: database.ok ? "ok" : "down", database, mail },
    { status: database.ok ? 200 : 503, headers: { "Cache-Control": "no-store" } },
  );
}
