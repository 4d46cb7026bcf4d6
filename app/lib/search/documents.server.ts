import { eq, inArray } from "drizzle-orm";
import {
  builds,
  captionCues,
  marks,
  procedureRevisions,
  procedures,
  procedureSpecs,
  readings,
  recordings,
  testRecords,
  users,
} from "~/db/schema";
import { BUILD_STATUS_LABELS } from "~/lib/builds/status";
import { positionText } from "~/lib/recordings/positions";
import { db } from "~/lib/db.server";
import { blockTexts, type JSONNode } from "~/lib/procedures/document";
import { KIND_WEIGHT, type SearchDoc } from "./client.server";
import { bothSystems, limitsBothSystems } from "./format";
import { RECORD_VERDICT_LABELS } from "~/lib/test-records/labels";

/** A record whose documents could not be built, and why (the worker sets it aside). */
export type Unindexable = { kind: string; entityId: string; reason: string };

/** What to change in the index for one outbox row. */
export type IndexChange = { upserts: SearchDoc[]; deleteIds: string[]; deleteGroups: string[]; unindexable: Unindexable[] };

type WithGroup = SearchDoc & { group: string };

const empty = (): IndexChange => ({ upserts: [], deleteIds: [], deleteGroups: [], unindexable: [] });

// SQLSTATE classes that are not about one record: connection, insufficient resources, operator
// intervention, system error, transaction rollback, and a query the schema does not fit (42: a
// deploy out of step with its migrations fails every record alike).
const PASSING_SQLSTATE = /^(08|53|57|58|40|42)/;

/**
 * Whether an error while building documents is the database's trouble (then the whole batch
 * waits and retries) rather than something about the record (then only that record is set
 * aside). Errors of the pg driver's own connection carry no SQLSTATE.
 */
export function isPassingFailure(err: unknown): boolean {
  const e = err as { code?: unknown; message?: unknown } | null;
  const code = typeof e?.code === "string" ? e.code : "";
  if (PASSING_SQLSTATE.test(code) || /^E[A-Z]+$/.test(code)) return true;
  return (
    typeof e?.message === "string" &&
    /Connection terminated|connection timeout|timeout exceeded when trying to connect|Client has encountered a connection error/i.test(
      e.message,
    )
  );
}

/** The reason shown for a record set aside: the error's message (a validation error's issues, one line each). */
export function failureReason(err: unknown): string {
  const issues = (err as { issues?: unknown } | null)?.issues;
  const message = Array.isArray(issues)
    ? issues
        .map((i: { path?: unknown[]; message?: string }) => `${i.path?.length ? `${i.path.join(".")}: ` : ""}${i.message ?? ""}`)
        .join("; ")
    : err instanceof Error
      ? err.message
      : String(err);
  return message.slice(0, 500) || "unknown error";
}

/**
 * Builds one record's documents. A record whose documents cannot be built (data the builder
 * cannot read, a conversion that overflows…) is reported in `into` instead of failing the
 * whole change, so that one bad reading never holds back a recording's other marks, nor a
 * reindex. The database's passing failures are thrown: the batch is retried as a whole.
 */
function guarded<T>(kind: string, entityId: string, into: Unindexable[], build: () => T): T | undefined {
  try {
    return build();
  } catch (err) {
    if (isPassingFailure(err)) throw err;
    into.push({ kind, entityId, reason: failureReason(err) });
    return undefined;
  }
}

async function guardedAsync<T>(kind: string, entityId: string, into: Unindexable[], build: () => Promise<T>): Promise<T | undefined> {
  try {
    return await build();
  } catch (err) {
    if (isPassingFailure(err)) throw err;
    into.push({ kind, entityId, reason: failureReason(err) });
    return undefined;
  }
}

/** Adds `part` to `change` (upserts, deletions and records set aside). */
function merge(change: IndexChange, part: IndexChange, what: { upserts?: boolean; deletes?: boolean } = { upserts: true, deletes: true }) {
  if (what.upserts) change.upserts.push(...part.upserts);
  if (what.deletes) {
    change.deleteIds.push(...part.deleteIds);
    change.deleteGroups.push(...part.deleteGroups);
  }
  change.unindexable.push(...part.unindexable);
}

/**
 * The records (outbox kind and id) a document was built from: a later successful build of
 * them ends their being set aside. Spec documents belong to their revision's record; a
 * recording's readings document to the recording and to each reading it lists.
 */
