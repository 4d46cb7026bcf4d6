/**
 * A revision's way through review: submit, withdraw, return, publish, discard. Each transition is
 * decided by the state machine (`state.ts`) on the locked row, and done in one transaction with
 * the mails it sends and its audit.
 */
import { and, eq, inArray, ne, sql } from "drizzle-orm";
import { procedureRevisionReturns, procedureRevisions, procedures, procedureSlugs, procedureWatchers, users } from "~/db/schema";
import { audit } from "~/lib/audit.server";
import { db, type DbOrTx, type Tx } from "~/lib/db.server";
import { DomainError } from "~/lib/domain-error";
import { env } from "~/lib/env.server";
import { composeMail, enqueueMail } from "~/lib/mail.server";
import { PERMISSIONS, type Role } from "~/lib/permissions";
import { incompleteBlocks, incompleteText, type ProcedureDoc } from "./document";
import { freeSlug, type Revision } from "./lookup.server";
import { slugify } from "./slug";
import { decide, type Actor, type RevisionState, type Transition } from "./state";

const url = (p: string) => new URL(p, env().PUBLIC_URL).toString();

async function lockRevision(tx: Tx, revisionId: string) {
  const [rev] = await tx.select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId)).for("update").limit(1);
  if (!rev) throw new DomainError("No such revision.", { status: 404 });
  const [proc] = await tx.select().from(procedures).where(eq(procedures.id, rev.procedureId)).for("update");
  return { rev, proc };
}

function check(t: Transition, rev: Revision, actor: Actor, ctx: Parameters<typeof decide>[3] = {}) {
  const d = decide(t, { state: rev.state as RevisionState, authorId: rev.authorId }, actor, ctx);
  if (!d.ok) throw new DomainError(d.reason, { status: 409 });
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
  const [u] = await tx
    .select({ id: users.id, email: users.email, name: users.name, deactivatedAt: users.deactivatedAt })
    .from(users)
    .where(eq(users.id, id));
  return u && !u.deactivatedAt ? u : null;
}

export async function submitRevision(actor: Actor & { name: string }, revisionId: string, changeNote: string) {
  return db().transaction(async (tx) => {
    const { rev, proc } = await lockRevision(tx, revisionId);
    check("submit", rev, actor, { changeNote });
    // A draft saves with blocks half done; review needs every block complete.
    const incomplete = incompleteBlocks(rev.doc as ProcedureDoc);
    if (incomplete.length) {
      throw new DomainError(
        `Not ready for review. Finish ${incomplete.length === 1 ? "this block" : `these ${incomplete.length} blocks`} first: ${incompleteText(incomplete)}.`,
        {
          status: 422,
          details: { blocks: incomplete },
        },
      );
    }
    const note = changeNote.trim();
    await tx
      .update(procedureRevisions)
      .set({ state: "in_review", changeNote: note, submittedAt: new Date(), updatedAt: new Date() })
      .where(eq(procedureRevisions.id, rev.id));
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
    await tx
      .update(procedureRevisions)
      .set({ state: "draft", reviewedBy: actor.id, updatedAt: now })
      .where(eq(procedureRevisions.id, rev.id));
    // Every return is kept: a revision returned, submitted again and returned again shows both reasons.
    await tx.insert(procedureRevisionReturns).values({ revisionId: rev.id, returnedBy: actor.id, reason: why, returnedAt: now });
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
    await tx
      .update(procedureRevisions)
      .set({ state: "published", publishedAt: now, publishedBy: actor.id, reviewedBy: actor.id, updatedAt: now })
      .where(eq(procedureRevisions.id, rev.id));
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
      .set({
        slug,
        title: rev.title,
        area: rev.area,
        summary: rev.summary,
        tags: rev.tags,
        publishedRevisionId: rev.id,
        publishedAt: now,
        updatedAt: now,
      })
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
    const [{ n }] = await tx
      .select({ n: sql<number>`count(*)::int` })
      .from(procedureRevisions)
      .where(eq(procedureRevisions.procedureId, rev.procedureId));
    check("discard", rev, actor, { onlyRevision: n === 1 });
    await tx.delete(procedureRevisions).where(eq(procedureRevisions.id, rev.id));
    await audit(tx, actor.id, "discard", "procedure_revision", rev.id, { number: rev.number });
  });
}
