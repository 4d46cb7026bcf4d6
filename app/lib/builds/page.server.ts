import { asc, desc, eq, inArray } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { buildEvents, marks, procedureRevisions, procedures, recordings, runs, testRecords, users } from "~/db/schema";
import { calculatePreload, type ClearanceResult, type DistortionResult, type PreloadInput, type PreloadResult } from "~/lib/calc";
import { db } from "~/lib/db.server";
import type { ResultRow } from "~/lib/procedures/calc-presets";
import type { JSONNode } from "~/lib/procedures/document";
import { positionText } from "~/lib/recordings/positions";
import { prefillCalculator } from "~/lib/runs/prefill";
import { type RunCalculator, runSteps } from "~/lib/runs/steps";
import {
  boreGroups,
  distortionPlaces,
  isBoreSpec,
  isClearanceSpec,
  isPistonSpec,
  runDistortion,
  runPistonToWall,
  type StoredReading,
} from "~/lib/test-records/calcs";
import { limitsOf } from "~/lib/test-records/limits";
import { getTestRecord, type TestRecordView } from "~/lib/test-records/records.server";
import type { SpecLimits } from "~/lib/test-records/verdict";
import { getBuildByNumber } from "./builds.server";
import { BUILD_STATUS_LABELS, type BuildStatus } from "./status";

// What the build page and the build sheet show, gathered from the build's test records,
// recordings, marks and timeline. The calculators run here on the build's own readings through
// the test records' helpers (app/lib/test-records/calcs.ts, which call app/lib/calc).

type RecordReading = TestRecordView["readings"][number];

/** A reading out of its spec, with where it was taken and which record filed it. */
export type OutOfSpec = {
  recordId: string;
  recordTitle: string;
  procedureTitle: string;
  spec: SpecLimits;
  reading: RecordReading;
  where: string;
};

export type BuildCalc =
  | { kind: "distortion"; label: string; recordId: string; ok: true; result: DistortionResult }
  | { kind: "piston-to-wall"; label: string; recordId: string; ok: true; result: ClearanceResult }
  | {
      kind: "preload";
      label: string;
      recordId: string;
      ok: true;
      result: PreloadResult;
      /** Where the torque was read ("stud 4") and the calculator block it went through. */
      where: string;
      calculator: string;
      rows: ResultRow[];
    }
  | { kind: "distortion" | "piston-to-wall" | "preload"; label: string; recordId: string; ok: false; reason: string };

/** Per spec id: the Preload calculator its procedure revision puts beside it. */
type PreloadCalculators = Map<string, RunCalculator>;

export type TimelineEntry = { at: Date; who: string | null; what: string; href?: string };

/** Test records of the build, oldest test first, each as its record page shows it. */
async function recordsOf(buildId: string): Promise<TestRecordView[]> {
  const ids = await db()
    .select({ id: testRecords.id })
    .from(testRecords)
    .where(eq(testRecords.buildId, buildId))
    .orderBy(asc(testRecords.testedOn), asc(testRecords.createdAt));
  const views = await Promise.all(ids.map((r) => getTestRecord(r.id)));
  return views.filter((v): v is TestRecordView => v != null);
}

function stored(r: RecordReading): StoredReading & RecordReading {
  return { ...r, note: r.noteText };
}

/**
 * The Preload calculator each torque spec of these records is worked with: the one in the step
 * that measures it (app/lib/runs/steps.ts cuts the revision as a run does), else the revision's
 * only one. A calculator that turns a preload into a torque has no clamp load to show.
 */
