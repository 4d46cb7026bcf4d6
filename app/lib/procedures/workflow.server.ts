/**
 * Procedures in the database: create, autosave with optimistic concurrency, submit, return,
 * publish, restore; each change in one transaction with its extraction, mail and audit.
 */
import { and, asc, desc, eq, inArray, ne, or, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import {
  procedureConflictCopies,
  procedureLinks,
  procedureMoments,
  procedureRevisions,
  procedures,
  procedureSlugs,
  procedureSpecs,
  procedureWatchers,
  users,
} from "~/db/schema";
import { audit } from "~/lib/audit.server";
import { db, type DbOrTx, type Tx } from "~/lib/db.server";
import { isUuid } from "~/lib/edge";
import { env } from "~/lib/env.server";
import { composeMail, enqueueMail } from "~/lib/mail.server";
import { PERMISSIONS, type Role } from "~/lib/permissions";
import { countWords, EMPTY_DOC, incompleteBlocks, incompleteText, sanitizeDocument, type IncompleteBlock, type Issue, type ProcedureDoc } from "./document";
import { extract } from "./extract";
import { structureProblem } from "./schema-check.server";
import { slugify } from "./slug";
import { decide, type Actor, type RevisionState, type Transition } from "./state";

import { AREA_LABELS, AREAS, type Area } from "./areas";
import { readableBy, type Reader } from "./visibility.server";
export { AREA_LABELS, AREAS, type Area };

export class ProcedureError extends Error {
  constructor(
    message: string,
    readonly status = 409,
    readonly field = "form",
  ) {
    super(message);
  }
}

export class DocumentInvalid extends Error {
  constructor(readonly issues: Issue[]) {
    super(`The document was not saved: ${issues.map((i) => i.message).join("; ")}`);
  }
}

/** Submitting a draft with blocks still incomplete: the list says which and what each lacks. */
export class DocumentIncomplete extends ProcedureError {
  constructor(readonly blocks: IncompleteBlock[]) {
    super(`Not ready for review. Finish ${blocks.length === 1 ? "this block" : `these ${blocks.length} blocks`} first: ${incompleteText(blocks)}.`, 422);
  }
}

export type Procedure = typeof procedures.$inferSelect;
export type Revision = typeof procedureRevisions.$inferSelect;

const url = (p: string) => new URL(p, env().PUBLIC_URL).toString();

// Tags keep their author's spelling and are compared without case (app/lib/tags.ts).
export { normalizeTags } from "../tags";

/** Validates (sanitize + structure); throws DocumentInvalid with the issues. */
export function validateDocument(input: unknown): { doc: ProcedureDoc; warnings: Issue[] } {
  const r = sanitizeDocument(input);
  if (!r.ok) throw new DocumentInvalid(r.errors);
  const problem = structureProblem(r.doc);
  if (problem) throw new DocumentInvalid([{ path: "doc", message: problem }]);
  return { doc: r.doc, warnings: r.warnings };
}

async function slugTaken(tx: DbOrTx, slug: string, exceptProcedureId?: string): Promise<boolean> {
  const [p] = await tx.select({ id: procedures.id }).from(procedures).where(eq(procedures.slug, slug)).limit(1);
  if (p && p.id !== exceptProcedureId) return true;
  const [o] = await tx.select({ procedureId: procedureSlugs.procedureId }).from(procedureSlugs).where(eq(procedureSlugs.slug, slug)).limit(1);
  return Boolean(o && o.procedureId !== exceptProcedureId);
}

async function freeSlug(tx: DbOrTx, title: string, exceptProcedureId?: string): Promise<string> {
  const base = slugify(title);
  const reserved = new Set(["new"]);
  for (let i = 1; ; i++) {
    const candidate = i === 1 ? base : `${base}-${i}`;
    if (reserved.has(candidate)) continue;
    if (!(await slugTaken(tx, candidate, exceptProcedureId))) return candidate;
  }
}

/** Replaces a revision's extracted rows; spec rows keep their ids (upsert by spec key). */
async function writeExtraction(tx: Tx, rev: { id: string; procedureId: string }, doc: ProcedureDoc) {
  const x = extract(doc);
  await tx.delete(procedureLinks).where(eq(procedureLinks.revisionId, rev.id));
  const targets = x.links.filter((id) => id !== rev.procedureId);
  if (targets.length) {
    const existing = await tx.select({ id: procedures.id }).from(procedures).where(inArray(procedures.id, targets));
    if (existing.length) await tx.insert(procedureLinks).values(existing.map((e) => ({ revisionId: rev.id, fromProcedureId: rev.procedureId, toProcedureId: e.id })));
  }
  const keys = x.specs.map((s) => s.specKey);
  await tx
    .delete(procedureSpecs)
    .where(keys.length ? and(eq(procedureSpecs.revisionId, rev.id), sql`${procedureSpecs.specKey} not in (${sql.join(keys.map((k) => sql`${k}`), sql`, `)})`) : eq(procedureSpecs.revisionId, rev.id));
  for (const s of x.specs) {
    await tx
      .insert(procedureSpecs)
      .values({ ...s, revisionId: rev.id, procedureId: rev.procedureId })
      .onConflictDoUpdate({
        target: [procedureSpecs.revisionId, procedureSpecs.specKey],
        set: { position: s.position, label: s.label, quantity: s.quantity, unit: s.unit, nominal: s.nominal, min: s.min, max: s.max, siUnit: s.siUnit, nominalSi: s.nominalSi, minSi: s.minSi, maxSi: s.maxSi, note: s.note },
      });
  }
  await tx.delete(procedureMoments).where(eq(procedureMoments.revisionId, rev.id));
  if (x.moments.length) await tx.insert(procedureMoments).values(x.moments.map((m) => ({ ...m, revisionId: rev.id, procedureId: rev.procedureId })));
}

// ---- create and draft ------------------------------------------------------------------------

export async function createProcedure(
  actor: Actor & { name: string },
  input: { title: string; area: Area; summary: string; tags: string[]; doc?: unknown },
): Promise<{ procedure: Procedure; revision: Revision }> {
  const { doc } = validateDocument(input.doc ?? EMPTY_DOC);
  return db().transaction(async (tx) => {
    const slug = await freeSlug(tx, input.title);
    const [procedure] = await tx
      .insert(procedures)
      .values({ slug, title: input.title, area: input.area, summary: input.summary, tags: input.tags, createdBy: actor.id })
      .returning();
    const [revision] = await tx
      .insert(procedureRevisions)
      .values({ procedureId: procedure.id, number: 1, state: "draft", title: input.title, summary: input.summary, area: input.area, tags: input.tags, doc, wordCount: countWords(doc), authorId: actor.id, lastSavedBy: actor.id })
      .returning();
    await writeExtraction(tx, revision, doc);
    await audit(tx, actor.id, "create", "procedure", procedure.id, { slug, title: input.title });
    return { procedure, revision };
  });
}

async function openRevision(tx: DbOrTx, procedureId: string) {
  const [r] = await tx
    .select()
    .from(procedureRevisions)
    .where(and(eq(procedureRevisions.procedureId, procedureId), inArray(procedureRevisions.state, ["draft", "in_review"])))
    .limit(1);
  return r ?? null;
}

/** A new draft copied from a published or superseded revision ("new draft" and "restore"). */
export async function startDraftFrom(actor: Actor, sourceRevisionId: string): Promise<Revision> {
  return db().transaction(async (tx) => {
    const [src] = await tx.select().from(procedureRevisions).where(eq(procedureRevisions.id, sourceRevisionId)).limit(1);
    if (!src) throw new ProcedureError("No such revision.", 404);
    await tx.select({ id: procedures.id }).from(procedures).where(eq(procedures.id, src.procedureId)).for("update");
    const open = await openRevision(tx, src.procedureId);
    const d = decide("restore", { state: src.state, authorId: src.authorId }, actor, { openRevisionNumber: open?.number ?? null });
    if (!d.ok) throw new ProcedureError(d.reason);
    const [{ next }] = await tx
      .select({ next: sql<number>`coalesce(max(${procedureRevisions.number}), 0)::int + 1` })
      .from(procedureRevisions)
      .where(eq(procedureRevisions.procedureId, src.procedureId));
    const [rev] = await tx
      .insert(procedureRevisions)
      .values({
        procedureId: src.procedureId,
        number: next,
        state: "draft",
        title: src.title,
        summary: src.summary,
        area: src.area,
        tags: src.tags,
        doc: src.doc,
        wordCount: src.wordCount,
        basedOnRevisionId: src.id,
        authorId: actor.id,
        lastSavedBy: actor.id,
      })
      .returning();
    await writeExtraction(tx, rev, src.doc as ProcedureDoc);
    await audit(tx, actor.id, src.state === "published" ? "new-draft" : "restore", "procedure_revision", rev.id, { from: src.number });
    return rev;
  });
}

export type SaveInput = { baseVersion: number; title: string; summary: string; area: Area; tags: string[]; doc: unknown };
export type SaveResult =
  | { ok: true; version: number; updatedAt: Date; warnings: Issue[]; incomplete: IncompleteBlock[] }
  | {
      ok: false;
      conflict: true;
      copyId: string;
      current: { version: number; title: string; summary: string; area: Area; tags: string[]; doc: unknown; updatedAt: Date; savedBy: string | null };
    };

/** Autosave: refused with a conflict (both versions kept) when someone saved in between. */
export async function saveDraft(actor: Actor, revisionId: string, input: SaveInput): Promise<SaveResult> {
  const { doc, warnings } = validateDocument(input.doc);
  return db().transaction(async (tx) => {
    const [rev] = await tx.select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId)).for("update").limit(1);
    if (!rev) throw new ProcedureError("No such revision.", 404);
    const d = decide("edit", { state: rev.state, authorId: rev.authorId }, actor);
    if (!d.ok) throw new ProcedureError(d.reason, rev.state === "draft" ? 403 : 409);
    if (rev.version !== input.baseVersion) {
      const [copy] = await tx
        .insert(procedureConflictCopies)
        .values({ revisionId, userId: actor.id, baseVersion: input.baseVersion, title: input.title, summary: input.summary, tags: input.tags, doc })
        .returning({ id: procedureConflictCopies.id });
      await audit(tx, actor.id, "save-conflict", "procedure_revision", revisionId, { baseVersion: input.baseVersion, current: rev.version, copy: copy.id });
      let savedBy: string | null = null;
      if (rev.lastSavedBy) [{ name: savedBy }] = await tx.select({ name: users.name }).from(users).where(eq(users.id, rev.lastSavedBy));
      return {
        ok: false as const,
        conflict: true as const,
        copyId: copy.id,
        current: { version: rev.version, title: rev.title, summary: rev.summary, area: rev.area, tags: rev.tags, doc: rev.doc, updatedAt: rev.updatedAt, savedBy },
      };
    }
    const now = new Date();
    const [saved] = await tx
      .update(procedureRevisions)
      .set({ title: input.title, summary: input.summary, area: input.area, tags: input.tags, doc, wordCount: countWords(doc), version: rev.version + 1, lastSavedBy: actor.id, updatedAt: now })
      .where(and(eq(procedureRevisions.id, revisionId), eq(procedureRevisions.version, rev.version)))
      .returning();
    await writeExtraction(tx, rev, doc);
    // A procedure that was never published shows its draft's title in lists and URLs.
    const [proc] = await tx.select().from(procedures).where(eq(procedures.id, rev.procedureId));
    if (!proc.publishedRevisionId && proc.title !== input.title) {
      await tx.update(procedures).set({ title: input.title, area: input.area, summary: input.summary, tags: input.tags, updatedAt: now }).where(eq(procedures.id, proc.id));
    }
    return { ok: true as const, version: saved.version, updatedAt: saved.updatedAt, warnings, incomplete: incompleteBlocks(doc) };
  });
}

