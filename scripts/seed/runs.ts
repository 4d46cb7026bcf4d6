// The demo's open runs (issue 16) on the build that is on the bench: Marcus is partway through
// the head studs procedure, with the final torque typed stud by stud for six of the head's studs
// (the rest still to come) and the stud protrusion still to measure; and through the torque-plate
// honing, whose bore is read in its Bore distortion grid (10 and 50 mm down at 0°, 45°, 90°,
// 135°): cylinder 1 done, cylinder 2 half. Needs the demo procedures and a build On the bench;
// skipped without them. Idempotent (fixed run ids).
import { and, asc, eq } from "drizzle-orm";
import type { NodePgDatabase } from "drizzle-orm/node-postgres";
import { builds, procedureRevisions, procedures, procedureSpecs, runEntries, runs } from "../../app/db/schema";
import { toSI, type UnitCode } from "../../app/lib/calc";
import type { JSONNode } from "../../app/lib/procedures/document";
import { runSteps } from "../../app/lib/runs/steps";

type Db = NodePgDatabase<Record<string, unknown>>;

const RUN_ID = "5eed0000-0000-4000-8000-00000000a001";
const STUDS = "1a000000-0000-4000-8000-000000000001";
const HONING_RUN_ID = "5eed0000-0000-4000-8000-00000000a002";
const HONING = "1a000000-0000-4000-8000-000000000002";
/** The honed bores as read with the plate fitted, mm: per cylinder, 10, 50 then 90 mm down, at 0°, 45°, 90°, 135°. */
const BORE_DEPTHS_MM = [10, 50, 90];
const BORES: Record<number, number[][]> = {
  1: [
    [88.006, 88.009, 88.007, 88.004],
    [88.005, 88.007, 88.006, 88.004],
    [88.005, 88.006, 88.006, 88.003],
  ],
  2: [[88.005, 88.008, 88.006, 88.003]],
};
/** Each demo entry: the spec, the stud, what was typed, and how long ago (minutes). */
const TYPED: { specKey: string; fastener: number; value: number; decimals: number; minutesAgo: number }[] = [
  110, 111, 110, 109, 110, 111,
].map((value, i) => ({ specKey: "studs-final", fastener: i + 1, value, decimals: 0, minutesAgo: 17 - i }));

export async function seedRuns(db: Db): Promise<number | "skipped"> {
  const studs = await seedStudsRun(db);
  const honing = await seedHoningRun(db);
  if (studs === "skipped" && honing === "skipped") return "skipped";
  return (studs === "skipped" ? 0 : studs) + (honing === "skipped" ? 0 : honing);
}

async function seedStudsRun(db: Db): Promise<number | "skipped"> {
  const [have] = await db.select({ id: runs.id }).from(runs).where(eq(runs.id, RUN_ID));
  if (have) return 0;
  const [proc] = await db.select().from(procedures).where(eq(procedures.id, STUDS));
  const [build] = await db.select().from(builds).where(eq(builds.status, "on_bench")).orderBy(asc(builds.number)).limit(1);
  if (!proc?.publishedRevisionId || !build) return "skipped";
  const [rev] = await db.select().from(procedureRevisions).where(eq(procedureRevisions.id, proc.publishedRevisionId));
  const specs = await db.select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, rev.id));
  const steps = runSteps(rev.doc as JSONNode);
  const at = Math.max(
    0,
    steps.findIndex((s) => s.specKeys.includes("studs-final")),
  );
  const started = new Date(Date.now() - 40 * 60_000);
  await db.insert(runs).values({
    id: RUN_ID,
    buildId: build.id,
    procedureId: proc.id,
    revisionId: rev.id,
    currentStep: at,
    startedBy: "demo-marcus",
    startedAt: started,
    updatedAt: new Date(Date.now() - 12 * 60_000),
  });
  const rows = TYPED.flatMap((t, i) => {
    const spec = specs.find((s) => s.specKey === t.specKey);
    if (!spec) return [];
    const typedAt = new Date(Date.now() - t.minutesAgo * 60_000);
    return [
      {
        runId: RUN_ID,
        specId: spec.id,
        specKey: spec.specKey,
        fastener: t.fastener,
        valueEntered: t.value,
        unitEntered: spec.unit,
        valueDecimals: t.decimals,
        valueSi: toSI(t.value, spec.unit as UnitCode),
        idempotencyKey: `demo-run-entry-${i + 1}`,
        enteredBy: "demo-marcus",
        typedAt,
        receivedAt: typedAt,
        device: "bench tablet 2",
      },
    ];
  });
  if (rows.length) await db.insert(runEntries).values(rows);
  return 1;
}

async function seedHoningRun(db: Db): Promise<number | "skipped"> {
  const [have] = await db.select({ id: runs.id }).from(runs).where(eq(runs.id, HONING_RUN_ID));
  if (have) return 0;
  const [proc] = await db.select().from(procedures).where(eq(procedures.id, HONING));
  const [build] = await db.select().from(builds).where(eq(builds.status, "on_bench")).orderBy(asc(builds.number)).limit(1);
  if (!proc?.publishedRevisionId || !build) return "skipped";
  const [rev] = await db.select().from(procedureRevisions).where(eq(procedureRevisions.id, proc.publishedRevisionId));
  const [spec] = await db
    .select()
    .from(procedureSpecs)
    .where(and(eq(procedureSpecs.revisionId, rev.id), eq(procedureSpecs.specKey, "bore-dia")));
  if (!spec) return "skipped";
  const at = Math.max(
    0,
    runSteps(rev.doc as JSONNode).findIndex((s) => s.specKeys.includes("bore-dia")),
  );
  await db.insert(runs).values({
    id: HONING_RUN_ID,
    buildId: build.id,
    procedureId: proc.id,
    revisionId: rev.id,
    currentStep: at,
    startedBy: "demo-priya",
    startedAt: new Date(Date.now() - 90 * 60_000),
    updatedAt: new Date(Date.now() - 25 * 60_000),
  });
  let n = 0;
  const rows = Object.entries(BORES).flatMap(([cylinder, depths]) =>
    depths.flatMap((row, d) =>
      row.map((value, a) => {
        n += 1;
        const typedAt = new Date(Date.now() - (60 - n) * 60_000);
        return {
          runId: HONING_RUN_ID,
          specId: spec.id,
          specKey: spec.specKey,
          cylinder: Number(cylinder),
          depthM: toSI(BORE_DEPTHS_MM[d], "mm"),
          depthUnit: "mm",
          angleDeg: [0, 45, 90, 135][a],
          valueEntered: value,
          unitEntered: spec.unit,
          valueDecimals: 3,
          valueSi: toSI(value, spec.unit as UnitCode),
          idempotencyKey: `demo-honing-entry-${n}`,
          enteredBy: "demo-priya",
          typedAt,
          receivedAt: typedAt,
          device: "bench tablet 1",
        };
      }),
    ),
  );
  await db.insert(runEntries).values(rows);
  return 1;
}