async function preloadCalculators(records: TestRecordView[]): Promise<PreloadCalculators> {
  const out: PreloadCalculators = new Map();
  const revisionIds = [...new Set(records.filter((v) => v.specs.some((s) => s.quantity === "torque")).map((v) => v.revision.id))];
  if (!revisionIds.length) return out;
  const docs = await db()
    .select({ id: procedureRevisions.id, doc: procedureRevisions.doc })
    .from(procedureRevisions)
    .where(inArray(procedureRevisions.id, revisionIds));
  for (const { id, doc } of docs) {
    const steps = runSteps(doc as JSONNode);
    const isPreload = (c: RunCalculator) => c.kind === "preload" && c.preset.direction === "torque-to-preload";
    const all = steps.flatMap((st) => st.calculators).filter(isPreload);
    for (const v of records.filter((r) => r.revision.id === id))
      for (const spec of v.specs.filter((s) => s.quantity === "torque")) {
        const inStep = steps.find((st) => st.specKeys.includes(spec.specKey))?.calculators.find(isPreload);
        const calc = inStep ?? (all.length === 1 ? all[0] : undefined);
        if (calc) out.set(spec.id, calc);
      }
  }
  return out;
}

/** A torque reading through its Preload calculator: the block's own preset, the torque as read. */
function preloadCalc(v: TestRecordView, spec: SpecLimits, r: StoredReading, calculator: RunCalculator): BuildCalc {
  const where = positionText(r, ", ");
  const label = `Clamp load, ${spec.label}${where ? `, ${where}` : ""}`;
  const filled = prefillCalculator(calculator, [{ label: spec.label, quantity: "torque", value: r.valueEntered, unit: r.unitEntered }]);
  const base = { kind: "preload" as const, label, recordId: v.record.id };
  if (!filled.filled.length) return { ...base, ok: false, reason: "The calculator has no torque to take this reading." };
  if (!filled.outcome.ok) return { ...base, ok: false, reason: filled.outcome.message };
  return {
    ...base,
    ok: true,
    // The preset has just passed the calculator's schema in runCalculator.
    result: calculatePreload(filled.calculator.preset as PreloadInput),
    where,
    calculator: calculator.title,
    rows: filled.outcome.rows,
  };
}

/**
 * The build's calculators on its own readings: Bore distortion per cylinder of each bore spec
 * whose diameters carry a depth and an angle, piston-to-wall per cylinder from the tightest
 * bore (the smallest diameter measured in that cylinder) and the piston measured for it, and
 * the clamp load of each torque reading whose spec has a Preload calculator (`preloads`).
 */
export function buildCalcs(records: TestRecordView[], preloads: PreloadCalculators = new Map()): BuildCalc[] {
  const out: BuildCalc[] = [];
  const bores: { r: StoredReading; recordId: string }[] = [];
  const pistons: { r: StoredReading; recordId: string; clearance: SpecLimits | null }[] = [];
  for (const v of records) {
    const specs = v.specs.map(limitsOf);
    const readings = v.readings.map(stored);
    for (const g of boreGroups(specs, readings)) {
      const label = `Bore distortion, ${g.spec.label}${g.cylinder != null ? `, cylinder ${g.cylinder}` : ""}`;
      const { places, missing } = distortionPlaces(g.readings, new Map());
      if (missing.length) {
        out.push({
          kind: "distortion",
          label,
          recordId: v.record.id,
          ok: false,
          reason: `${missing.length} diameter(s) without a depth or an angle.`,
        });
        continue;
      }
      const run = runDistortion(g.readings, places, null);
      out.push(
        run.ok
          ? { kind: "distortion", label, recordId: v.record.id, ok: true, result: run.result }
          : {
              kind: "distortion",
              label,
              recordId: v.record.id,
              ok: false,
              reason: run.errors.calc ?? "The calculator refused these readings.",
            },
      );
    }
    const clearance = specs.find(isClearanceSpec) ?? null;
    for (const r of readings) {
      const s = specs.find((x) => x.id === r.specId);
      if (s && isBoreSpec(s)) bores.push({ r, recordId: v.record.id });
      if (s && isPistonSpec(s)) pistons.push({ r, recordId: v.record.id, clearance });
      const preload = s && preloads.get(s.id);
      if (s && preload) out.push(preloadCalc(v, s, r, preload));
    }
  }
  const cylinders = [...new Set(pistons.map((p) => p.r.cylinder ?? null))].sort((a, b) => (a ?? Infinity) - (b ?? Infinity));
  for (const c of cylinders) {
    const piston = pistons.find((p) => (p.r.cylinder ?? null) === c);
    const inCyl = bores.filter((b) => (b.r.cylinder ?? null) === c && b.r.unitEntered === bores[0]?.r.unitEntered);
    if (!piston || !inCyl.length) continue;
    const tightest = inCyl.reduce((a, b) => (b.r.valueEntered < a.r.valueEntered ? b : a));
    const label = `Piston-to-wall${c != null ? `, cylinder ${c}` : ""}`;
    const run = runPistonToWall(tightest.r, piston.r, piston.clearance);
    out.push(
      run.ok
        ? { kind: "piston-to-wall", label, recordId: piston.recordId, ok: true, result: run.result }
        : {
            kind: "piston-to-wall",
            label,
            recordId: piston.recordId,
            ok: false,
            reason: run.errors.calc ?? "The calculator refused these readings.",
          },
    );
  }
  return out;
}