// ---- workflow --------------------------------------------------------------------------------

async function lockRevision(tx: Tx, revisionId: string) {
  const [rev] = await tx.select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId)).for("update").limit(1);
  if (!rev) throw new ProcedureError("No such revision.", 404);
  const [proc] = await tx.select().from(procedures).where(eq(procedures.id, rev.procedureId)).for("update");
  return { rev, proc };
}

function check(t: Transition, rev: Revision, actor: Actor, ctx: Parameters<typeof decide>[3] = {}) {
  const d = decide(t, { state: rev.state as RevisionState, authorId: rev.authorId }, actor, ctx);
  if (!d.ok) throw new ProcedureError(d.reason, 409);
}

async function reviewers(tx: DbOrTx, exceptId: string) {
  const roles = PERMISSIONS["procedure:review"] as readonly Role[];
  return tx
    .select({ id: users.id, email: users.email, name: users.name })
    .from(users)
    .where(and(inArray(users.role, [...roles]), sql`${users.deactivatedAt} is null`, ne(users.id, exceptId)));
}

async function person(tx: DbOrTx, id: string | null) {
  if (!id) return null;
  const [u] = await tx.select({ id: users.id, email: users.email, name: users.name, deactivatedAt: users.deactivatedAt }).from(users).where(eq(users.id, id));
  return u && !u.deactivatedAt ? u : null;
}

