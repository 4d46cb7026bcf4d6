/**
 * Runs: a published procedure worked step by step on a build. Starting pins the revision in
 * force; entries arrive one by one (or in a batch after an offline stretch), each stored once
 * under its idempotency key; finishing files the test record through the test-records domain,
 * pinned to the run's revision, in the same transaction that closes the run.
 */
import { and, asc, desc, eq, inArray, max, ne, sql } from "drizzle-orm";
import { builds, procedureRevisions, procedures, procedureSpecs, runEntries, runPhotos, runs, users } from "~/db/schema";
import { audit } from "~/lib/audit.server";
import { getBuild, getBuildByNumber } from "~/lib/builds/builds.server";
import { toSI, type UnitCode } from "~/lib/calc";
import { db, type DbOrTx } from "~/lib/db.server";
import { DomainError } from "~/lib/domain-error";
import type { JSONNode } from "~/lib/procedures/document";
import { NO_POSITION, type Position, positionFieldsForSpec, positionText } from "~/lib/recordings/positions";
import type { TypedReading } from "~/lib/test-records/form";
import { createTestRecord, limitsOf } from "~/lib/test-records/records.server";
import { evaluateRecord, type MissingPlace } from "~/lib/test-records/verdict";
import {
  type EngineCounts,
  type EntryInput,
  latestByPlace,
  gridOf,
  latestAtPlaces,
  type Place,
  placeKey,
  placeLabel,
  placeOf,
  placesBySpec,
  placeWord,
  progressOf,
  runPlaceField,
  studsField,
} from "./entries";
import { gridCellsBySpec } from "./grid";
import { runSteps } from "./steps";

type Actor = { id: string; name?: string };
export type RunStatus = (typeof runs.$inferSelect)["status"];

const isId = (s: string) => /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(s);

// ---- starting ---------------------------------------------------------------------------------

/** What the start form offers: the published procedures and the builds still in the shop. */
export async function startChoices() {
  const [procs, open] = await Promise.all([
    db()
      .select({ id: procedures.id, slug: procedures.slug, title: procedures.title })
      .from(procedures)
      .where(sql`${procedures.publishedRevisionId} is not null`)
      .orderBy(asc(procedures.title)),
    db()
      .select({ id: builds.id, number: builds.number, engine: builds.engine, customerName: builds.customerName })
      .from(builds)
      .where(sql`${builds.status} <> 'delivered'`)
      .orderBy(desc(builds.updatedAt), asc(builds.number)),
  ]);
  return { procedures: procs, builds: open };
}

/**
 * Starts a run of the procedure's published revision on the build. A delivered build takes no
 * new work (reopen it first); a procedure without a published revision cannot be worked.
 */
export async function startRun(actor: Actor, input: { procedure: string; build: string }): Promise<{ id: string }> {
  const build = isId(input.build) ? await getBuild(input.build) : await getBuildByNumber(input.build);
  if (!build) throw new DomainError("There is no build with that work order number.", { status: 422, field: "build" });
  if (build.status === "delivered")
    throw new DomainError(`${build.number} has been delivered; reopen the build before working on it again.`, { field: "build" });
  return db().transaction(async (tx) => {
    const [proc] = await tx
      .select()
      .from(procedures)
      .where(isId(input.procedure) ? eq(procedures.id, input.procedure) : eq(procedures.slug, input.procedure))
      .for("share");
    if (!proc) throw new DomainError("There is no such procedure.", { status: 422, field: "procedure" });
    if (!proc.publishedRevisionId)
      throw new DomainError("This procedure has no published revision yet; only a published one can be worked.", { field: "procedure" });
    const [run] = await tx
      .insert(runs)
      .values({ buildId: build.id, procedureId: proc.id, revisionId: proc.publishedRevisionId, startedBy: actor.id })
      .returning({ id: runs.id });
    await audit(tx, actor.id, "start", "run", run.id, { build: build.number, procedureId: proc.id, revisionId: proc.publishedRevisionId });
    return run;
  });
}

// ---- reading ----------------------------------------------------------------------------------

async function entriesOf(h: DbOrTx, runId: string) {
  const rows = await h
    .select({ e: runEntries, by: users.name })
    .from(runEntries)
    .leftJoin(users, eq(users.id, runEntries.enteredBy))
    .where(eq(runEntries.runId, runId))
    .orderBy(asc(runEntries.seq));
  return rows.map(({ e, by }) => ({ ...e, by, receivedOrder: e.seq }));
}

