import { asc, desc, eq, inArray, sql } from "drizzle-orm";
import { builds, users } from "~/db/schema";
import { type DbOrTx, db } from "~/lib/db.server";
import type { BuildStatus } from "./status";

// Finding builds. Writing them (create, edit, status, reopen) is in write.server.ts; the build
// page's gathering of records, readings and marks in page.server.ts.

export type Build = typeof builds.$inferSelect;
export type BuildWithLead = Build & { leadBuilderName: string | null };

const withLead = { b: builds, leadBuilderName: users.name };

function flat(r: { b: Build; leadBuilderName: string | null }): BuildWithLead {
  return { ...r.b, leadBuilderName: r.leadBuilderName };
}

/** The build with this work order number (compared in upper case, as numbers are stored), or null. */
export async function getBuildByNumber(number: string, h: DbOrTx = db()): Promise<BuildWithLead | null> {
  const [r] = await h
    .select(withLead)
    .from(builds)
    .leftJoin(users, eq(users.id, builds.leadBuilderId))
    .where(eq(builds.number, number.trim().toUpperCase()));
  return r ? flat(r) : null;
}

export async function getBuild(id: string, h: DbOrTx = db()): Promise<BuildWithLead | null> {
  const [r] = await h.select(withLead).from(builds).leftJoin(users, eq(users.id, builds.leadBuilderId)).where(eq(builds.id, id));
  return r ? flat(r) : null;
}

/**
 * Builds, the ones still in the shop first (Open, On the bench, Finished), each group most
 * recently changed first. `status` narrows to those states.
 */
export async function listBuilds(opts: { status?: readonly BuildStatus[]; limit?: number } = {}): Promise<BuildWithLead[]> {
  const rows = await db()
    .select(withLead)
    .from(builds)
    .leftJoin(users, eq(users.id, builds.leadBuilderId))
    .where(opts.status?.length ? inArray(builds.status, [...opts.status]) : undefined)
    .orderBy(sql`${builds.status} = 'delivered'`, desc(builds.updatedAt), asc(builds.number))
    .limit(opts.limit ?? 500);
  return rows.map(flat);
}