export async function submitRevision(actor: Actor & { name: string }, revisionId: string, changeNote: string) {
  return db().transaction(async (tx) => {
    const { rev, proc } = await lockRevision(tx, revisionId);
    check("submit", rev, actor, { changeNote });
    // A draft saves with blocks half done; review needs every block complete.
    const incomplete = incompleteBlocks(rev.doc as ProcedureDoc);
    if (incomplete.length) throw new DocumentIncomplete(incomplete);
    const note = changeNote.trim();
    await tx.update(procedureRevisions).set({ state: "in_review", changeNote: note, submittedAt: new Date(), returnReason: null, updatedAt: new Date() }).where(eq(procedureRevisions.id, rev.id));
    for (const r of await reviewers(tx, actor.id)) {
      await enqueueMail(
        tx,
        composeMail({
          to: r.email,
          subject: `Review requested: ${rev.title} (revision ${rev.number})`,
          greeting: `Hello ${r.name},`,
          paragraphs: [`${actor.name} submitted revision ${rev.number} of “${rev.title}” for review.`, `Change note: ${note}`],
          action: { label: "Compare and review", url: url(`/procedures/${proc.slug}/compare?to=${rev.number}`) },
        }),
      );
    }
    await audit(tx, actor.id, "submit", "procedure_revision", rev.id, { number: rev.number, changeNote: note });
  });
}