function specsOf(h: DbOrTx, revisionId: string) {
  return h.select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, revisionId)).orderBy(asc(procedureSpecs.position));
}

/** Everything the run screen shows, or null for no such run. The state is the server's, so any device opens it where it was left. */
export async function getRun(id: string) {
  if (!isId(id)) return null;
  const [row] = await db()
    .select({
      run: runs,
      procedure: { id: procedures.id, slug: procedures.slug, title: procedures.title, publishedRevisionId: procedures.publishedRevisionId },
      revision: { id: procedureRevisions.id, number: procedureRevisions.number, doc: procedureRevisions.doc },
      build: {
        id: builds.id,
        number: builds.number,
        engine: builds.engine,
        engineSerial: builds.engineSerial,
        status: builds.status,
        cylinders: builds.cylinders,
        mainJournals: builds.mainJournals,
      },
      startedByName: users.name,
    })
    .from(runs)
    .innerJoin(procedures, eq(procedures.id, runs.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, runs.revisionId))
    .innerJoin(builds, eq(builds.id, runs.buildId))
    .leftJoin(users, eq(users.id, runs.startedBy))
    .where(eq(runs.id, id));
  if (!row) return null;
  const [specs, entries, photos, lastStuds, newer] = await Promise.all([
    specsOf(db(), row.revision.id),
    entriesOf(db(), id),
    listRunPhotos(id),
    studsOfLastRun(row.run.procedureId, id),
    row.procedure.publishedRevisionId && row.procedure.publishedRevisionId !== row.revision.id
      ? db()
          .select({ number: procedureRevisions.number })
          .from(procedureRevisions)
          .where(eq(procedureRevisions.id, row.procedure.publishedRevisionId))
      : Promise.resolve([]),
  ]);
  const latest = latestByPlace(entries);
  const steps = runSteps(row.revision.doc as JSONNode);
  const specLikes = specs.map((s) => ({ key: s.specKey, quantity: s.quantity, label: s.label }));
  const places = placesBySpec(specLikes, row.build, latest, gridCellsBySpec(steps, specLikes));
  return {
    run: row.run,
    startedByName: row.startedByName,
    procedure: { id: row.procedure.id, slug: row.procedure.slug, title: row.procedure.title },
    revision: { id: row.revision.id, number: row.revision.number },
    /** A revision published after the run began: announced, never followed. */
    newerRevision: newer[0]?.number ?? null,
    build: row.build,
    steps,
    specs: specs.map((s, i) => {
      const { field, offered } = places[i];
      return {
        ...limitsOf(s),
        key: s.specKey,
        note: s.note,
        /** The place each of its values is measured at (null: measured once). */
        field,
        offered,
        /** Rows shown before any is typed: studs from the last run of this procedure or the spec's words, else one. */
        startRows: field ? Math.max(offered.length, field === "fastener" ? (lastStuds.get(s.specKey) ?? studsInWords(s)) : 1, 1) : 1,
      };
    }),
    /** Keyed by spec and place (`placeKey`). */
    values: Object.fromEntries(
      [...latest].map(([k, e]) => [
        k,
        { value: e.valueEntered, unit: e.unitEntered, decimals: e.valueDecimals, by: e.by, typedAt: e.typedAt.toISOString() },
      ]),
    ),
    entryCount: entries.length,
    photos,
    progress: progressOf(places),
  };
}

/** "Head stud final torque (10 studs)" → 10: a spec that says how many studs it covers. */
function studsInWords(s: { label: string; note: string }): number {
  const m = /\b(\d{1,3})\s*(?:studs|bolts|fasteners)\b/i.exec(`${s.label} ${s.note}`);
  return m ? Math.min(Number(m[1]), 200) : 1;
}

