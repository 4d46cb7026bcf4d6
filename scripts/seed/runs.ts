// The demo's open run (issue 16): Marcus is partway through the head studs procedure on the
// build that is on the bench, with the final torque typed stud by stud for six of the head's
// studs (the rest still to come) and the stud protrusion still to measure. Needs the demo procedures and a build On the bench; skipped
// without them. Idempotent (a fixed run id).
import { asc, eq } from "drizzle-orm";
import type { NodePgDatabase } from "drizzle-orm/node-postgres";
import { builds, procedureRevisions, procedures, procedureSpecs, runEntries, runs } from "../../app/db/schema";
import { toSI, type UnitCode } from "../../app/lib/calc";
import type { JSONNode } from "../../app/lib/procedures/document";
import { runSteps } from "../../app/lib/runs/steps";

type Db = NodePgDatabase<Record<string, unknown>>;

const RUN_ID = "5eed0000-0000-4000-8000-00000000a001";
const STUDS = "1a000000-0000-4000-8000-000000000001";
/** Each demo entry: the spec, the stud, what was typed, and how long ago (minutes). */
const TYPED: { specKey: string; fastener: number; value: number; decimals: number; minutesAgo: number }[] = [
  110, 111, 110, 109, 110, 111,
].map((value, i) => ({ specKey: "studs-final", fastener: i + 1, value, decimals: 0, minutesAgo: 17 - i }));

export async function seedRuns(db: Db): Promise<number | "skipped"> {
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
