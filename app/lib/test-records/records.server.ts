/**
 * The test record workflow: file a record pinned to the revision published at that moment,
 * amend it (a new version of the readings; the earlier ones stay; audit log), run a calculator
 * on its readings, and the queries behind the list, the procedure page and the Shop floor.
 */
import { and, asc, desc, eq, gte, ilike, inArray, lte, sql, type SQL } from "drizzle-orm";
import {
  procedureRevisions,
  procedures,
  procedureSpecs,
  readings as recordingReadings,
  recordings,
  testRecordAmendments,
  testRecordCalcs,
  testRecordMissingPlaces,
  testRecordReadings,
  testRecords,
  users,
  type AmendmentChange,
} from "~/db/schema";
import { data } from "react-router";
import { audit } from "~/lib/audit.server";
import { DomainError } from "~/lib/domain-error";
import { db, type DbOrTx } from "~/lib/db.server";
import { toSI, type UnitCode } from "~/lib/calc";
import { positionText, type Position } from "~/lib/recordings/positions";
import type { TypedReading } from "./form";
import { diffAmendment, readingsAtVersion, type HeaderFields } from "./history";
import {
  evaluateRecord,
  missingPlaceLabel,
  openPlaces,
  readingVerdict,
  type MissingPlace,
  type ReadingInput,
  type RecordVerdict,
} from "./verdict";
import { missingSentences, RECORD_VERDICT_LABELS, RECORD_VERDICTS } from "./labels";

type Actor = { id: string; name?: string };
export type SpecRow = typeof procedureSpecs.$inferSelect;

export { limitsOf } from "./limits";
import { limitsOf } from "./limits";

async function specsOfRevision(tx: DbOrTx, revisionId: string): Promise<SpecRow[]> {
  return tx.select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, revisionId)).orderBy(asc(procedureSpecs.position));
}

/** The places left empty in one version of a record's readings. */
async function missingPlacesAt(tx: DbOrTx, recordId: string, version: number) {
  return tx
    .select()
    .from(testRecordMissingPlaces)
    .where(and(eq(testRecordMissingPlaces.recordId, recordId), eq(testRecordMissingPlaces.version, version)));
}

/** Keeps a version's empty places (only those of the revision's specs, each once). */
async function insertMissingPlaces(tx: DbOrTx, recordId: string, version: number, specs: SpecRow[], places: MissingPlace[]) {
  const keyOf = new Map(specs.map((s) => [s.id, s.specKey]));
  const rows = places
    .filter((p) => keyOf.has(p.specId))
    .map((p) => ({
      recordId,
      version,
      specId: p.specId,
      specKey: keyOf.get(p.specId)!,
      fastener: p.fastener ?? null,
      cylinder: p.cylinder ?? null,
      journal: p.journal ?? null,
    }));
  if (rows.length) await tx.insert(testRecordMissingPlaces).values(rows).onConflictDoNothing();
}

// ---- filing -----------------------------------------------------------------------------------

/** What the new-record form needs: the procedure, its revision in force now, and its specs. */
export async function procedureForFiling(slugOrId: string) {
  const isId = /^[0-9a-f-]{36}$/.test(slugOrId);
  const [p] = await db()
    .select()
    .from(procedures)
    .where(isId ? eq(procedures.id, slugOrId) : eq(procedures.slug, slugOrId));
  if (!p?.publishedRevisionId) return null;
  const [rev] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, p.publishedRevisionId));
  if (!rev) return null;
  const specs = await specsOfRevision(db(), rev.id);
  return { procedure: p, revision: rev, specs };
}

/** The limits of a revision's specs, to check a posted form's readings against ([] for no such revision). */
export async function revisionSpecLimits(revisionId: string) {
  if (!/^[0-9a-f-]{36}$/.test(revisionId)) return [];
  return (await specsOfRevision(db(), revisionId)).map(limitsOf);
}

export async function publishedProcedureOptions() {
  return db()
    .select({ id: procedures.id, slug: procedures.slug, title: procedures.title })
    .from(procedures)
    .where(sql`${procedures.publishedRevisionId} is not null`)
    .orderBy(asc(procedures.title));
}