/** The highest stud given a value per spec in the last finished run of the procedure (another engine of the same head, likely). */
async function studsOfLastRun(procedureId: string, notRun: string): Promise<Map<string, number>> {
  const [last] = await db()
    .select({ id: runs.id })
    .from(runs)
    .where(and(eq(runs.procedureId, procedureId), eq(runs.status, "finished"), ne(runs.id, notRun)))
    .orderBy(desc(runs.endedAt))
    .limit(1);
  if (!last) return new Map();
  const rows = await db()
    .select({ specKey: runEntries.specKey, top: max(runEntries.fastener) })
    .from(runEntries)
    .where(and(eq(runEntries.runId, last.id), sql`${runEntries.fastener} is not null`, sql`${runEntries.valueEntered} is not null`))
    .groupBy(runEntries.specKey);
  return new Map(rows.flatMap((r) => (r.top == null ? [] : [[r.specKey, r.top] as [string, number]])));
}

export type RunView = NonNullable<Awaited<ReturnType<typeof getRun>>>;

/** Whether the run exists, for an action that must answer 404 before reading its form. */
export async function runExists(id: string): Promise<boolean> {
  if (!isId(id)) return false;
  const [r] = await db().select({ id: runs.id }).from(runs).where(eq(runs.id, id));
  return Boolean(r);
}

// ---- entries ----------------------------------------------------------------------------------

async function openRunForUpdate(tx: DbOrTx, runId: string) {
  const [run] = await tx.select().from(runs).where(eq(runs.id, runId)).for("update");
  if (!run) throw new DomainError("There is no such run.", { status: 404 });
  return run;
}

function closedReason(run: typeof runs.$inferSelect): string {
  return run.status === "finished"
    ? "This run is finished and its test record filed; an entry can no longer be added. Amend the test record instead."
    : "This run was abandoned; start a new run to measure again.";
}

/**
 * Stores entries, each exactly once: an entry whose key was stored before is answered as it was
 * (`duplicate`), whatever the number of retries. A key already used for a different entry is a
 * conflict, never a silent overwrite. The batch is one transaction: all or nothing.
 */
export async function saveEntries(actor: Actor, runId: string, entries: EntryInput[], device = "") {
  return db().transaction(async (tx) => {
    const run = await openRunForUpdate(tx, runId);
    const [specs, [counts]] = await Promise.all([
      specsOf(tx, run.revisionId),
      tx.select({ cylinders: builds.cylinders, mainJournals: builds.mainJournals }).from(builds).where(eq(builds.id, run.buildId)),
    ]);
    const byKey = new Map(specs.map((s) => [s.specKey, s]));
    const keys = entries.map((e) => e.key);
    if (new Set(keys).size !== keys.length)
      throw new DomainError("Two entries in one request have the same key.", { status: 422, field: "entries" });
    const earlier = await tx.select().from(runEntries).where(inArray(runEntries.idempotencyKey, keys));
    const known = new Map(earlier.map((e) => [e.idempotencyKey, e]));
    const saved: { key: string; id: string; duplicate: boolean }[] = [];
    const fresh: (typeof runEntries.$inferInsert)[] = [];
    for (const [i, e] of entries.entries()) {
      const before = known.get(e.key);
      if (before) {
        if (
          before.runId !== runId ||
          placeKey(before.specKey, before) !== placeKey(e.specKey, e.position) ||
          before.valueEntered !== e.value ||
          before.unitEntered !== e.unit
        )
          throw new DomainError("That entry key was already used for a different entry; the device must make a new key per entry.", {
            status: 409,
            field: `entries.${i}.key`,
          });
        saved.push({ key: e.key, id: before.id, duplicate: true });
        continue;
      }
      if (run.status !== "open") throw new DomainError(closedReason(run), { status: 409, field: "entries" });
      const spec = byKey.get(e.specKey);
      if (!spec)
        throw new DomainError(`The revision this run follows has no spec “${e.specKey}”.`, {
          status: 422,
          field: `entries.${i}.specKey`,
        });
      const place = entryPlace(spec, e.position, counts, `entries.${i}.position`);
      if (e.value != null) {
        try {
          evaluateRecord([limitsOf(spec)], { [spec.id]: [{ value: e.value, unit: e.unit }] });
        } catch (err) {
          throw new DomainError(err instanceof Error ? err.message : "That value cannot be checked.", {
            status: 422,
            field: `entries.${i}.unit`,
          });
        }
      }
      fresh.push({
        runId,
        specId: spec.id,
        specKey: spec.specKey,
        ...place,
        valueEntered: e.value,
        unitEntered: e.unit,
        valueDecimals: e.value == null ? null : e.decimals,
        valueSi: e.value == null ? null : toSI(e.value, e.unit as UnitCode),
        idempotencyKey: e.key,
        enteredBy: actor.id,
        typedAt: new Date(e.typedAt),
        device: (e.device || device).slice(0, 80),
      });
    }
    if (fresh.length) {
      // A concurrent retry of the same key (two tabs, a retried request still in flight) is held
      // back by the run's row lock above, so a plain insert is safe here.
      const rows = await tx.insert(runEntries).values(fresh).returning({ id: runEntries.id, key: runEntries.idempotencyKey });
      for (const r of rows) saved.push({ key: r.key, id: r.id, duplicate: false });
      await tx.update(runs).set({ updatedAt: new Date() }).where(eq(runs.id, runId));
    }
    return { saved };
  });
}

