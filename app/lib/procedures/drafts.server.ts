/**
 * Writing a procedure's text: create, start a draft from an earlier revision, autosave with
 * optimistic concurrency (a conflict keeps both versions). Each change is one transaction with
 * its extraction (links, specs, moments) and audit.
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import {
  procedureConflictCopies,
  procedureLinks,
  procedureMoments,
  procedureRevisions,
  procedures,
  procedureSpecs,
  users,
} from "~/db/schema";
import { audit } from "~/lib/audit.server";
import { db, type Tx } from "~/lib/db.server";
import { DomainError } from "~/lib/domain-error";
import type { Area } from "./areas";
import { countWords, EMPTY_DOC, incompleteBlocks, sanitizeDocument, type IncompleteBlock, type Issue, type ProcedureDoc } from "./document";
import { extract } from "./extract";
import { freeSlug, openRevisionOf, type Procedure, type Revision } from "./lookup.server";
import { structureProblem } from "./schema-check.server";
import { decide, type Actor } from "./state";

/** Sanitizes and checks the structure; a document no draft may hold is a 422 with its issues. */
export function validateDocument(input: unknown): { doc: ProcedureDoc; warnings: Issue[] } {
  const r = sanitizeDocument(input);
  const issues = r.ok ? [] : r.errors;
  const problem = r.ok ? structureProblem(r.doc) : null;
  if (problem) issues.push({ path: "doc", message: problem });
  if (!r.ok || issues.length)
    throw new DomainError(`The document was not saved: ${issues.map((i) => i.message).join("; ")}`, { status: 422, issues });
  return { doc: r.doc, warnings: r.warnings };
}

/** Replaces a revision's extracted rows; spec rows keep their ids (upsert by spec key). */
async function writeExtraction(tx: Tx, rev: { id: string; procedureId: string }, doc: ProcedureDoc) {
  const x = extract(doc);
  await tx.delete(procedureLinks).where(eq(procedureLinks.revisionId, rev.id));
  const targets = x.links.filter((id) => id !== rev.procedureId);
  if (targets.length) {
    const existing = await tx.select({ id: procedures.id }).from(procedures).where(inArray(procedures.id, targets));
    if (existing.length)
      await tx
        .insert(procedureLinks)
        .values(existing.map((e) => ({ revisionId: rev.id, fromProcedureId: rev.procedureId, toProcedureId: e.id })));
  }
  const keys = x.specs.map((s) => s.specKey);
  await tx.delete(procedureSpecs).where(
    keys.length
      ? and(
          eq(procedureSpecs.revisionId, rev.id),
          sql`${procedureSpecs.specKey} not in (${sql.join(
            keys.map((k) => sql`${k}`),
            sql`, `,
          )})`,
        )
      : eq(procedureSpecs.revisionId, rev.id),
  );
  for (const s of x.specs) {
    await tx
      .insert(procedureSpecs)
      .values({ ...s, revisionId: rev.id, procedureId: rev.procedureId })
      .onConflictDoUpdate({
        target: [procedureSpecs.revisionId, procedureSpecs.specKey],
        set: {
          position: s.position,
          label: s.label,
          quantity: s.quantity,
          unit: s.unit,
          nominal: s.nominal,
          min: s.min,
          max: s.max,
          siUnit: s.siUnit,
          nominalSi: s.nominalSi,
          minSi: s.minSi,
          maxSi: s.maxSi,
          note: s.note,
        },
      });
  }
  await tx.delete(procedureMoments).where(eq(procedureMoments.revisionId, rev.id));
  if (x.moments.length)
    await tx.insert(procedureMoments).values(x.moments.map((m) => ({ ...m, revisionId: rev.id, procedureId: rev.procedureId })));
}

type Text = { title: string; summary: string; area: Area; tags: string[] };

/** A revision's text columns for a checked document: what create and autosave both write. */
const textColumns = (input: Text, doc: ProcedureDoc) => ({
  title: input.title,
  summary: input.summary,
  area: input.area,
  tags: input.tags,
  doc,
  wordCount: countWords(doc),
});

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
      .values({
        procedureId: procedure.id,
        number: 1,
        state: "draft",
        ...textColumns(input, doc),
        authorId: actor.id,
        lastSavedBy: actor.id,
      })
      .returning();
    await writeExtraction(tx, revision, doc);
    await audit(tx, actor.id, "create", "procedure", procedure.id, { slug, title: input.title });
    return { procedure, revision };
  });
}