export async function withdrawRevision(actor: Actor, revisionId: string) {
  return db().transaction(async (tx) => {
    const { rev } = await lockRevision(tx, revisionId);
    check("withdraw", rev, actor);
    await tx.update(procedureRevisions).set({ state: "draft", updatedAt: new Date() }).where(eq(procedureRevisions.id, rev.id));
    await audit(tx, actor.id, "withdraw", "procedure_revision", rev.id, { number: rev.number });
  });
}

export async function returnRevision(actor: Actor & { name: string }, revisionId: string, reason: string) {
  return db().transaction(async (tx) => {
    const { rev, proc } = await lockRevision(tx, revisionId);
    check("return", rev, actor, { reason });
    const why = reason.trim();
    const now = new Date();
    await tx.update(procedureRevisions).set({ state: "draft", returnReason: why, returnedAt: now, returnedBy: actor.id, reviewedBy: actor.id, updatedAt: now }).where(eq(procedureRevisions.id, rev.id));
    const author = await person(tx, rev.authorId);
    if (author) {
      await enqueueMail(
        tx,
        composeMail({
          to: author.email,
          subject: `Returned to draft: ${rev.title} (revision ${rev.number})`,
          greeting: `Hello ${author.name},`,
          paragraphs: [`${actor.name} returned revision ${rev.number} of “${rev.title}” to Draft.`, `Reason: ${why}`],
          action: { label: "Open the draft", url: url(`/procedures/${proc.slug}/r/${rev.number}/edit`) },
        }),
      );
    }
    await audit(tx, actor.id, "return", "procedure_revision", rev.id, { number: rev.number, reason: why });
  });
}

