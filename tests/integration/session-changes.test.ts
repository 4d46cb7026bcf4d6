// A session is read from PostgreSQL on every request (app/lib/auth.server.ts keeps none between
// requests): a change written by another process (an admin's tool, another app process) holds
// on the very next request.
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { sessions, users } from "~/db/schema";
import { db } from "~/lib/db.server";
import { createUser, http } from "../support/app";

const me = (cookie: string) => http("/api/me", { cookie });

describe("sessions follow the database", () => {
  it("a deleted session is signed out on the next request", async () => {
    const u = await createUser("apprentice");
    expect((await me(u.cookie)).status).toBe(200);
    await db().delete(sessions).where(eq(sessions.userId, u.id));
    expect((await me(u.cookie)).status).toBe(401);
  });

  it("a deactivated person is signed out on the next request, and their sessions end", async () => {
    const u = await createUser("builder");
    expect((await me(u.cookie)).status).toBe(200);
    await db().update(users).set({ deactivatedAt: new Date() }).where(eq(users.id, u.id));
    expect((await me(u.cookie)).status).toBe(401);
    expect(await db().select().from(sessions).where(eq(sessions.userId, u.id))).toEqual([]);
  });

  it("a role change shows on the next request", async () => {
    const u = await createUser("apprentice");
    expect((await me(u.cookie)).status).toBe(200);
    await db().update(users).set({ role: "qc" }).where(eq(users.id, u.id));
    expect(JSON.stringify(await (await me(u.cookie)).json())).toContain('"qc"');
  });
});