export async function recordingForFiling(id: string) {
  if (!/^[0-9a-f-]{36}$/.test(id)) return null;
  const [r] = await db()
    .select({ id: recordings.id, title: recordings.title, durationS: recordings.durationS })
    .from(recordings)
    .where(eq(recordings.id, id));
  if (!r) return null;
  const rs = await db()
    .select({
      id: recordingReadings.id,
      quantity: recordingReadings.quantity,
      label: recordingReadings.label,
      valueEntered: recordingReadings.valueEntered,
      valueDecimals: recordingReadings.valueDecimals,
      unitEntered: recordingReadings.unitEntered,
      t: recordingReadings.t,
      fastener: recordingReadings.fastener,
      cylinder: recordingReadings.cylinder,
      journal: recordingReadings.journal,
      depthM: recordingReadings.depthM,
      depthUnit: recordingReadings.depthUnit,
      angleDeg: recordingReadings.angleDeg,
    })
    .from(recordingReadings)
    .where(eq(recordingReadings.recordingId, id))
    .orderBy(asc(recordingReadings.t));
  return { ...r, readings: rs };
}

export type NewRecordInput = HeaderFields & {
  workOrder: string;
  /** The build it is filed for (a run's build); work_order keeps its number as text. */
  buildId?: string | null;
  revisionId: string;
  recordingId: string | null;
  readings: Record<string, TypedReading[]>;
};

/** A reading's place and note as one text: "cyl 2, 20 mm down, 90°, plate on". */
function whereText(p: Partial<Position>, note: string): string {
  return [positionText(p, ", "), note].filter(Boolean).join(", ");
}

function rowsFor(recordId: string, version: number, specs: SpecRow[], typed: Record<string, TypedReading[]>) {
  const rows: (typeof testRecordReadings.$inferInsert)[] = [];
  for (const s of specs) {
    (typed[s.id] ?? []).forEach((r, i) => {
      const v = readingVerdict(limitsOf(s), r);
      rows.push({
        recordId,
        version,
        specId: s.id,
        specKey: s.specKey,
        position: i,
        valueEntered: r.value,
        unitEntered: r.unit,
        valueDecimals: r.decimals,
        valueSi: toSI(r.value, r.unit as UnitCode),
        valueInSpecUnit: v.valueInSpecUnit,
        verdict: v.verdict,
        note: r.note,
        ...r.position,
        sourceReadingId: r.sourceReadingId,
      });
    });
  }
  return rows;
}

/**
 * A reading pulled in from a recording must still exist: the id comes from the form, and an
 * unknown one would otherwise fail the insert on its foreign key (a 500, not a reason).
 */
async function assertSourceReadings(tx: DbOrTx, typed: Record<string, TypedReading[]>) {
  const ids = [
    ...new Set(
      Object.values(typed)
        .flat()
        .map((r) => r.sourceReadingId)
        .filter((id): id is string => id != null),
    ),
  ];
  if (!ids.length) return;
  const found = await tx.select({ id: recordingReadings.id }).from(recordingReadings).where(inArray(recordingReadings.id, ids));
  if (found.length < ids.length)
    throw new DomainError("That recording reading does not exist (any more): pull the reading in again from the recording.", {
      status: 400,
      field: "readings",
    });
}

/**
 * Files a record. The revision is the one published when the transaction runs; if another
 * revision was published since the form was opened, the inspector is told and nothing is lost.
 */