export async function publishRevision(actor: Actor & { name: string }, revisionId: string): Promise<{ slug: string }> {
  return db().transaction(async (tx) => {
    const { rev, proc } = await lockRevision(tx, revisionId);
    check("publish", rev, actor);
    const now = new Date();
    const [prev] = await tx
      .select()
      .from(procedureRevisions)
      .where(and(eq(procedureRevisions.procedureId, proc.id), eq(procedureRevisions.state, "published")))
      .for("update");
    if (prev) {
      check("supersede", prev, actor);
      await tx.update(procedureRevisions).set({ state: "superseded", supersededAt: now }).where(eq(procedureRevisions.id, prev.id));
    }
    await tx.update(procedureRevisions).set({ state: "published", publishedAt: now, publishedBy: actor.id, reviewedBy: actor.id, updatedAt: now }).where(eq(procedureRevisions.id, rev.id));
    let slug = proc.slug;
    if (rev.title !== proc.title || slugify(rev.title) !== slugify(proc.title)) {
      const wanted = await freeSlug(tx, rev.title, proc.id);
      if (wanted !== proc.slug) {
        // The old URL keeps working: it redirects to the new one.
        await tx.delete(procedureSlugs).where(eq(procedureSlugs.slug, wanted));
        await tx.insert(procedureSlugs).values({ slug: proc.slug, procedureId: proc.id }).onConflictDoNothing();
        slug = wanted;
      }
    }
    await tx
      .update(procedures)
      .set({ slug, title: rev.title, area: rev.area, summary: rev.summary, tags: rev.tags, publishedRevisionId: rev.id, publishedAt: now, updatedAt: now })
      .where(eq(procedures.id, proc.id));

    const author = await person(tx, rev.authorId);
    const watchers = await tx
      .select({ id: users.id, email: users.email, name: users.name })
      .from(procedureWatchers)
      .innerJoin(users, eq(users.id, procedureWatchers.userId))
      .where(and(eq(procedureWatchers.procedureId, proc.id), sql`${users.deactivatedAt} is null`));
    const to = new Map<string, { email: string; name: string; why: string }>();
    for (const w of watchers) to.set(w.id, { email: w.email, name: w.name, why: "You are watching this procedure." });
    if (author) to.set(author.id, { email: author.email, name: author.name, why: "You wrote this revision." });
    to.delete(actor.id);
    for (const r of to.values()) {
      await enqueueMail(
        tx,
        composeMail({
          to: r.email,
          subject: `Published: ${rev.title} (revision ${rev.number})`,
          greeting: `Hello ${r.name},`,
          paragraphs: [
            `${actor.name} published revision ${rev.number} of “${rev.title}”.${prev ? ` Revision ${prev.number} is now superseded.` : ""}`,
            ...(rev.changeNote ? [`Change note: ${rev.changeNote}`] : []),
            r.why,
          ],
          action: { label: "Read the procedure", url: url(`/procedures/${slug}`) },
        }),
      );
    }
    await audit(tx, actor.id, "publish", "procedure_revision", rev.id, { number: rev.number, superseded: prev?.number ?? null, slug });
    return { slug };
  });
}