export function recordsOf(doc: SearchDoc): { kind: string; entityId: string }[] {
  if (doc.kind === "procedure") return [{ kind: "revision", entityId: doc.id.slice("rev-".length) }];
  if (doc.kind === "spec") return [];
  if (doc.kind === "reading") return (doc.readingIds ?? []).map((entityId) => ({ kind: "reading", entityId }));
  if (doc.kind === "caption") return [{ kind: "captions", entityId: doc.url.slice("/recordings/".length).split("?")[0] }];
  return [{ kind: doc.kind, entityId: doc.id.slice(doc.kind.length + 1) }];
}

export function procedureUrl(slug: string, revisionNumber: number, state: string): string {
  return state === "published" ? `/procedures/${slug}` : `/procedures/${slug}/r/${revisionNumber}`;
}

export function revisionVisibility(state: string, authorId: string | null): string[] | null {
  if (state === "published") return ["all"];
  if (state === "draft" || state === "in_review") return ["role:admin", "role:editor", ...(authorId ? [`user:${authorId}`] : [])];
  return null; // superseded revisions stay in the history, not in search
}

function clock(t: number): string {
  const m = Math.floor(t / 60);
  const s = Math.floor(t % 60);
  return `${m}:${String(s).padStart(2, "0")}`;
}

async function names(ids: (string | null)[]): Promise<Map<string, string>> {
  const wanted = [...new Set(ids.filter((x): x is string => Boolean(x)))];
  if (!wanted.length) return new Map();
  const rows = await db().select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, wanted));
  return new Map(rows.map((r) => [r.id, r.name]));
}

async function revisionDocs(revisionId: string): Promise<IndexChange> {
  const change = empty();
  change.deleteGroups.push(`rev-${revisionId}`);
  const [row] = await db()
    .select({ rev: procedureRevisions, slug: procedures.slug })
    .from(procedureRevisions)
    .innerJoin(procedures, eq(procedures.id, procedureRevisions.procedureId))
    .where(eq(procedureRevisions.id, revisionId));
  if (!row) return change;
  const { rev, slug } = row;
  const visibility = revisionVisibility(rev.state, rev.authorId);
  if (!visibility) return change;
  const author = (await names([rev.authorId])).get(rev.authorId ?? "") ?? "";
  const url = procedureUrl(slug, rev.number, rev.state);
  // One block per line: the service crops around the best matches, and the app points the
  // hit at the line (block) that holds most of them (app/lib/search/query.server.ts).
  const body = blockTexts(rev.doc as JSONNode)
    .map((b) => b.text.replace(/\s*\n\s*/g, " "))
    .join("\n");
  const date = (rev.publishedAt ?? rev.updatedAt).getTime();
  const docs: WithGroup[] = [
    {
      id: `rev-${rev.id}`,
      group: `rev-${rev.id}`,
      kind: "procedure",
      title: rev.title,
      text: rev.summary,
      tags: rev.tags,
      visibility,
      url,
      state: rev.state,
      area: rev.area,
      uploader: author,
      body,
      date,
      kindWeight: KIND_WEIGHT.procedure,
    },
  ];
  const specs = await db().select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, rev.id)).orderBy(procedureSpecs.position);
  for (const s of specs) {
    const limits = limitsBothSystems({ min: s.min, max: s.max, nominal: s.nominal, unit: s.unit });
    docs.push({
      id: `spec-${s.id}`,
      group: `rev-${rev.id}`,
      kind: "spec",
      title: s.label,
      text: `${s.label} ${limits}${s.nominal != null && s.min != null ? ` nominal ${s.nominal}` : ""}${s.note ? ` — ${s.note}` : ""}`,
      // The procedure's tags only filter a spec (procedureTags): searched, they would give every
      // spec of a procedure tagged "head studs, torque, moly" all three words.
      tags: [],
      procedureTags: rev.tags,
      visibility,
      url: `${url}#spec-${s.specKey}`,
      state: rev.state,
      area: rev.area,
      procedureTitle: rev.title,
      date,
      kindWeight: KIND_WEIGHT.spec,
    });
  }
  change.upserts.push(...docs);
  return change;
}

async function procedureDocs(procedureId: string): Promise<IndexChange> {
  const revs = await db()
    .select({ id: procedureRevisions.id })
    .from(procedureRevisions)
    .where(eq(procedureRevisions.procedureId, procedureId));
  const change = empty();
  for (const r of revs) {
    const c = await guardedAsync("revision", r.id, change.unindexable, () => revisionDocs(r.id));
    if (c) merge(change, c);
  }
  return change;
}