/**
 * The place columns of an entry, checked against its spec and the engine: a per-cylinder spec
 * needs its cylinder (within the build's count when it has one), a spec measured once takes
 * none, and a place the spec is not measured at (a journal on a torque) is refused. A depth and
 * an angle (a Bore distortion grid's reading) are taken only by a spec read at them: a bore.
 */
function entryPlace(spec: { label: string; quantity: string }, position: Place | undefined, counts: EngineCounts, field: string): Position {
  const want = runPlaceField(spec);
  const got = placeOf(position);
  // The API answers with the field's path as well as the reason, as for a schema refusal.
  const refuse = (message: string) => new DomainError(message, { status: 422, field, issues: [{ path: field, message }] });
  if (got && got.field !== want)
    throw refuse(
      want
        ? `${spec.label} is measured per ${placeWord(want)}, not per ${placeWord(got.field)}.`
        : `${spec.label} is measured once; it has no ${placeWord(got.field)}.`,
    );
  if (want && !got) throw refuse(`Say which ${placeWord(want)} this ${spec.label.toLowerCase()} was measured at.`);
  if (got) {
    const count = got.field === "cylinder" ? counts.cylinders : got.field === "journal" ? counts.mainJournals : null;
    if (count != null && got.n > count)
      throw refuse(
        `This engine has ${count} ${got.field === "cylinder" ? "cylinders" : "main journals"}; there is no ${placeLabel(got.field, got.n)}.`,
      );
  }
  const grid = gridOf(position);
  if (grid && !positionFieldsForSpec(spec).includes("angle"))
    throw refuse(`${spec.label} is not read at a depth and an angle; only a bore diameter is.`);
  return {
    fastener: got?.field === "fastener" ? got.n : null,
    cylinder: got?.field === "cylinder" ? got.n : null,
    journal: got?.field === "journal" ? got.n : null,
    depthM: grid?.depthM ?? null,
    depthUnit: grid?.depthUnit ?? null,
    angleDeg: grid?.angleDeg ?? null,
  };
}

/**
 * The run, spec and place a photo is for, checked as an entry's are, under the run's lock. A
 * photo whose device key was stored before is answered as it was (`earlier`), even once the run
 * is closed: the device lost the answer and sent it again; a key used for another spec or
 * place is a conflict.
 */
export async function photoTarget(tx: DbOrTx, runId: string, specKey: string, sent: { key?: string | null; position?: Place }) {
  const run = await openRunForUpdate(tx, runId);
  if (sent.key) {
    const [before] = await tx.select().from(runPhotos).where(eq(runPhotos.idempotencyKey, sent.key));
    if (before) {
      if (before.runId !== runId || placeKey(before.specKey, before) !== placeKey(specKey, sent.position))
        throw new DomainError("That photo key was already used for another photo; the device must make a new key per photo.", {
          status: 409,
          field: "key",
        });
      return { earlier: { id: before.id, url: photoUrl(runId, before.id), duplicate: true } } as const;
    }
  }
  if (run.status !== "open") throw new DomainError("This run is closed; photos can no longer be added.", { field: "photo" });
  const [[spec], [counts]] = await Promise.all([
    tx
      .select()
      .from(procedureSpecs)
      .where(and(eq(procedureSpecs.revisionId, run.revisionId), eq(procedureSpecs.specKey, specKey))),
    tx.select({ cylinders: builds.cylinders, mainJournals: builds.mainJournals }).from(builds).where(eq(builds.id, run.buildId)),
  ]);
  if (!spec) throw new DomainError("The revision this run follows has no such spec.", { status: 422, field: "specKey" });
  // A photo belongs to the cylinder, not to one reading of its grid.
  const { fastener, cylinder, journal } = entryPlace(spec, sent.position, counts, "position");
  return { spec, place: { fastener, cylinder, journal }, earlier: null } as const;
}