export async function discardDraft(actor: Actor, revisionId: string) {
  return db().transaction(async (tx) => {
    const { rev } = await lockRevision(tx, revisionId);
    const [{ n }] = await tx.select({ n: sql<number>`count(*)::int` }).from(procedureRevisions).where(eq(procedureRevisions.procedureId, rev.procedureId));
    check("discard", rev, actor, { onlyRevision: n === 1 });
    await tx.delete(procedureRevisions).where(eq(procedureRevisions.id, rev.id));
    await audit(tx, actor.id, "discard", "procedure_revision", rev.id, { number: rev.number });
  });
}

export async function setWatching(userId: string, procedureId: string, on: boolean) {
  if (on) await db().insert(procedureWatchers).values({ procedureId, userId }).onConflictDoNothing();
  else await db().delete(procedureWatchers).where(and(eq(procedureWatchers.procedureId, procedureId), eq(procedureWatchers.userId, userId)));
}

// ---- reading ---------------------------------------------------------------------------------

/** The procedure at this slug, or the slug it moved to. */
export async function findBySlug(slug: string): Promise<{ procedure: Procedure } | { movedTo: string } | null> {
  const [p] = await db().select().from(procedures).where(eq(procedures.slug, slug)).limit(1);
  if (p) return { procedure: p };
  const [old] = await db()
    .select({ slug: procedures.slug })
    .from(procedureSlugs)
    .innerJoin(procedures, eq(procedures.id, procedureSlugs.procedureId))
    .where(eq(procedureSlugs.slug, slug))
    .limit(1);
  return old ? { movedTo: old.slug } : null;
}

export async function revisionByNumber(procedureId: string, number: number) {
  const [r] = await db()
    .select()
    .from(procedureRevisions)
    .where(and(eq(procedureRevisions.procedureId, procedureId), eq(procedureRevisions.number, number)))
    .limit(1);
  return r ?? null;
}

export async function revisionById(id: string) {
  const [r] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, id)).limit(1);
  return r ?? null;
}

export async function specsOf(revisionId: string) {
  return db().select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, revisionId)).orderBy(asc(procedureSpecs.position));
}

export async function titlesFor(ids: string[]) {
  if (!ids.length) return new Map<string, { title: string; slug: string }>();
  const rows = await db().select({ id: procedures.id, title: procedures.title, slug: procedures.slug }).from(procedures).where(inArray(procedures.id, ids));
  return new Map(rows.map((r) => [r.id, { title: r.title, slug: r.slug }]));
}

/** Published procedures whose published revision links here. */
export async function linkedFrom(procedureId: string) {
  return db()
    .select({ title: procedures.title, slug: procedures.slug, area: procedures.area })
    .from(procedureLinks)
    .innerJoin(procedures, and(eq(procedures.id, procedureLinks.fromProcedureId), eq(procedures.publishedRevisionId, procedureLinks.revisionId)))
    .where(eq(procedureLinks.toProcedureId, procedureId))
    .orderBy(procedures.title);
}

let tablesCache: { at: number; marks: boolean; recordings: boolean } | undefined;
/** The recordings area's tables may not exist yet; ask PostgreSQL (cached for a minute). */
export async function recordingTables() {
  if (tablesCache && Date.now() - tablesCache.at < 60_000) return tablesCache;
  const r = await db().execute<{ marks: boolean; recordings: boolean }>(
    sql`select to_regclass('public.marks') is not null as marks, to_regclass('public.recordings') is not null as recordings`,
  );
  tablesCache = { at: Date.now(), marks: Boolean(r.rows[0]?.marks), recordings: Boolean(r.rows[0]?.recordings) };
  return tablesCache;
}

export type MarkRef = { id: string; recordingId: string; recordingTitle: string; tStart: number; tEnd: number | null; text: string };