async function markDocs(where: { markId?: string; recordingId?: string }, unindexable: Unindexable[]): Promise<SearchDoc[]> {
  const rows = await db()
    .select({ mark: marks, recTitle: recordings.title, recState: recordings.state, buildNumber: builds.number })
    .from(marks)
    .innerJoin(recordings, eq(recordings.id, marks.recordingId))
    .leftJoin(builds, eq(builds.id, marks.buildId))
    .where(where.markId ? eq(marks.id, where.markId) : eq(marks.recordingId, where.recordingId!));
  const who = await names(rows.map((r) => r.mark.createdBy));
  return rows.flatMap(
    ({ mark, recTitle, buildNumber }) =>
      guarded("mark", mark.id, unindexable, (): WithGroup[] => [
        {
          id: `mark-${mark.id}`,
          group: `rec-${mark.recordingId}`,
          kind: "mark" as const,
          title: mark.text.slice(0, 120),
          // The build's number, so typing it finds the build's marks (issue 16).
          text: `${mark.text} — at ${clock(mark.tStart)}${mark.tEnd != null ? `–${clock(mark.tEnd)}` : ""} in ${recTitle}${buildNumber ? ` — build ${buildNumber}` : ""}`,
          tags: mark.tags,
          visibility: ["all"],
          url: `/recordings/${mark.recordingId}?t=${mark.tStart}`,
          recordingTitle: recTitle,
          uploader: who.get(mark.createdBy ?? "") ?? "",
          t: mark.tStart,
          date: mark.createdAt.getTime(),
          kindWeight: KIND_WEIGHT.mark,
        },
      ]) ?? [],
  );
}

/**
 * A recording's readings as one document: one line per reading in `readings` (its id and second
 * beside it, in the same order), so that a search finds the recording once and lists the readings
 * that matched (the service highlights the lines one by one), instead of a hit per reading.
 */
async function readingsDoc(recordingId: string, unindexable: Unindexable[]): Promise<SearchDoc[]> {
  const rows = await db()
    .select({ r: readings, recTitle: recordings.title })
    .from(readings)
    .innerJoin(recordings, eq(recordings.id, readings.recordingId))
    .where(eq(readings.recordingId, recordingId))
    .orderBy(readings.t, readings.createdAt);
  if (!rows.length) return [];
  const who = await names(rows.map((x) => x.r.createdBy));
  const lines = rows.flatMap(
    ({ r }) =>
      guarded("reading", r.id, unindexable, () => {
        const cond = Object.entries(r.conditions ?? {})
          .filter(([, v]) => v)
          .map(([k, v]) => `${k} ${v}`)
          .join(", ");
        const value = bothSystems(r.valueEntered, r.unitEntered, r.valueDecimals);
        return [
          {
            id: r.id,
            t: r.t,
            by: who.get(r.createdBy ?? "") ?? "",
            line: `${[positionText(r, ", "), r.label].filter(Boolean).join(", ") || r.quantity}: ${value} — ${r.quantity}${cond ? ` (${cond})` : ""}`,
          },
        ];
      }) ?? [],
  );
  if (!lines.length) return [];
  const doc: WithGroup = {
    id: `readings-${recordingId}`,
    group: `rec-${recordingId}`,
    kind: "reading",
    title: "Readings",
    text: "",
    tags: [],
    visibility: ["all"],
    url: `/recordings/${recordingId}`,
    recordingTitle: rows[0].recTitle,
    uploader: [...new Set(lines.map((l) => l.by).filter(Boolean))].join(", "),
    date: Math.max(...rows.map((x) => x.r.createdAt.getTime())),
    kindWeight: KIND_WEIGHT.reading,
    readings: lines.map((l) => l.line),
    readingIds: lines.map((l) => l.id),
    readingTimes: lines.map((l) => l.t),
  };
  return [doc];
}

/**
 * What is said in a recording: one document per caption line, its neighbours beside it for the
 * hit (shown, not searched, so a word finds the one line that says it), opening the recording
 * at the line's second. In a group of their own (`cap-<recording>`), rebuilt as a whole when
 * the captions change, or the recording's title or state (the outbox kind "captions", queued
 * by migration 0028's triggers), not on every mark or reading of the recording.
 */