/** Where the run was left, so another device opens there. */
export async function setCurrentStep(runId: string, step: number) {
  return db().transaction(async (tx) => {
    const run = await openRunForUpdate(tx, runId);
    if (run.status !== "open") throw new DomainError(closedReason(run), { field: "step" });
    const [rev] = await tx
      .select({ doc: procedureRevisions.doc })
      .from(procedureRevisions)
      .where(eq(procedureRevisions.id, run.revisionId));
    const count = runSteps(rev.doc as JSONNode).length;
    const at = Math.max(0, Math.min(step, count - 1));
    await tx.update(runs).set({ currentStep: at, updatedAt: new Date() }).where(eq(runs.id, runId));
    return at;
  });
}

// ---- ending -----------------------------------------------------------------------------------

const todayIso = () => new Date().toISOString().slice(0, 10);

/**
 * Files the run's test record against its pinned revision and closes the run, in one
 * transaction. Specs left without a value make the record Incomplete (the verdict function's
 * rule), never Within spec; a run with nothing measured cannot be filed.
 */
export async function finishRun(actor: Actor, runId: string, input: { notes: string; studs?: Record<string, number> }) {
  return db().transaction(async (tx) => {
    const run = await openRunForUpdate(tx, runId);
    if (run.status !== "open") throw new DomainError(closedReason(run), { field: "form" });
    const [[proc], [build], [rev], specs, entries] = await Promise.all([
      tx.select().from(procedures).where(eq(procedures.id, run.procedureId)),
      tx.select().from(builds).where(eq(builds.id, run.buildId)),
      tx.select({ doc: procedureRevisions.doc }).from(procedureRevisions).where(eq(procedureRevisions.id, run.revisionId)),
      specsOf(tx, run.revisionId),
      entriesOf(tx, runId),
    ]);
    const latest = latestByPlace(entries);
    const specLikes = specs.map((s) => ({ key: s.specKey, quantity: s.quantity, label: s.label }));
    // How many studs each per-stud spec covers is asked, never guessed from the highest typed:
    // a head torqued 1–6 of ten must not file Within spec with four studs never torqued.
    const studs = input.studs ?? {};
    for (const s of specs) {
      if (runPlaceField(s) !== "fastener") continue;
      const field = studsField(s.specKey);
      const count = studs[s.specKey];
      if (count == null)
        throw new DomainError(`How many studs does “${s.label}” cover? Enter the number before finishing.`, { status: 400, field });
      const top = Math.max(0, ...entries.filter((e) => e.specKey === s.specKey && e.valueEntered != null).map((e) => e.fastener ?? 0));
      if (count < top)
        throw new DomainError(`“${s.label}” has a value at stud ${top}: it covers at least ${top} studs.`, { status: 400, field });
    }
    const places = placesBySpec(specLikes, build, latest, gridCellsBySpec(runSteps(rev.doc as JSONNode), specLikes), studs);
    const readings: Record<string, TypedReading[]> = {};
    const missingPlaces: MissingPlace[] = [];
    for (const [i, s] of specs.entries()) {
      const { field, offered, missing: open } = places[i];
      // A spec with nothing at all is the verdict function's "not measured"; a spec measured
      // at some places and not at others keeps those places with the record (Incomplete until
      // an amendment fills them). A missing place names no depth or angle (the table has
      // none): a cylinder whose distortion grid is half filled is kept as that cylinder missing,
      // beside the diameters it has.
      for (const e of latestAtPlaces(latest, s.specKey, field, offered)) {
        if (e?.valueEntered == null) continue;
        readings[s.id] = readings[s.id] ?? [];
        readings[s.id].push({
          value: e.valueEntered,
          decimals: e.valueDecimals ?? 0,
          unit: e.unitEntered,
          note: e.device ? `entered on ${e.device}` : "",
          position: {
            ...NO_POSITION,
            fastener: e.fastener,
            cylinder: e.cylinder,
            journal: e.journal,
            depthM: e.depthM,
            depthUnit: e.depthUnit,
            angleDeg: e.angleDeg,
          },
          sourceReadingId: null,
        });
      }
      // Asked after the readings: every cylinder's grid half filled leaves all of them open
      // though the spec has values, and that record must not read Within spec.
      if (field && open.length && readings[s.id]?.length) for (const n of open) missingPlaces.push({ specId: s.id, [field]: n as number });
    }
    if (!Object.keys(readings).length)
      throw new DomainError("Nothing has been measured yet: enter at least one value before finishing the run.", { status: 400 });
    const filed = await createTestRecord(
      actor,
      {
        title: `${proc.title} — ${build.number}`,
        workOrder: build.number,
        buildId: build.id,
        revisionId: run.revisionId,
        engineSerial: build.engineSerial,
        testedOn: todayIso(),
        notes: input.notes,
        recordingId: null,
        recordingStartS: null,
        recordingEndS: null,
        readings,
      },
      { tx, pinned: true, missingPlaces },
    );
    const now = new Date();
    await tx
      .update(runs)
      .set({ status: "finished", testRecordId: filed.id, endedBy: actor.id, endedAt: now, updatedAt: now })
      .where(eq(runs.id, runId));
    await audit(tx, actor.id, "finish", "run", runId, {
      testRecordId: filed.id,
      verdict: filed.verdict,
      notMeasured: filed.notMeasured,
      placesMissing: filed.placesMissing,
      studCounts: studs,
    });
    return filed;
  });
}