/** Marks in recordings whose procedure_id is this procedure. */
export async function marksReferencing(procedureId: string): Promise<MarkRef[]> {
  const t = await recordingTables();
  if (!t.marks || !t.recordings) return [];
  const r = await db().execute<{ id: string; recording_id: string; title: string; t_start: number; t_end: number | null; text: string }>(
    sql`select m.id::text as id, m.recording_id::text as recording_id, r.title, m.t_start, m.t_end, m.text
        from marks m join recordings r on r.id = m.recording_id
        where m.procedure_id = ${procedureId} order by r.title, m.t_start limit 100`,
  );
  return r.rows.map((x) => ({ id: x.id, recordingId: x.recording_id, recordingTitle: x.title, tStart: Number(x.t_start), tEnd: x.t_end == null ? null : Number(x.t_end), text: x.text }));
}

export type RecordingOption = { id: string; title: string; durationS: number | null };
export async function readyRecordings(q: string): Promise<RecordingOption[]> {
  const t = await recordingTables();
  if (!t.recordings) return [];
  const r = await db().execute<{ id: string; title: string; duration_s: number | null }>(
    sql`select id::text as id, title, duration_s from recordings where state = 'ready' and title ilike ${`%${q.replace(/[%_\\]/g, (c) => `\\${c}`)}%`} order by title limit 20`,
  );
  return r.rows.map((x) => ({ id: x.id, title: x.title, durationS: x.duration_s == null ? null : Number(x.duration_s) }));
}

export async function recordingTitles(ids: string[]): Promise<Map<string, string>> {
  const t = await recordingTables();
  // A draft's video moment may have no recording yet (its id is null): ask only for real ids.
  const valid = ids.filter(isUuid);
  if (!t.recordings || !valid.length) return new Map();
  const r = await db().execute<{ id: string; title: string }>(sql`select id::text as id, title from recordings where id in (${sql.join(valid.map((i) => sql`${i}::uuid`), sql`, `)})`);
  return new Map(r.rows.map((x) => [x.id, x.title]));
}

/** Titles for the editor's link picker: only procedures the person may read (a draft's title is the author's). */
export async function searchTitles(reader: Reader, q: string, exceptId?: string) {
  const term = `%${q.trim().replace(/[%_\\]/g, (c) => `\\${c}`)}%`;
  return db()
    .select({ id: procedures.id, title: procedures.title, slug: procedures.slug, area: procedures.area })
    .from(procedures)
    .where(and(sql`${procedures.title} ilike ${term}`, exceptId ? ne(procedures.id, exceptId) : undefined, readableBy(reader)))
    .orderBy(procedures.title)
    .limit(12);
}

export async function isWatching(userId: string, procedureId: string) {
  const [w] = await db().select().from(procedureWatchers).where(and(eq(procedureWatchers.procedureId, procedureId), eq(procedureWatchers.userId, userId))).limit(1);
  return Boolean(w);
}

const publisher = alias(users, "publisher");
const returner = alias(users, "returner");

export async function history(procedureId: string) {
  return db()
    .select({
      id: procedureRevisions.id,
      number: procedureRevisions.number,
      state: procedureRevisions.state,
      title: procedureRevisions.title,
      changeNote: procedureRevisions.changeNote,
      returnReason: procedureRevisions.returnReason,
      authorId: procedureRevisions.authorId,
      author: users.name,
      publishedBy: publisher.name,
      returnedBy: returner.name,
      returnedAt: procedureRevisions.returnedAt,
      createdAt: procedureRevisions.createdAt,
      updatedAt: procedureRevisions.updatedAt,
      submittedAt: procedureRevisions.submittedAt,
      publishedAt: procedureRevisions.publishedAt,
      supersededAt: procedureRevisions.supersededAt,
      basedOnRevisionId: procedureRevisions.basedOnRevisionId,
      wordCount: procedureRevisions.wordCount,
    })
    .from(procedureRevisions)
    .leftJoin(users, eq(users.id, procedureRevisions.authorId))
    .leftJoin(publisher, eq(publisher.id, procedureRevisions.publishedBy))
    .leftJoin(returner, eq(returner.id, procedureRevisions.returnedBy))
    .where(eq(procedureRevisions.procedureId, procedureId))
    .orderBy(desc(procedureRevisions.number));
}