export async function createTestRecord(
  actor: Actor,
  input: NewRecordInput,
  // A run files inside its own transaction (the run closes with the filing), against the
  // revision it was pinned to when it started, which may have been superseded since.
  // missingPlaces: cylinders, journals or studs the run offered and left without a value (their
  // specs have readings elsewhere): kept with the record, which is then Incomplete, never Within spec.
  opts: { tx?: DbOrTx; pinned?: boolean; missingPlaces?: MissingPlace[] } = {},
): Promise<{ id: string; verdict: RecordVerdict; notMeasured: number; placesMissing: number }> {
  return (opts.tx ?? db()).transaction(async (tx) => {
    const [rev] = await tx.select().from(procedureRevisions).where(eq(procedureRevisions.id, input.revisionId));
    if (!rev) throw new DomainError("That procedure revision does not exist.", { status: 400, field: "revisionId" });
    const [proc] = await tx.select().from(procedures).where(eq(procedures.id, rev.procedureId)).for("share");
    const pinnedOk = opts.pinned && proc && (rev.state === "published" || rev.state === "superseded");
    if (!proc || (proc.publishedRevisionId !== rev.id && !pinnedOk)) {
      const [now] = proc?.publishedRevisionId
        ? await tx
            .select({ number: procedureRevisions.number })
            .from(procedureRevisions)
            .where(eq(procedureRevisions.id, proc.publishedRevisionId))
        : [];
      throw new DomainError(
        now
          ? `Revision ${now.number} of this procedure was published while the form was open; reload the form to check the readings against its specs.`
          : "This procedure has no published revision to file against.",
        { status: 409, field: "revisionId" },
      );
    }
    const specs = await specsOfRevision(tx, rev.id);
    const evaluation = evaluateRecord(specs.map(limitsOf), input.readings, opts.missingPlaces);
    if (!evaluation.verdict) throw new DomainError("Type at least one reading.", { status: 400, field: "readings" });
    if (input.recordingId) {
      const [r] = await tx.select({ id: recordings.id }).from(recordings).where(eq(recordings.id, input.recordingId));
      if (!r) throw new DomainError("That recording does not exist.", { status: 400, field: "recordingId" });
    }
    const [rec] = await tx
      .insert(testRecords)
      .values({
        procedureId: proc.id,
        revisionId: rev.id,
        title: input.title,
        workOrder: input.workOrder,
        buildId: input.buildId ?? null,
        engineSerial: input.engineSerial,
        testedOn: input.testedOn,
        recordingId: input.recordingId,
        recordingStartS: input.recordingId ? input.recordingStartS : null,
        recordingEndS: input.recordingId ? input.recordingEndS : null,
        notes: input.notes,
        verdict: evaluation.verdict,
        createdBy: actor.id,
      })
      .returning({ id: testRecords.id });
    await assertSourceReadings(tx, input.readings);
    await tx.insert(testRecordReadings).values(rowsFor(rec.id, 0, specs, input.readings));
    await insertMissingPlaces(tx, rec.id, 0, specs, openPlaces(opts.missingPlaces ?? [], input.readings));
    await audit(tx, actor.id, "create", "test_record", rec.id, {
      workOrder: input.workOrder,
      revisionId: rev.id,
      revision: rev.number,
      verdict: evaluation.verdict,
      readings: Object.values(input.readings).flat().length,
      placesMissing: evaluation.missingPlaces.map((p) => `${p.specId}@${p.field}${p.n}`),
    });
    return {
      id: rec.id,
      verdict: evaluation.verdict,
      notMeasured: evaluation.counts.notMeasured,
      placesMissing: evaluation.counts.missingPlaces,
    };
  });
}

// ---- amending ---------------------------------------------------------------------------------

export type AmendInput = HeaderFields & { reason: string; readings: Record<string, TypedReading[]> };