export async function abandonRun(actor: Actor, runId: string, reason: string) {
  return db().transaction(async (tx) => {
    const run = await openRunForUpdate(tx, runId);
    if (run.status !== "open") throw new DomainError(closedReason(run), { field: "reason" });
    const now = new Date();
    await tx
      .update(runs)
      .set({ status: "abandoned", abandonReason: reason, endedBy: actor.id, endedAt: now, updatedAt: now })
      .where(eq(runs.id, runId));
    await audit(tx, actor.id, "abandon", "run", runId, { reason });
  });
}

// ---- lists for the build page and the Shop floor ----------------------------------------------

const runListColumns = {
  id: runs.id,
  status: runs.status,
  buildId: runs.buildId,
  buildNumber: builds.number,
  procedureTitle: procedures.title,
  procedureSlug: procedures.slug,
  revisionNumber: procedureRevisions.number,
  startedByName: users.name,
  startedAt: runs.startedAt,
  updatedAt: runs.updatedAt,
  testRecordId: runs.testRecordId,
  revisionId: runs.revisionId,
  cylinders: builds.cylinders,
  mainJournals: builds.mainJournals,
};

export type RunListItem = {
  id: string;
  status: RunStatus;
  buildId: string;
  buildNumber: string;
  procedureTitle: string;
  procedureSlug: string;
  revisionNumber: number;
  startedByName: string | null;
  startedAt: Date;
  updatedAt: Date;
  testRecordId: string | null;
  total: number;
  measured: number;
};

/** An entry's run, spec and full place (a grid reading's depth and angle too): its latest typing is its value. */
const latestPerPlace = [
  runEntries.runId,
  runEntries.specKey,
  runEntries.fastener,
  runEntries.cylinder,
  runEntries.journal,
  runEntries.depthM,
  runEntries.angleDeg,
];

/**
 * Runs with their progress in places, by the same rule as the run screen (`placesBySpec`): the
 * runs, then the latest entry per spec and place of all of them, then their revisions' specs.
 */