/** A new draft copied from a published or superseded revision ("new draft" and "restore"). */
export async function startDraftFrom(actor: Actor, sourceRevisionId: string): Promise<Revision> {
  return db().transaction(async (tx) => {
    const [src] = await tx.select().from(procedureRevisions).where(eq(procedureRevisions.id, sourceRevisionId)).limit(1);
    if (!src) throw new DomainError("No such revision.", { status: 404 });
    await tx.select({ id: procedures.id }).from(procedures).where(eq(procedures.id, src.procedureId)).for("update");
    const open = await openRevisionOf(src.procedureId, tx);
    const d = decide("restore", { state: src.state, authorId: src.authorId }, actor, { openRevisionNumber: open?.number ?? null });
    if (!d.ok) throw new DomainError(d.reason);
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
      current: {
        version: number;
        title: string;
        summary: string;
        area: Area;
        tags: string[];
        doc: unknown;
        updatedAt: Date;
        savedBy: string | null;
      };
    };

/** Autosave: refused with a conflict (both versions kept) when someone saved in between. */
export async function saveDraft(actor: Actor, revisionId: string, input: SaveInput): Promise<SaveResult> {
  const { doc, warnings } = validateDocument(input.doc);
  return db().transaction(async (tx) => {
    const [rev] = await tx.select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId)).for("update").limit(1);
    if (!rev) throw new DomainError("No such revision.", { status: 404 });
    const d = decide("edit", { state: rev.state, authorId: rev.authorId }, actor);
    // The editor reads `error: "conflict"` as a save conflict with both versions; a revision that
    // cannot be edited at all (in review, published) is a plain refusal.
    if (!d.ok) throw new DomainError(d.reason, rev.state === "draft" ? { status: 403 } : { status: 409, details: { error: "refused" } });
    if (rev.version !== input.baseVersion) {
      const [copy] = await tx
        .insert(procedureConflictCopies)
        .values({
          revisionId,
          userId: actor.id,
          baseVersion: input.baseVersion,
          title: input.title,
          summary: input.summary,
          tags: input.tags,
          doc,
        })
        .returning({ id: procedureConflictCopies.id });
      await audit(tx, actor.id, "save-conflict", "procedure_revision", revisionId, {
        baseVersion: input.baseVersion,
        current: rev.version,
        copy: copy.id,
      });
      let savedBy: string | null = null;
      if (rev.lastSavedBy) [{ name: savedBy }] = await tx.select({ name: users.name }).from(users).where(eq(users.id, rev.lastSavedBy));
      return {
        ok: false as const,
        conflict: true as const,
        copyId: copy.id,
        current: {
          version: rev.version,
          title: rev.title,
          summary: rev.summary,
          area: rev.area,
          tags: rev.tags,
          doc: rev.doc,
          updatedAt: rev.updatedAt,
          savedBy,
        },
      };
    }
    const now = new Date();
    const [saved] = await tx
      .update(procedureRevisions)
      .set({
        ...textColumns(input, doc),
        version: rev.version + 1,
        lastSavedBy: actor.id,
        updatedAt: now,
      })
      .where(and(eq(procedureRevisions.id, revisionId), eq(procedureRevisions.version, rev.version)))
      .returning();
    await writeExtraction(tx, rev, doc);
    // A procedure that was never published shows its draft's title in lists and URLs.
    const [proc] = await tx.select().from(procedures).where(eq(procedures.id, rev.procedureId));
    if (!proc.publishedRevisionId && proc.title !== input.title) {
      await tx
        .update(procedures)
        .set({ title: input.title, area: input.area, summary: input.summary, tags: input.tags, updatedAt: now })
        .where(eq(procedures.id, proc.id));
    }
    return { ok: true as const, version: saved.version, updatedAt: saved.updatedAt, warnings, incomplete: incompleteBlocks(doc) };
  });
}