export async function amendTestRecord(
  actor: Actor,
  recordId: string,
  input: AmendInput,
): Promise<{ version: number; verdict: RecordVerdict; notMeasured: number; placesMissing: number; changes: AmendmentChange[] }> {
  return db().transaction(async (tx) => {
    const [rec] = await tx.select().from(testRecords).where(eq(testRecords.id, recordId)).for("update");
    if (!rec) throw new DomainError("No such test record.", { status: 404 });
    const specs = await specsOfRevision(tx, rec.revisionId);
    const current = await tx
      .select()
      .from(testRecordReadings)
      .where(and(eq(testRecordReadings.recordId, rec.id), eq(testRecordReadings.version, rec.currentVersion)))
      .orderBy(asc(testRecordReadings.position));
    // The places the version in force left empty stay so unless this amendment fills them.
    const stillOpen = openPlaces(await missingPlacesAt(tx, rec.id, rec.currentVersion), input.readings);
    const evaluation = evaluateRecord(specs.map(limitsOf), input.readings, stillOpen);
    if (!evaluation.verdict)
      throw new DomainError("An amended record still needs at least one reading.", { status: 400, field: "readings" });
    const order = new Map(specs.map((s, i) => [s.id, i]));
    const sortReadings = <T extends { specId: string }>(rs: T[]) =>
      [...rs].sort((a, b) => (order.get(a.specId) ?? 0) - (order.get(b.specId) ?? 0));
    const changes = diffAmendment(
      {
        header: {
          title: rec.title,
          engineSerial: rec.engineSerial,
          testedOn: rec.testedOn,
          notes: rec.notes,
          recordingStartS: rec.recordingStartS,
          recordingEndS: rec.recordingEndS,
        },
        readings: sortReadings(current).map((r) => ({
          specId: r.specId,
          value: r.valueEntered,
          decimals: r.valueDecimals,
          unit: r.unitEntered,
          note: whereText(r, r.note),
        })),
      },
      {
        header: {
          title: input.title,
          engineSerial: input.engineSerial,
          testedOn: input.testedOn,
          notes: input.notes,
          recordingStartS: rec.recordingId ? input.recordingStartS : null,
          recordingEndS: rec.recordingId ? input.recordingEndS : null,
        },
        readings: specs.flatMap((s) =>
          (input.readings[s.id] ?? []).map((r) => ({
            specId: s.id,
            value: r.value,
            decimals: r.decimals,
            unit: r.unit,
            note: whereText(r.position, r.note),
          })),
        ),
      },
      new Map(specs.map((s) => [s.id, s.label])),
    );
    if (!changes.length)
      throw new DomainError("Nothing was changed: the amendment would be the same as the record.", { status: 400, field: "form" });
    const version = rec.currentVersion + 1;
    const readingsChanged = changes.some((c) => c.kind === "spec");
    if (readingsChanged) {
      await assertSourceReadings(tx, input.readings);
      await tx.insert(testRecordReadings).values(rowsFor(rec.id, version, specs, input.readings));
    } else {
      // Same readings: carry the set over unchanged so each version is complete on its own.
      await tx.insert(testRecordReadings).values(
        current.map((r) => ({
          recordId: r.recordId,
          version,
          specId: r.specId,
          specKey: r.specKey,
          position: r.position,
          valueEntered: r.valueEntered,
          unitEntered: r.unitEntered,
          valueDecimals: r.valueDecimals,
          valueSi: r.valueSi,
          valueInSpecUnit: r.valueInSpecUnit,
          verdict: r.verdict,
          note: r.note,
          fastener: r.fastener,
          cylinder: r.cylinder,
          journal: r.journal,
          depthM: r.depthM,
          depthUnit: r.depthUnit,
          angleDeg: r.angleDeg,
          sourceReadingId: r.sourceReadingId,
        })),
      );
    }
    await insertMissingPlaces(tx, rec.id, version, specs, stillOpen);
    await tx.insert(testRecordAmendments).values({
      recordId: rec.id,
      version,
      reason: input.reason,
      changes,
      verdictBefore: rec.verdict,
      verdictAfter: evaluation.verdict,
      createdBy: actor.id,
    });
    await tx
      .update(testRecords)
      .set({
        title: input.title,
        engineSerial: input.engineSerial,
        testedOn: input.testedOn,
        notes: input.notes,
        recordingStartS: rec.recordingId ? input.recordingStartS : null,
        recordingEndS: rec.recordingId ? input.recordingEndS : null,
        verdict: evaluation.verdict,
        currentVersion: version,
        amendedAt: new Date(),
      })
      .where(eq(testRecords.id, rec.id));
    await audit(tx, actor.id, "amend", "test_record", rec.id, {
      version,
      reason: input.reason,
      changes,
      verdictBefore: rec.verdict,
      verdictAfter: evaluation.verdict,
    });
    return {
      version,
      verdict: evaluation.verdict,
      notMeasured: evaluation.counts.notMeasured,
      placesMissing: evaluation.counts.missingPlaces,
      changes,
    };
  });
}

// ---- calculators ------------------------------------------------------------------------------

