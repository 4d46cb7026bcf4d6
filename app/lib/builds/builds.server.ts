import { asc, desc, eq, inArray, sql } from "drizzle-orm";
import { builds, testRecords, users } from "~/db/schema";
import { type DbOrTx, db } from "~/lib/db.server";
import { notFound, parseParams } from "~/lib/edge.server";
import { buildParams } from "./form";
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

/** The build a route's :number names; a malformed or unknown number is a 404 (page or JSON). */
export async function buildOr404(request: Request, params: unknown): Promise<BuildWithLead> {
  const { number } = parseParams(request, buildParams, params, "build");
  const b = await getBuildByNumber(number);
  if (!b) notFound(request, "build");
  return b;
}

export async function getBuild(id: string, h: DbOrTx = db()): Promise<BuildWithLead | null> {
  const [r] = await h.select(withLead).from(builds).leftJoin(users, eq(users.id, builds.leadBuilderId)).where(eq(builds.id, id));
  return r ? flat(r) : null;
}

type ListOptions = {
  status?: readonly BuildStatus[];
  limit?: number;
  /** Builds with more test records out of spec first, before the limit cuts the list. */
  outOfSpecFirst?: boolean;
};

/** Test records of the build out of spec, for ordering in SQL (the limit comes after it). */
const outCount = sql`(select count(*) from ${testRecords} where ${testRecords.buildId} = ${builds.id} and ${testRecords.verdict} = 'out')`;

/**
 * Builds, the ones still in the shop first (Open, On the bench, Finished), each group most
 * recently changed first. `status` narrows to those states.
 */
export async function listBuilds(opts: ListOptions = {}): Promise<BuildWithLead[]> {
  const rows = await db()
    .select(withLead)
    .from(builds)
    .leftJoin(users, eq(users.id, builds.leadBuilderId))
    .where(opts.status?.length ? inArray(builds.status, [...opts.status]) : undefined)
    .orderBy(
      ...(opts.outOfSpecFirst ? [desc(outCount)] : []),
      sql`${builds.status} = 'delivered'`,
      desc(builds.updatedAt),
      asc(builds.number),
    )
    .limit(opts.limit ?? 500);
  return rows.map(flat);
}

/** Per build: test records filed, how many are out of spec and how many incomplete. */
export async function recordCounts(buildIds: string[]): Promise<Map<string, { records: number; out: number; incomplete: number }>> {
  const out = new Map<string, { records: number; out: number; incomplete: number }>();
  if (!buildIds.length) return out;
  const rows = await db()
    .select({
      buildId: testRecords.buildId,
      records: sql<number>`count(*)::int`,
      out: sql<number>`count(*) filter (where ${testRecords.verdict} = 'out')::int`,
      incomplete: sql<number>`count(*) filter (where ${testRecords.verdict} = 'incomplete')::int`,
    })
    .from(testRecords)
    .where(inArray(testRecords.buildId, buildIds))
    .groupBy(testRecords.buildId);
  for (const r of rows) if (r.buildId) out.set(r.buildId, { records: r.records, out: r.out, incomplete: r.incomplete });
  return out;
}

/** Builds with their record counts, for the list and the Shop floor. */
export async function buildSummaries(opts: ListOptions = {}) {
  const list = await listBuilds(opts);
  const counts = await recordCounts(list.map((b) => b.id));
  return list.map((b) => ({ ...b, counts: counts.get(b.id) ?? { records: 0, out: 0, incomplete: 0 } }));
}

type BuildChoice = { id: string; number: string; label: string; status: BuildStatus };

/** Build numbers and who they are for, for the pickers that attach work to a build. */
export async function buildChoices(): Promise<BuildChoice[]> {
  const rows = await db()
    .select({ id: builds.id, number: builds.number, customer: builds.customerName, engine: builds.engine, status: builds.status })
    .from(builds)
    .orderBy(asc(builds.number));
  return rows.map((r) => ({
    id: r.id,
    number: r.number,
    status: r.status,
    label: [r.number, r.customer, r.engine].filter(Boolean).join(" · ") + (r.status === "delivered" ? " (delivered)" : ""),
  }));
}
