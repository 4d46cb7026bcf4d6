import { and, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import { marks, procedureRevisions, procedures, readings, recordings, searchOutbox, searchSetAside, testRecords } from "~/db/schema";
import { db } from "~/lib/db.server";
import type { Unindexable } from "./documents.server";

type Tx = Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0];
type Key = { kind: string; entityId: string };

/**
 * Records the worker could not index, in the transaction that marks their outbox rows done:
 * a record already set aside gets the new reason and one more attempt.
 */
export async function setAside(tx: Tx, records: Unindexable[]) {
  for (const r of records) {
    await tx
      .insert(searchSetAside)
      .values({ kind: r.kind, entityId: r.entityId, reason: r.reason })
      .onConflictDoUpdate({
        target: [searchSetAside.kind, searchSetAside.entityId],
        set: { reason: r.reason, attempts: sql`${searchSetAside.attempts} + 1`, lastAt: sql`now()` },
      });
  }
}

/** Ends the set-aside of records that were just indexed (or removed) after all. */
export async function clearSetAside(tx: Tx, records: Key[]) {
  const byKind = new Map<string, string[]>();
  for (const r of records) byKind.set(r.kind, [...(byKind.get(r.kind) ?? []), r.entityId]);
  for (const [kind, ids] of byKind) {
    for (let i = 0; i < ids.length; i += 1000) {
      await tx.delete(searchSetAside).where(and(eq(searchSetAside.kind, kind), inArray(searchSetAside.entityId, ids.slice(i, i + 1000))));
    }
  }
}

export async function setAsideCount(): Promise<number> {
  const [r] = await db().select({ n: sql<number>`count(*)::int` }).from(searchSetAside);
  return r?.n ?? 0;
}

export type SetAsideEntry = Key & {
  reason: string;
  attempts: number;
  firstAt: Date;
  lastAt: Date;
  label: string;
  url: string | null;
  retryQueued: boolean;
};

const KIND_LABELS: Record<string, string> = {
  revision: "Procedure revision",
  procedure: "Procedure",
  recording: "Recording",
  mark: "Mark",
  reading: "Reading",
  test_record: "Test record",
  person: "Person (renamed)",
};

/** What an admin sees of one record: its kind, a name and where it lives (when it still exists). */
async function describe(kind: string, id: string): Promise<{ label: string; url: string | null }> {
  const uuid = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(id);
  const kindLabel = KIND_LABELS[kind] ?? kind;
  if (uuid) {
    if (kind === "revision") {
      const [r] = await db()
        .select({ title: procedureRevisions.title, number: procedureRevisions.number, slug: procedures.slug })
        .from(procedureRevisions)
        .innerJoin(procedures, eq(procedures.id, procedureRevisions.procedureId))
        .where(eq(procedureRevisions.id, id));
      if (r) return { label: `${kindLabel}: ${r.title} (revision ${r.number})`, url: `/procedures/${r.slug}/r/${r.number}` };
    } else if (kind === "recording") {
      const [r] = await db().select({ title: recordings.title }).from(recordings).where(eq(recordings.id, id));
      if (r) return { label: `${kindLabel}: ${r.title}`, url: `/recordings/${id}` };
    } else if (kind === "mark") {
      const [r] = await db()
        .select({ text: marks.text, recordingId: marks.recordingId, t: marks.tStart })
        .from(marks)
        .where(eq(marks.id, id));
      if (r) return { label: `${kindLabel}: ${r.text.slice(0, 80)}`, url: `/recordings/${r.recordingId}?t=${r.t}` };
    } else if (kind === "reading") {
      const [r] = await db()
        .select({ label: readings.label, quantity: readings.quantity, recordingId: readings.recordingId })
        .from(readings)
        .where(eq(readings.id, id));
      if (r) return { label: `${kindLabel}: ${r.label || r.quantity}`, url: `/recordings/${r.recordingId}` };
    } else if (kind === "test_record") {
      const [r] = await db()
        .select({ title: testRecords.title, workOrder: testRecords.workOrder })
        .from(testRecords)
        .where(eq(testRecords.id, id));
      if (r) return { label: `${kindLabel}: ${r.workOrder} ${r.title}`, url: `/test-records/${id}` };
    }
  }
  return { label: `${kindLabel} ${id}`, url: null };
}

/** The records set aside, newest failure first, for the admin page. */
export async function listSetAside(limit = 200): Promise<SetAsideEntry[]> {
  const rows = await db().select().from(searchSetAside).orderBy(desc(searchSetAside.lastAt)).limit(limit);
  // Those already queued again (a change, or "try again", not yet drained).
  const queued = await db()
    .selectDistinct({ kind: searchOutbox.kind, entityId: searchOutbox.entityId })
    .from(searchOutbox)
    .innerJoin(searchSetAside, and(eq(searchSetAside.kind, searchOutbox.kind), eq(searchSetAside.entityId, searchOutbox.entityId)))
    .where(isNull(searchOutbox.doneAt));
  const waiting = new Set(queued.map((q) => `${q.kind}:${q.entityId}`));
  const out: SetAsideEntry[] = [];
  for (const r of rows) {
    out.push({ ...r, ...(await describe(r.kind, r.entityId)), retryQueued: waiting.has(`${r.kind}:${r.entityId}`) });
  }
  return out;
}

/**
 * An admin's "try again": queues the record in the outbox as a change would. The worker
 * indexes it (ending its set-aside) or sets it aside again with the new reason. Resolves
 * to how many records were queued (0 when the named one is not set aside).
 */
export async function retrySetAside(which: Key | "all"): Promise<number> {
  return db().transaction(async (tx) => {
    const rows = await tx
      .select({ kind: searchSetAside.kind, entityId: searchSetAside.entityId })
      .from(searchSetAside)
      .where(which === "all" ? undefined : and(eq(searchSetAside.kind, which.kind), eq(searchSetAside.entityId, which.entityId)));
    if (rows.length) await tx.insert(searchOutbox).values(rows.map((r) => ({ kind: r.kind, entityId: r.entityId })));
    return rows.length;
  });
}