export async function saveCalcRun(
  actor: Actor,
  recordId: string,
  run: { version: number; kind: "distortion" | "piston-to-wall"; label: string; input: unknown; result: unknown },
) {
  return db().transaction(async (tx) => {
    const [c] = await tx
      .insert(testRecordCalcs)
      .values({
        recordId,
        version: run.version,
        kind: run.kind,
        label: run.label,
        input: run.input as object,
        result: run.result as object,
        createdBy: actor.id,
      })
      .returning({ id: testRecordCalcs.id });
    await audit(tx, actor.id, "calculate", "test_record", recordId, { kind: run.kind, calcId: c.id, version: run.version });
    return c.id;
  });
}

// ---- reading ----------------------------------------------------------------------------------

export async function getTestRecord(id: string, opts: { version?: number } = {}) {
  if (!/^[0-9a-f-]{36}$/.test(id)) return null;
  const [row] = await db()
    .select({
      rec: testRecords,
      procTitle: procedures.title,
      slug: procedures.slug,
      publishedRevisionId: procedures.publishedRevisionId,
      rev: procedureRevisions,
      by: users.name,
    })
    .from(testRecords)
    .innerJoin(procedures, eq(procedures.id, testRecords.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, testRecords.revisionId))
    .leftJoin(users, eq(users.id, testRecords.createdBy))
    .where(eq(testRecords.id, id));
  if (!row) return null;
  const { rec, rev } = row;
  const version = opts.version != null && opts.version >= 0 && opts.version <= rec.currentVersion ? opts.version : rec.currentVersion;
  const [specs, allReadings, amendments, calcs, recording, missingPlaces] = await Promise.all([
    specsOfRevision(db(), rev.id),
    db()
      .select()
      .from(testRecordReadings)
      .where(eq(testRecordReadings.recordId, rec.id))
      .orderBy(asc(testRecordReadings.version), asc(testRecordReadings.position)),
    db()
      .select({ a: testRecordAmendments, by: users.name })
      .from(testRecordAmendments)
      .leftJoin(users, eq(users.id, testRecordAmendments.createdBy))
      .where(eq(testRecordAmendments.recordId, rec.id))
      .orderBy(asc(testRecordAmendments.version)),
    db()
      .select({ c: testRecordCalcs, by: users.name })
      .from(testRecordCalcs)
      .leftJoin(users, eq(users.id, testRecordCalcs.createdBy))
      .where(eq(testRecordCalcs.recordId, rec.id))
      .orderBy(desc(testRecordCalcs.createdAt)),
    rec.recordingId
      ? db().select({ id: recordings.id, title: recordings.title }).from(recordings).where(eq(recordings.id, rec.recordingId))
      : Promise.resolve([]),
    missingPlacesAt(db(), rec.id, version),
  ]);
  const inForce = readingsAtVersion(allReadings, version);
  const typed: Record<string, ReadingInput[]> = {};
  for (const r of inForce) {
    typed[r.specId] ??= [];
    typed[r.specId].push({ value: r.valueEntered, unit: r.unitEntered, position: r });
  }
  const evaluation = evaluateRecord(specs.map(limitsOf), typed, missingPlaces);

  const places = evaluation.missingPlaces.map((p) => ({ ...p, specLabel: specs.find((s) => s.id === p.specId)?.label ?? "" }));

  // A revision superseded since filing: show the limits now in force beside the pinned ones.
  let current: { number: number; specs: SpecRow[] } | null = null;
  if (row.publishedRevisionId && row.publishedRevisionId !== rev.id) {
    const [now] = await db()
      .select({ id: procedureRevisions.id, number: procedureRevisions.number })
      .from(procedureRevisions)
      .where(eq(procedureRevisions.id, row.publishedRevisionId));
    if (now) current = { number: now.number, specs: await specsOfRevision(db(), now.id) };
  }
  return {
    record: rec,
    filedBy: row.by,
    procedure: { id: rec.procedureId, title: row.procTitle, slug: row.slug },
    revision: {
      id: rev.id,
      number: rev.number,
      title: rev.title,
      state: rev.state,
      publishedAt: rev.publishedAt,
      supersededAt: rev.supersededAt,
    },
    current,
    specs,
    version,
    // `note` is how the reading reads on the record, sheet and history: its place, then the
    // inspector's own words ("cyl 2, 20 mm down, 90°, plate on"); `noteText` is those words alone.
    readings: inForce.map((r) => ({ ...r, note: whereText(r, r.note), noteText: r.note })),
    evaluation: {
      verdict: evaluation.verdict,
      specs: evaluation.specs.map((e) => ({ specId: e.spec.id, verdict: e.verdict })),
      notMeasured: evaluation.notMeasured.map((s) => s.id),
      /** Places a run left empty, of specs measured elsewhere: "Cyl 3" of the bore spec. */
      missingPlaces: places,
      /** What is missing in sentences, for the record page, its print view and the build sheet. */
      missing: missingSentences(
        evaluation.notMeasured.map((s) => s.label),
        places,
      ),
    },
    amendments: amendments.map(({ a, by }) => ({ ...a, by })),
    calcs: calcs.map(({ c, by }) => ({ ...c, by })),
    recording: recording[0] ?? null,
  };
}

