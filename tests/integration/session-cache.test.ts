// Validated sessions are kept in the app for a few seconds (app/lib/auth.server.ts), and
// forgotten at once when sessions or people change, even when the change comes from another
// process: these tests change the database directly and expect the app to notice well
// inside the 5-second keeping time.
import { eq, sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { sessions, users } from "~/db/schema";
import { db } from "~/lib/db.server";
import { createUser, http, waitFor } from "../support/app";

const me = (cookie: string) => http("/api/me", { cookie }).then((r) => r.status);
const warm = async (cookie: string) => {
  for (let i = 0; i < 3; i++) expect(await me(cookie)).toBe(200);
};
/** The status once it is `want`, or throws after `ms`; the time it took. */
async function becomes(cookie: string, want: number, ms: number) {
  const t0 = Date.now();
  await waitFor(async () => (await me(cookie)) === want, ms, 20);
  return Date.now() - t0;
}

describe("kept sessions", () => {
  it("end within a second when the session row is deleted by another process", async () => {
    const u = await createUser("apprentice");
    await warm(u.cookie);
    await db().delete(sessions).where(eq(sessions.userId, u.id));
    expect(await becomes(u.cookie, 401, 1_500)).toBeLessThan(1_500);
  });

  it("end within a second when the person is deactivated by another process", async () => {
    const u = await createUser("builder");
    await warm(u.cookie);
    await db().update(users).set({ deactivatedAt: new Date() }).where(eq(users.id, u.id));
    expect(await becomes(u.cookie, 401, 1_500)).toBeLessThan(1_500);
  });

  it("show a role change made by another process within a second", async () => {
    const u = await createUser("apprentice");
    await warm(u.cookie);
    const role = async () => ((await (await http("/api/me", { cookie: u.cookie })).json()) as { user?: { role?: string }; role?: string });
    await db().update(users).set({ role: "qc" }).where(eq(users.id, u.id));
    await waitFor(async () => JSON.stringify(await role()).includes('"qc"'), 1_500, 20);
  });

  it("are not kept while the app's notification connection is down", async () => {
    const u = await createUser("apprentice");
    await warm(u.cookie);
    const pids = await db().execute<{ pid: number }>(sql`select pid from pg_stat_activity where application_name = 'benchreel-listener'`);
    expect(pids.rows.length).toBeGreaterThan(0);
    for (const { pid } of pids.rows) await db().execute(sql`select pg_terminate_backend(${pid})`);
    await waitFor(async () => {
      const r = await db().execute(sql`select 1 from pg_stat_activity where pid = any(${`{${pids.rows.map((p) => p.pid).join(",")}}`}::int[])`);
      return r.rows.length === 0;
    }, 3_000, 20);
    await db().delete(sessions).where(eq(sessions.userId, u.id)); // this notification reaches nobody
    expect(await me(u.cookie)).toBe(401);
  });
});