export async function openRevisionOf(procedureId: string) {
  return openRevision(db(), procedureId);
}

/** The open revision's number, state and author only (the read page shows no more of it; its document can be large). */
export async function openRevisionSummary(procedureId: string) {
  const [r] = await db()
    .select({ id: procedureRevisions.id, number: procedureRevisions.number, state: procedureRevisions.state, authorId: procedureRevisions.authorId })
    .from(procedureRevisions)
    .where(and(eq(procedureRevisions.procedureId, procedureId), inArray(procedureRevisions.state, ["draft", "in_review"])))
    .limit(1);
  return r ?? null;
}

export async function listPublished(tag?: string | null) {
  return db()
    .select({
      id: procedures.id,
      slug: procedures.slug,
      title: procedures.title,
      area: procedures.area,
      summary: procedures.summary,
      tags: procedures.tags,
      publishedAt: procedures.publishedAt,
      number: procedureRevisions.number,
      author: users.name,
    })
    .from(procedures)
    .innerJoin(procedureRevisions, eq(procedureRevisions.id, procedures.publishedRevisionId))
    .leftJoin(users, eq(users.id, procedureRevisions.authorId))
    .where(tag ? sql`exists (select 1 from unnest(${procedures.tags}) t where lower(t) = lower(${tag}))` : undefined)
    .orderBy(procedures.area, procedures.title);
}

export async function allTags() {
  const r = await db().execute<{ tag: string; n: number }>(
    // One entry per tag whatever its case, shown in the spelling most procedures use.
    sql`select mode() within group (order by t) as tag, count(*)::int as n from procedures, unnest(tags) t where published_revision_id is not null group by lower(t) order by lower(t)`,
  );
  return r.rows;
}

/** Open revisions a person may see: their own drafts, and (for reviewers) everything in review. */
export async function openRevisionsFor(user: Actor, opts: { reviewQueue: boolean }) {
  const base = db()
    .select({
      id: procedureRevisions.id,
      number: procedureRevisions.number,
      state: procedureRevisions.state,
      title: procedureRevisions.title,
      slug: procedures.slug,
      author: users.name,
      authorId: procedureRevisions.authorId,
      updatedAt: procedureRevisions.updatedAt,
      submittedAt: procedureRevisions.submittedAt,
      changeNote: procedureRevisions.changeNote,
      returnReason: procedureRevisions.returnReason,
    })
    .from(procedureRevisions)
    .innerJoin(procedures, eq(procedures.id, procedureRevisions.procedureId))
    .leftJoin(users, eq(users.id, procedureRevisions.authorId));
  const where = opts.reviewQueue
    ? or(eq(procedureRevisions.state, "in_review"), and(eq(procedureRevisions.state, "draft"), eq(procedureRevisions.authorId, user.id)))
    : and(inArray(procedureRevisions.state, ["draft", "in_review"]), eq(procedureRevisions.authorId, user.id));
  return base.where(where).orderBy(desc(procedureRevisions.updatedAt)).limit(50);
}

export async function awaitingReview() {
  return db()
    .select({
      number: procedureRevisions.number,
      title: procedureRevisions.title,
      slug: procedures.slug,
      author: users.name,
      submittedAt: procedureRevisions.submittedAt,
      changeNote: procedureRevisions.changeNote,
      everPublished: sql<boolean>`${procedures.publishedRevisionId} is not null`,
    })
    .from(procedureRevisions)
    .innerJoin(procedures, eq(procedures.id, procedureRevisions.procedureId))
    .leftJoin(users, eq(users.id, procedureRevisions.authorId))
    .where(eq(procedureRevisions.state, "in_review"))
    .orderBy(asc(procedureRevisions.submittedAt))
    .limit(20);
}