/** Readings out of spec across the build's records (their current versions). */
function outOfSpec(records: TestRecordView[]): OutOfSpec[] {
  return records.flatMap((v) =>
    v.readings
      .filter((r) => r.verdict === "below" || r.verdict === "above")
      .map((r) => ({
        recordId: v.record.id,
        recordTitle: v.record.title,
        procedureTitle: v.procedure.title,
        spec: limitsOf(v.specs.find((s) => s.id === r.specId)!),
        reading: r,
        where: positionText(r, ", "),
      })),
  );
}

const runEnder = alias(users, "run_ender");

/** The build's runs with who started and who ended each, for the timeline. */
function runsOf(buildId: string) {
  return db()
    .select({
      id: runs.id,
      status: runs.status,
      startedAt: runs.startedAt,
      endedAt: runs.endedAt,
      abandonReason: runs.abandonReason,
      testRecordId: runs.testRecordId,
      procedureTitle: procedures.title,
      revisionNumber: procedureRevisions.number,
      startedBy: users.name,
      endedBy: runEnder.name,
    })
    .from(runs)
    .innerJoin(procedures, eq(procedures.id, runs.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, runs.revisionId))
    .leftJoin(users, eq(users.id, runs.startedBy))
    .leftJoin(runEnder, eq(runEnder.id, runs.endedBy))
    .where(eq(runs.buildId, buildId));
}

type RunRow = Awaited<ReturnType<typeof runsOf>>[number];

/** A run's start and, once it has one, its end: who, when, which procedure (and revision). */
function runTimeline(r: RunRow): TimelineEntry[] {
  const which = `${r.procedureTitle} (revision ${r.revisionNumber})`;
  const href = `/runs/${r.id}`;
  const out: TimelineEntry[] = [{ at: r.startedAt, who: r.startedBy, what: `Started a run of ${which}`, href }];
  if (r.endedAt && r.status === "finished")
    out.push({
      at: r.endedAt,
      who: r.endedBy,
      what: `Finished the run of ${which}, filing its test record`,
      href: r.testRecordId ? `/test-records/${r.testRecordId}` : href,
    });
  if (r.endedAt && r.status === "abandoned")
    out.push({
      at: r.endedAt,
      who: r.endedBy,
      what: `Stopped the run of ${which}${r.abandonReason ? `: ${r.abandonReason}` : ""}`,
      href,
    });
  return out;
}

async function attached(buildId: string) {
  const [recs, mks, events, runRows] = await Promise.all([
    db()
      .select({
        id: recordings.id,
        title: recordings.title,
        state: recordings.state,
        durationS: recordings.durationS,
        createdAt: recordings.createdAt,
        by: users.name,
      })
      .from(recordings)
      .leftJoin(users, eq(users.id, recordings.uploadedBy))
      .where(eq(recordings.buildId, buildId))
      .orderBy(asc(recordings.createdAt)),
    db()
      .select({
        id: marks.id,
        recordingId: marks.recordingId,
        recordingTitle: recordings.title,
        tStart: marks.tStart,
        text: marks.text,
        createdAt: marks.createdAt,
        by: users.name,
      })
      .from(marks)
      .innerJoin(recordings, eq(recordings.id, marks.recordingId))
      .leftJoin(users, eq(users.id, marks.createdBy))
      .where(eq(marks.buildId, buildId))
      .orderBy(asc(marks.recordingId), asc(marks.tStart)),
    db()
      .select({ e: buildEvents, by: users.name })
      .from(buildEvents)
      .leftJoin(users, eq(users.id, buildEvents.actorId))
      .where(eq(buildEvents.buildId, buildId))
      .orderBy(desc(buildEvents.at)),
    runsOf(buildId),
  ]);
  return { recordings: recs, marks: mks, events, runs: runRows };
}

