import { eq, inArray } from "drizzle-orm";
import { marks, procedureRevisions, procedures, procedureSpecs, readings, recordings, testRecords, users } from "~/db/schema";
import { db } from "~/lib/db.server";
import { blockTexts, type JSONNode } from "~/lib/procedures/document";
import type { SearchDoc } from "./client.server";
import { bothSystems, limitsBothSystems } from "./format";

/** What to change in the index for one outbox row. */
export type IndexChange = { upserts: SearchDoc[]; deleteIds: string[]; deleteGroups: string[] };

type WithGroup = SearchDoc & { group: string };

const empty = (): IndexChange => ({ upserts: [], deleteIds: [], deleteGroups: [] });

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
      tags: rev.tags,
      visibility,
      url: `${url}#spec-${s.specKey}`,
      state: rev.state,
      area: rev.area,
      procedureTitle: rev.title,
      date,
    });
  }
  change.upserts.push(...docs);
  return change;
}

async function procedureDocs(procedureId: string): Promise<IndexChange> {
  const revs = await db().select({ id: procedureRevisions.id }).from(procedureRevisions).where(eq(procedureRevisions.procedureId, procedureId));
  const change = empty();
  for (const r of revs) {
    const c = await revisionDocs(r.id);
    change.upserts.push(...c.upserts);
    change.deleteGroups.push(...c.deleteGroups);
  }
  return change;
}

async function markDocs(where: { markId?: string; recordingId?: string }): Promise<SearchDoc[]> {
  const rows = await db()
    .select({ mark: marks, recTitle: recordings.title, recState: recordings.state })
    .from(marks)
    .innerJoin(recordings, eq(recordings.id, marks.recordingId))
    .where(where.markId ? eq(marks.id, where.markId) : eq(marks.recordingId, where.recordingId!));
  const who = await names(rows.map((r) => r.mark.createdBy));
  return rows.map(({ mark, recTitle }) => ({
    id: `mark-${mark.id}`,
    group: `rec-${mark.recordingId}`,
    kind: "mark" as const,
    title: mark.text.slice(0, 120),
    text: `${mark.text} — at ${clock(mark.tStart)}${mark.tEnd != null ? `–${clock(mark.tEnd)}` : ""} in ${recTitle}`,
    tags: mark.tags,
    visibility: ["all"],
    url: `/recordings/${mark.recordingId}?t=${mark.tStart}`,
    recordingTitle: recTitle,
    uploader: who.get(mark.createdBy ?? "") ?? "",
    t: mark.tStart,
    date: mark.createdAt.getTime(),
  }));
}

async function readingDocs(where: { readingId?: string; recordingId?: string }): Promise<SearchDoc[]> {
  const rows = await db()
    .select({ r: readings, recTitle: recordings.title })
    .from(readings)
    .innerJoin(recordings, eq(recordings.id, readings.recordingId))
    .where(where.readingId ? eq(readings.id, where.readingId) : eq(readings.recordingId, where.recordingId!));
  const who = await names(rows.map((x) => x.r.createdBy));
  return rows.map(({ r, recTitle }) => {
    const cond = Object.entries(r.conditions ?? {})
      .filter(([, v]) => v)
      .map(([k, v]) => `${k} ${v}`)
      .join(", ");
    const value = bothSystems(r.valueEntered, r.unitEntered);
    return {
      id: `reading-${r.id}`,
      group: `rec-${r.recordingId}`,
      kind: "reading" as const,
      title: `${r.label || r.quantity}: ${value}`,
      text: `${r.quantity} ${r.label} ${value}${cond ? ` (${cond})` : ""} in ${recTitle}`,
      tags: [],
      visibility: ["all"],
      url: r.t != null ? `/recordings/${r.recordingId}?t=${r.t}` : `/recordings/${r.recordingId}`,
      recordingTitle: recTitle,
      uploader: who.get(r.createdBy ?? "") ?? "",
      t: r.t ?? undefined,
      date: r.createdAt.getTime(),
    };
  });
}

async function recordingDocs(recordingId: string): Promise<IndexChange> {
  const change = empty();
  change.deleteGroups.push(`rec-${recordingId}`);
  const [rec] = await db().select().from(recordings).where(eq(recordings.id, recordingId));
  if (!rec || rec.state === "rejected") return change;
  const uploader = (await names([rec.uploadedBy])).get(rec.uploadedBy ?? "") ?? "";
  change.upserts.push({
    id: `recording-${rec.id}`,
    group: `rec-${rec.id}`,
    kind: "recording",
    title: rec.title,
    text: rec.description,
    tags: rec.tags,
    visibility: ["all"],
    url: `/recordings/${rec.id}`,
    uploader,
    date: rec.createdAt.getTime(),
  } as WithGroup);
  change.upserts.push(...(await markDocs({ recordingId })), ...(await readingDocs({ recordingId })));
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
    case "mark": {
      const docs = await markDocs({ markId: entityId });
      return { upserts: docs, deleteIds: docs.length ? [] : [`mark-${entityId}`], deleteGroups: [] };
    }
    case "reading": {
      const docs = await readingDocs({ readingId: entityId });
      return { upserts: docs, deleteIds: docs.length ? [] : [`reading-${entityId}`], deleteGroups: [] };
    }
    case "person":
      return personDocs(entityId);
    case "test_record": {
      const docs = await testRecordDocs(entityId);
      return { upserts: docs, deleteIds: docs.length ? [] : [`test_record-${entityId}`], deleteGroups: [] };
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
  const merge = (c: IndexChange) => change.upserts.push(...c.upserts);
  const procs = await db().selectDistinct({ id: procedureRevisions.procedureId }).from(procedureRevisions).where(eq(procedureRevisions.authorId, userId));
  for (const p of procs) merge(await procedureDocs(p.id));
  const recIds = new Set<string>();
  for (const r of await db().select({ id: recordings.id }).from(recordings).where(eq(recordings.uploadedBy, userId))) recIds.add(r.id);
  for (const r of await db().selectDistinct({ id: marks.recordingId }).from(marks).where(eq(marks.createdBy, userId))) recIds.add(r.id);
  for (const r of await db().selectDistinct({ id: readings.recordingId }).from(readings).where(eq(readings.createdBy, userId))) recIds.add(r.id);
  for (const id of recIds) merge(await recordingDocs(id));
  const filed = await db().select({ id: testRecords.id }).from(testRecords).where(eq(testRecords.createdBy, userId));
  for (const t of filed) change.upserts.push(...(await testRecordDocs(t.id)));
  return change;
}

async function testRecordDocs(id?: string): Promise<SearchDoc[]> {
  const rows = await db()
    .select({ r: testRecords, procedureTitle: procedures.title, revision: procedureRevisions.number, by: users.name })
    .from(testRecords)
    .innerJoin(procedures, eq(procedures.id, testRecords.procedureId))
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, testRecords.revisionId))
    .leftJoin(users, eq(users.id, testRecords.createdBy))
    .where(id ? eq(testRecords.id, id) : undefined);
  return rows.map(({ r, procedureTitle, revision, by }) => {
    const verdict = r.verdict === "out" ? "Out of spec" : "Within spec";
    return {
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
    };
  });
}

/** Every document, for a full reindex. */
export async function allDocuments(): Promise<SearchDoc[]> {
  const out: SearchDoc[] = [];
  for (const p of await db().select({ id: procedures.id }).from(procedures)) out.push(...(await procedureDocs(p.id)).upserts);
  for (const r of await db().select({ id: recordings.id }).from(recordings)) out.push(...(await recordingDocs(r.id)).upserts);
  out.push(...(await testRecordDocs()));
  return out;
}