export type TestRecordView = NonNullable<Awaited<ReturnType<typeof getTestRecord>>>;

/** The record for a page or its action: a 404 page when there is none. */
export async function testRecordOr404(id: string, opts: { version?: number } = {}): Promise<TestRecordView> {
  const view = await getTestRecord(id, opts);
  if (!view) throw data({ message: "No such test record." }, { status: 404 });
  return view;
}

// ---- lists ------------------------------------------------------------------------------------

export type { ListFilters } from "./filters";
import type { ListFilters } from "./filters";

function whereOf(f: ListFilters): SQL | undefined {
  const w: SQL[] = [];
  if (f.procedure) w.push(eq(procedures.slug, f.procedure));
  const verdict = RECORD_VERDICTS.find((v) => v === f.verdict);
  if (verdict) w.push(eq(testRecords.verdict, verdict));
  if (f.workOrder) w.push(ilike(testRecords.workOrder, `%${f.workOrder.replace(/[%_\\]/g, (c) => `\\${c}`)}%`));
  if (f.from) w.push(gte(testRecords.testedOn, f.from));
  if (f.to) w.push(lte(testRecords.testedOn, f.to));
  return w.length ? and(...w) : undefined;
}

const listColumns = {
  id: testRecords.id,
  title: testRecords.title,
  workOrder: testRecords.workOrder,
  engineSerial: testRecords.engineSerial,
  testedOn: testRecords.testedOn,
  verdict: testRecords.verdict,
  /** Specs of the filed revision without a reading in the version in force: what "Incomplete" lacks. */
  notMeasured: sql<number>`(select count(*) from procedure_specs ps where ps.revision_id = ${testRecords.revisionId} and not exists (select 1 from test_record_readings tr where tr.record_id = ${testRecords.id} and tr.version = ${testRecords.currentVersion} and tr.spec_id = ps.id))::int`,
  /** Places a run left empty in the version in force, of specs measured there (a spec with no reading is counted above). */
  placesMissing: sql<number>`(select count(*) from test_record_missing_places mp where mp.record_id = ${testRecords.id} and mp.version = ${testRecords.currentVersion} and exists (select 1 from test_record_readings tr where tr.record_id = mp.record_id and tr.version = mp.version and tr.spec_id = mp.spec_id))::int`,
  currentVersion: testRecords.currentVersion,
  procedureTitle: procedures.title,
  slug: procedures.slug,
  revisionNumber: procedureRevisions.number,
  revisionState: procedureRevisions.state,
  by: users.name,
};

export async function listTestRecords(f: ListFilters, limit = 200) {
  return db()
    .select(listColumns)
    .from(testRecords)
    .innerJoin(procedures, eq(procedures.id, testRecords.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, testRecords.revisionId))
    .leftJoin(users, eq(users.id, testRecords.createdBy))
    .where(whereOf(f))
    .orderBy(desc(testRecords.testedOn), desc(testRecords.createdAt))
    .limit(limit);
}

/** For the procedure page's "Test records" section. */
export async function testRecordsForProcedure(procedureId: string, limit = 25) {
  return db()
    .select(listColumns)
    .from(testRecords)
    .innerJoin(procedures, eq(procedures.id, testRecords.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, testRecords.revisionId))
    .leftJoin(users, eq(users.id, testRecords.createdBy))
    .where(eq(testRecords.procedureId, procedureId))
    .orderBy(desc(testRecords.testedOn), desc(testRecords.createdAt))
    .limit(limit);
}