/** Where an attach or detach event's recording or mark is (other events have no address). */
function eventHref(d: Record<string, unknown>): string | undefined {
  if (typeof d.recordingId !== "string") return undefined;
  return d.what === "mark" && typeof d.t === "number" ? `/recordings/${d.recordingId}?t=${d.t}` : `/recordings/${d.recordingId}`;
}

/** One timeline line for a build event, in the shop's words. */
function eventText(kind: string, d: Record<string, unknown>): string {
  switch (kind) {
    case "created":
      return "Opened the build";
    case "edited":
      return `Changed the ${d.fields}`;
    case "status":
      return `Moved it to ${BUILD_STATUS_LABELS[d.to as BuildStatus] ?? d.to}`;
    case "reopened":
      return `Reopened it: ${d.reason}`;
    case "sheet-mailed":
      return `Mailed the build sheet to ${d.to}`;
    case "attached":
      return d.what === "mark"
        ? `Attached the mark “${d.title}”${d.from ? ` (from ${d.from})` : ""}`
        : `Attached the recording “${d.title}”${d.from ? ` (from ${d.from})` : ""}`;
    case "detached":
      return `Detached the ${d.what === "mark" ? "mark" : "recording"} “${d.title}”${d.to ? ` (now on ${d.to})` : ""}`;
    case "linked":
      return `Linked from the work order text on ${d.testRecords} test record(s) and ${d.recordings} recording(s)`;
    default:
      return kind;
  }
}

/** Everything the build page shows, worst first; null when there is no such build. */
export async function buildPage(number: string) {
  const build = await getBuildByNumber(number);
  if (!build) return null;
  const [records, more] = await Promise.all([recordsOf(build.id), attached(build.id)]);
  const preloads = await preloadCalculators(records);
  const timeline: TimelineEntry[] = [
    ...more.events.map(({ e, by }) => ({ at: e.at, who: by, what: eventText(e.kind, e.detail), href: eventHref(e.detail) })),
    ...records.map((v) => ({
      at: v.record.createdAt,
      who: v.filedBy,
      what: `Filed “${v.record.title}” (${v.procedure.title}, revision ${v.revision.number})`,
      href: `/test-records/${v.record.id}`,
    })),
    ...records.flatMap((v) =>
      v.amendments.map((a) => ({
        at: a.createdAt,
        who: a.by,
        what: `Amended “${v.record.title}”: ${a.reason}`,
        href: `/test-records/${v.record.id}`,
      })),
    ),
    ...more.recordings.map((r) => ({ at: r.createdAt, who: r.by, what: `Recorded “${r.title}”`, href: `/recordings/${r.id}` })),
    ...more.runs.flatMap(runTimeline),
    ...more.marks.map((m) => ({
      at: m.createdAt,
      who: m.by,
      what: `Marked “${m.text}” on ${m.recordingTitle}`,
      href: `/recordings/${m.recordingId}?t=${m.tStart}`,
    })),
  ].sort((a, b) => b.at.getTime() - a.at.getTime());
  const incomplete = records
    .filter((v) => v.evaluation.verdict === "incomplete")
    .map((v) => ({
      recordId: v.record.id,
      title: v.record.title,
      notMeasured: v.specs.filter((s) => v.evaluation.notMeasured.includes(s.id)).map((s) => s.label),
      /** Specs not measured and places a run left empty, in sentences. */
      missing: v.evaluation.missing,
    }));
  return {
    build,
    records,
    outOfSpec: outOfSpec(records),
    incomplete,
    calcs: buildCalcs(records, preloads),
    recordings: more.recordings,
    marks: more.marks,
    timeline,
  };
}

export type BuildPage = NonNullable<Awaited<ReturnType<typeof buildPage>>>;