async function captionDocs(recordingId: string): Promise<IndexChange> {
  const change = empty();
  change.deleteGroups.push(`cap-${recordingId}`);
  const [rec] = await db()
    .select({ title: recordings.title, state: recordings.state })
    .from(recordings)
    .where(eq(recordings.id, recordingId));
  if (!rec || rec.state === "rejected") return change;
  const cues = await db()
    .select({ id: captionCues.id, start: captionCues.startS, text: captionCues.text, updatedAt: captionCues.updatedAt })
    .from(captionCues)
    .where(eq(captionCues.recordingId, recordingId))
    .orderBy(captionCues.position);
  const oneLine = (s: string | undefined) => s?.replace(/\s*\n\s*/g, " ");
  cues.forEach((c, i) => {
    change.upserts.push({
      id: `caption-${c.id}`,
      group: `cap-${recordingId}`,
      kind: "caption",
      title: oneLine(c.text) ?? "",
      text: "",
      tags: [],
      // Everyone who may watch the recording may read what is said in it (apprentices too).
      visibility: ["all"],
      url: `/recordings/${recordingId}?t=${c.start}`,
      t: c.start,
      before: oneLine(cues[i - 1]?.text),
      after: oneLine(cues[i + 1]?.text),
      inRecording: rec.title,
      date: c.updatedAt.getTime(),
      kindWeight: KIND_WEIGHT.caption,
    } as WithGroup);
  });
  return change;
}

async function recordingDocs(recordingId: string): Promise<IndexChange> {
  const change = empty();
  change.deleteGroups.push(`rec-${recordingId}`);
  const [row] = await db()
    .select({ rec: recordings, buildNumber: builds.number })
    .from(recordings)
    .leftJoin(builds, eq(builds.id, recordings.buildId))
    .where(eq(recordings.id, recordingId));
  const rec = row?.rec;
  if (!rec || rec.state === "rejected") return change;
  const uploader = (await names([rec.uploadedBy])).get(rec.uploadedBy ?? "") ?? "";
  change.upserts.push({
    id: `recording-${rec.id}`,
    group: `rec-${rec.id}`,
    kind: "recording",
    title: rec.title,
    // The build's number, so typing it finds the build's recordings (issue 16).
    text: [rec.description, row.buildNumber ? `build ${row.buildNumber}` : ""].filter(Boolean).join(" — "),
    tags: rec.tags,
    visibility: ["all"],
    url: `/recordings/${rec.id}`,
    uploader,
    date: rec.createdAt.getTime(),
    kindWeight: KIND_WEIGHT.recording,
  } as WithGroup);
  change.upserts.push(...(await markDocs({ recordingId }, change.unindexable)), ...(await readingsDoc(recordingId, change.unindexable)));
  return change;
}

/** The index change for one outbox row, from the database as it is now. */
export async function buildChange(kind: string, entityId: string): Promise<IndexChange> {
  switch (kind) {
    case "procedure":
      return procedureDocs(entityId);
    case "revision":
      return revisionDocs(entityId);
    case "recording":
      return recordingDocs(entityId);
    case "captions":
      return captionDocs(entityId);
    case "reading": {
      // Queued by an admin's "try again" or before migration 0023 (the trigger now queues the
      // recording): the reading's recording is rebuilt. A reading that is gone leaves only its
      // document of the earlier shape (one per reading) to remove.
      const [row] = await db().select({ recordingId: readings.recordingId }).from(readings).where(eq(readings.id, entityId));
      if (row) return recordingDocs(row.recordingId);
      return { ...empty(), deleteIds: [`reading-${entityId}`] };
    }
    case "mark":
    case "test_record": {
      const unindexable: Unindexable[] = [];
      const docs = kind === "mark" ? await markDocs({ markId: entityId }, unindexable) : await testRecordDocs(unindexable, entityId);
      // Deleted only when the record is gone, not when it could not be built (it stays as it was).
      return { upserts: docs, deleteIds: docs.length || unindexable.length ? [] : [`${kind}-${entityId}`], deleteGroups: [], unindexable };
    }
    case "person":
      return personDocs(entityId);
    case "build": {
      const unindexable: Unindexable[] = [];
      const docs = await buildDocs(unindexable, entityId);
      return { upserts: docs, deleteIds: docs.length || unindexable.length ? [] : [`build-${entityId}`], deleteGroups: [], unindexable };
    }
    default:
      return empty();
  }
}

/**
 * A person was renamed: every document that shows their name (as author, uploader, or the one
 * who marked, read or filed) is rebuilt: their procedures' revisions, the recordings they
 * uploaded or marked or read in (each with its marks and readings), the test records they filed.
 * Only upserts: a rename changes no document's id or visibility, and deleting the groups first
 * would leave a gap in search until the new documents are in.
 */
