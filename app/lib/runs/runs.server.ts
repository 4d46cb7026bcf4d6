/**
 * Runs: a published procedure worked step by step on a build. Starting pins the revision in
 * force; entries arrive one by one (or in a batch after an offline stretch), each stored once
 * under its idempotency key; finishing files the test record through the test-records domain,
 * pinned to the run's revision, in the same transaction that closes the run.
 */
import { asc, desc, eq, inArray, sql } from "drizzle-orm";
import { builds, procedureRevisions, procedures, procedureSpecs, runEntries, runPhotos, runs, users } from "~/db/schema";
import { audit } from "~/lib/audit.server";
import { getBuild, getBuildByNumber } from "~/lib/builds/builds.server";
import { toSI, type UnitCode } from "~/lib/calc";
import { db, type DbOrTx } from "~/lib/db.server";
import { DomainError } from "~/lib/domain-error";
import type { JSONNode } from "~/lib/procedures/document";
import { NO_POSITION } from "~/lib/recordings/positions";
import type { TypedReading } from "~/lib/test-records/form";
import { createTestRecord, limitsOf } from "~/lib/test-records/records.server";
import { evaluateRecord } from "~/lib/test-records/verdict";
import { latestBySpec, progressOf, type EntryInput } from "./entries";
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
      build: { id: builds.id, number: builds.number, engine: builds.engine, engineSerial: builds.engineSerial, status: builds.status },
      startedByName: users.name,
    })
    .from(runs)
    .innerJoin(procedures, eq(procedures.id, runs.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, runs.revisionId))
    .innerJoin(builds, eq(builds.id, runs.buildId))
    .leftJoin(users, eq(users.id, runs.startedBy))
    .where(eq(runs.id, id));
  if (!row) return null;
  const [specs, entries, photos, newer] = await Promise.all([
    specsOf(db(), row.revision.id),
    entriesOf(db(), id),
    listRunPhotos(id),
    row.procedure.publishedRevisionId && row.procedure.publishedRevisionId !== row.revision.id
      ? db()
          .select({ number: procedureRevisions.number })
          .from(procedureRevisions)
          .where(eq(procedureRevisions.id, row.procedure.publishedRevisionId))
      : Promise.resolve([]),
  ]);
  const latest = latestBySpec(entries);
  const steps = runSteps(row.revision.doc as JSONNode);
  return {
    run: row.run,
    startedByName: row.startedByName,
    procedure: { id: row.procedure.id, slug: row.procedure.slug, title: row.procedure.title },
    revision: { id: row.revision.id, number: row.revision.number },
    /** A revision published after the run began: announced, never followed. */
    newerRevision: newer[0]?.number ?? null,
    build: row.build,
    steps,
    specs: specs.map((s) => ({ ...limitsOf(s), key: s.specKey, note: s.note })),
    values: Object.fromEntries(
      [...latest].map(([k, e]) => [
        k,
        { value: e.valueEntered, unit: e.unitEntered, decimals: e.valueDecimals, by: e.by, typedAt: e.typedAt.toISOString() },
      ]),
    ),
    entryCount: entries.length,
    photos,
    progress: progressOf(
      specs.map((s) => s.specKey),
      latest,
    ),
  };
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
    const specs = await specsOf(tx, run.revisionId);
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
        if (before.runId !== runId || before.specKey !== e.specKey || before.valueEntered !== e.value || before.unitEntered !== e.unit)
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
export async function finishRun(actor: Actor, runId: string, input: { notes: string }) {
  return db().transaction(async (tx) => {
    const run = await openRunForUpdate(tx, runId);
    if (run.status !== "open") throw new DomainError(closedReason(run), { field: "form" });
    const [[proc], [build], specs, entries] = await Promise.all([
      tx.select().from(procedures).where(eq(procedures.id, run.procedureId)),
      tx.select().from(builds).where(eq(builds.id, run.buildId)),
      specsOf(tx, run.revisionId),
      entriesOf(tx, runId),
    ]);
    const latest = latestBySpec(entries);
    const readings: Record<string, TypedReading[]> = {};
    for (const s of specs) {
      const e = latest.get(s.specKey);
      if (e?.valueEntered == null) continue;
      readings[s.id] = [
        {
          value: e.valueEntered,
          decimals: e.valueDecimals ?? 0,
          unit: e.unitEntered,
          note: e.device ? `entered on ${e.device}` : "",
          position: { ...NO_POSITION },
          sourceReadingId: null,
        },
      ];
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
      { tx, pinned: true },
    );
    const now = new Date();
    await tx
      .update(runs)
      .set({ status: "finished", testRecordId: filed.id, endedBy: actor.id, endedAt: now, updatedAt: now })
      .where(eq(runs.id, runId));
    await audit(tx, actor.id, "finish", "run", runId, { testRecordId: filed.id, verdict: filed.verdict, notMeasured: filed.notMeasured });
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
  total: sql<number>`(select count(*)::int from ${procedureSpecs} s where s.revision_id = ${runs.revisionId})`,
  // A spec counts as measured when its latest entry holds a value (latestBySpec's rule, in SQL).
  measured: sql<number>`(select count(*)::int from (
      select distinct on (e.spec_key) e.value_entered from ${runEntries} e
      where e.run_id = ${runs.id} order by e.spec_key, e.typed_at desc, e.seq desc
    ) l where l.value_entered is not null)`,
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

function runList(where: ReturnType<typeof eq>): Promise<RunListItem[]> {
  return db()
    .select(runListColumns)
    .from(runs)
    .innerJoin(builds, eq(builds.id, runs.buildId))
    .innerJoin(procedures, eq(procedures.id, runs.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, runs.revisionId))
    .leftJoin(users, eq(users.id, runs.startedBy))
    .where(where)
    .orderBy(sql`${runs.status} <> 'open'`, desc(runs.updatedAt));
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
    .orderBy(asc(runs.startedAt), asc(procedureSpecs.position), asc(runPhotos.createdAt))
    .then((rows) =>
      rows.map(({ p, label, by }) => ({
        id: p.id,
        runId: p.runId,
        specKey: p.specKey,
        specLabel: label,
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