/** For the Shop floor: out-of-spec records first, then incomplete ones, then the most recent. */
export async function recentTestRecords(limit = 6) {
  return db()
    .select(listColumns)
    .from(testRecords)
    .innerJoin(procedures, eq(procedures.id, testRecords.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, testRecords.revisionId))
    .leftJoin(users, eq(users.id, testRecords.createdBy))
    .where(gte(testRecords.testedOn, sql`(current_date - interval '120 days')::date`))
    .orderBy(
      sql`${testRecords.verdict} = 'out' desc`,
      sql`${testRecords.verdict} = 'incomplete' desc`,
      desc(testRecords.testedOn),
      desc(testRecords.createdAt),
    )
    .limit(limit);
}

/** Rows of these records' versions in force (readings or places left empty). */
function inForce(t: typeof testRecordReadings | typeof testRecordMissingPlaces, ids: string[]) {
  return and(inArray(t.recordId, ids), sql`${t.version} = (select current_version from test_records t where t.id = ${t.recordId})`);
}

// ---- CSV --------------------------------------------------------------------------------------

export const CSV_COLUMNS = [
  "record_id",
  "work_order",
  "engine_serial",
  "tested_on",
  "title",
  "procedure",
  "revision",
  "record_verdict",
  "amendments",
  "spec",
  "spec_unit",
  "spec_min",
  "spec_max",
  "reading",
  "reading_unit",
  "reading_in_spec_unit",
  "reading_verdict",
  "reading_note",
  "filed_by",
] as const;

/**
 * One row per reading in force (records' current versions), plus one per spec not measured and
 * one per place a run left empty (reading empty, "not measured", the place in reading_note).
 */
export async function csvRows(f: ListFilters): Promise<(string | number | null)[][]> {
  const recs = await listTestRecords(f, 5000);
  if (!recs.length) return [];
  const ids = recs.map((r) => r.id);
  const fullRecs = await db()
    .select({ id: testRecords.id, revisionId: testRecords.revisionId, currentVersion: testRecords.currentVersion })
    .from(testRecords)
    .where(inArray(testRecords.id, ids));
  const revOf = new Map(fullRecs.map((r) => [r.id, r]));
  const revIds = [...new Set(fullRecs.map((r) => r.revisionId))];
  const specs = await db()
    .select()
    .from(procedureSpecs)
    .where(inArray(procedureSpecs.revisionId, revIds))
    .orderBy(asc(procedureSpecs.position));
  const rs = await db().select().from(testRecordReadings).where(inForce(testRecordReadings, ids)).orderBy(asc(testRecordReadings.position));
  const empty = await db().select().from(testRecordMissingPlaces).where(inForce(testRecordMissingPlaces, ids));
  const out: (string | number | null)[][] = [];
  for (const r of recs) {
    const meta = revOf.get(r.id)!;
    const base = [
      r.id,
      r.workOrder,
      r.engineSerial,
      r.testedOn,
      r.title,
      r.procedureTitle,
      r.revisionNumber,
      RECORD_VERDICT_LABELS[r.verdict],
      r.currentVersion,
    ];
    for (const s of specs.filter((x) => x.revisionId === meta.revisionId)) {
      const mine = rs.filter((x) => x.recordId === r.id && x.specId === s.id);
      const specCols = [s.label, s.unit, s.min, s.max];
      if (!mine.length) out.push([...base, ...specCols, null, null, null, "not measured", null, r.by ?? ""]);
      for (const x of mine)
        out.push([
          ...base,
          ...specCols,
          x.valueEntered,
          x.unitEntered,
          Number(x.valueInSpecUnit.toPrecision(12)),
          x.verdict,
          x.note,
          r.by ?? "",
        ]);
      if (mine.length)
        for (const p of openPlaces(
          empty.filter((x) => x.recordId === r.id && x.specId === s.id),
          { [s.id]: mine.map((x) => ({ value: x.valueEntered, unit: x.unitEntered, position: x })) },
        ))
          out.push([...base, ...specCols, null, null, null, "not measured", missingPlaceLabel(p), r.by ?? ""]);
    }
  }
  return out;
}