async function personDocs(userId: string): Promise<IndexChange> {
  const change = empty();
  const add = (c: IndexChange) => merge(change, c, { upserts: true });
  const procs = await db()
    .selectDistinct({ id: procedureRevisions.procedureId })
    .from(procedureRevisions)
    .where(eq(procedureRevisions.authorId, userId));
  for (const p of procs) add(await procedureDocs(p.id));
  const recIds = new Set<string>();
  for (const r of await db().select({ id: recordings.id }).from(recordings).where(eq(recordings.uploadedBy, userId))) recIds.add(r.id);
  for (const r of await db().selectDistinct({ id: marks.recordingId }).from(marks).where(eq(marks.createdBy, userId))) recIds.add(r.id);
  for (const r of await db().selectDistinct({ id: readings.recordingId }).from(readings).where(eq(readings.createdBy, userId)))
    recIds.add(r.id);
  for (const id of recIds) add(await recordingDocs(id));
  const filed = await db().select({ id: testRecords.id }).from(testRecords).where(eq(testRecords.createdBy, userId));
  for (const t of filed) change.upserts.push(...(await testRecordDocs(change.unindexable, t.id)));
  return change;
}

async function testRecordDocs(unindexable: Unindexable[], id?: string): Promise<SearchDoc[]> {
  const rows = await db()
    .select({ r: testRecords, procedureTitle: procedures.title, revision: procedureRevisions.number, by: users.name })
    .from(testRecords)
    .innerJoin(procedures, eq(procedures.id, testRecords.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, testRecords.revisionId))
    .leftJoin(users, eq(users.id, testRecords.createdBy))
    .where(id ? eq(testRecords.id, id) : undefined);
  return rows.flatMap(
    ({ r, procedureTitle, revision, by }) =>
      guarded("test_record", r.id, unindexable, (): SearchDoc[] => {
        const verdict = RECORD_VERDICT_LABELS[r.verdict];
        return [
          {
            id: `test_record-${r.id}`,
            kind: "test_record" as const,
            title: `${r.workOrder}: ${r.title}`,
            text: `${r.workOrder} ${verdict} ${procedureTitle} revision ${revision}${r.engineSerial ? ` engine ${r.engineSerial}` : ""}${r.notes ? ` — ${r.notes}` : ""}`,
            tags: [],
            visibility: ["all"],
            url: `/test-records/${r.id}`,
            procedureTitle,
            uploader: by ?? "",
            date: Date.parse(`${r.testedOn}T12:00:00Z`),
            kindWeight: KIND_WEIGHT.test_record,
          },
        ];
      }) ?? [],
  );
}

/** A build: found by its work order number, customer, engine serial and engine (issue 16). */
async function buildDocs(unindexable: Unindexable[], id?: string): Promise<SearchDoc[]> {
  const rows = await db()
    .select()
    .from(builds)
    .where(id ? eq(builds.id, id) : undefined);
  return rows.flatMap(
    (b) =>
      guarded("build", b.id, unindexable, (): SearchDoc[] => [
        {
          id: `build-${b.id}`,
          kind: "build" as const,
          title: `${b.number}: ${b.customerName}`,
          text: [
            b.number,
            b.customerName,
            b.engine,
            b.engineSerial ? `serial ${b.engineSerial}` : "",
            BUILD_STATUS_LABELS[b.status],
            b.notes,
          ]
            .filter(Boolean)
            .join(" — "),
          tags: [],
          visibility: ["all"],
          url: `/builds/${b.number}`,
          date: b.updatedAt.getTime(),
          kindWeight: KIND_WEIGHT.build,
        },
      ]) ?? [],
  );
}

/** Every document, for a full reindex, and the records whose documents could not be built. */
export async function allDocuments(): Promise<{ docs: SearchDoc[]; unindexable: Unindexable[] }> {
  const all = empty();
  const add = (c: IndexChange) => merge(all, c, { upserts: true });
  for (const p of await db().select({ id: procedures.id }).from(procedures)) add(await procedureDocs(p.id));
  for (const r of await db().select({ id: recordings.id }).from(recordings)) {
    const c = await guardedAsync("recording", r.id, all.unindexable, () => recordingDocs(r.id));
    if (c) add(c);
    const cap = await guardedAsync("captions", r.id, all.unindexable, () => captionDocs(r.id));
    if (cap) add(cap);
  }
  all.upserts.push(...(await testRecordDocs(all.unindexable)));
  all.upserts.push(...(await buildDocs(all.unindexable)));
  return { docs: all.upserts, unindexable: all.unindexable };
}