async function runList(where: ReturnType<typeof eq>): Promise<RunListItem[]> {
  const rows = await db()
    .select(runListColumns)
    .from(runs)
    .innerJoin(builds, eq(builds.id, runs.buildId))
    .innerJoin(procedures, eq(procedures.id, runs.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, runs.revisionId))
    .leftJoin(users, eq(users.id, runs.startedBy))
    .where(where)
    .orderBy(sql`${runs.status} <> 'open'`, desc(runs.updatedAt));
  if (!rows.length) return [];
  const [latestRows, specRows] = await Promise.all([
    db()
      .selectDistinctOn(latestPerPlace, {
        runId: runEntries.runId,
        specKey: runEntries.specKey,
        fastener: runEntries.fastener,
        cylinder: runEntries.cylinder,
        journal: runEntries.journal,
        depthM: runEntries.depthM,
        angleDeg: runEntries.angleDeg,
        valueEntered: runEntries.valueEntered,
      })
      .from(runEntries)
      .where(
        inArray(
          runEntries.runId,
          rows.map((r) => r.id),
        ),
      )
      .orderBy(...latestPerPlace, desc(runEntries.typedAt), desc(runEntries.seq)),
    db()
      .select({
        revisionId: procedureSpecs.revisionId,
        key: procedureSpecs.specKey,
        quantity: procedureSpecs.quantity,
        label: procedureSpecs.label,
      })
      .from(procedureSpecs)
      .where(inArray(procedureSpecs.revisionId, [...new Set(rows.map((r) => r.revisionId))])),
  ]);
  return rows.map(({ revisionId, cylinders, mainJournals, ...r }) => {
    const latest = new Map(latestRows.filter((e) => e.runId === r.id).map((e) => [placeKey(e.specKey, e), e]));
    const specs = specRows.filter((sp) => sp.revisionId === revisionId);
    return { ...r, ...progressOf(placesBySpec(specs, { cylinders, mainJournals }, latest)) };
  });
}

/** Every run of a build with its progress (open ones first), for the build page. */
export function listRunsForBuild(buildId: string): Promise<RunListItem[]> {
  if (!isId(buildId)) return Promise.resolve([]);
  return runList(eq(runs.buildId, buildId));
}

/** The runs being worked now, on every build, for the Shop floor. */
export function listOpenRuns(): Promise<RunListItem[]> {
  return runList(eq(runs.status, "open"));
}

// ---- photos -----------------------------------------------------------------------------------

export type RunPhoto = {
  id: string;
  runId: string;
  specKey: string;
  specLabel: string;
  /** The place it shows ("stud 4", "cyl 2"); "" for a spec measured once. */
  where: string;
  /** Its entry's key on the run screen (`placeKey`). */
  placeKey: string;
  url: string;
  mime: string;
  takenByName: string | null;
  createdAt: Date;
};

const photoUrl = (runId: string, id: string) => `/api/runs/${runId}/photos/${id}`;

function photosWhere(where: ReturnType<typeof eq>): Promise<RunPhoto[]> {
  return db()
    .select({ p: runPhotos, label: procedureSpecs.label, by: users.name })
    .from(runPhotos)
    .innerJoin(runs, eq(runs.id, runPhotos.runId))
    .innerJoin(procedureSpecs, eq(procedureSpecs.id, runPhotos.specId))
    .leftJoin(users, eq(users.id, runPhotos.takenBy))
    .where(where)
    .orderBy(
      asc(runs.startedAt),
      asc(procedureSpecs.position),
      asc(runPhotos.fastener),
      asc(runPhotos.cylinder),
      asc(runPhotos.journal),
      asc(runPhotos.createdAt),
    )
    .then((rows) =>
      rows.map(({ p, label, by }) => ({
        id: p.id,
        runId: p.runId,
        specKey: p.specKey,
        specLabel: label,
        where: positionText(p),
        placeKey: placeKey(p.specKey, p),
        url: photoUrl(p.runId, p.id),
        mime: p.mime,
        takenByName: by,
        createdAt: p.createdAt,
      })),
    );
}

/** A run's photos, spec by spec, with the address that serves each (for the run, its record and the build sheet). */
export function listRunPhotos(runId: string): Promise<RunPhoto[]> {
  return isId(runId) ? photosWhere(eq(runPhotos.runId, runId)) : Promise.resolve([]);
}

/** The photos taken during the run that filed this test record ([] for a record filed by hand). */
export function photosForTestRecord(recordId: string): Promise<RunPhoto[]> {
  return isId(recordId) ? photosWhere(eq(runs.testRecordId, recordId)) : Promise.resolve([]);
}

/** Every photo of a build's runs, run by run, for the build page and sheet. */
export function photosForBuild(buildId: string): Promise<RunPhoto[]> {
  return isId(buildId) ? photosWhere(eq(runs.buildId, buildId)) : Promise.resolve([]);
}
