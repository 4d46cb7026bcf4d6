/**
 * What the procedure pages list and show: a revision's specs, the history with every return, the
 * published list and its tags, the open revisions a person works on, the review queue.
 */
import { and, asc, desc, eq, inArray, or, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { procedureRevisions, procedures, procedureSpecs, users } from "~/db/schema";
import { db } from "~/lib/db.server";
import { returnsJson, toReturns, waitingOnAuthor, waitingReturn } from "./review.server";
import type { Actor } from "./state";
import { OPEN_STATES } from "./visibility.server";

export async function specsOf(revisionId: string) {
  return db().select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, revisionId)).orderBy(asc(procedureSpecs.position));
}

const publisher = alias(users, "publisher");

/** Every revision of a procedure, newest first, with its people and every return to Draft in order. */
export async function history(procedureId: string) {
  const rows = await db()
    .select({
      id: procedureRevisions.id,
      number: procedureRevisions.number,
      state: procedureRevisions.state,
      title: procedureRevisions.title,
      changeNote: procedureRevisions.changeNote,
      authorId: procedureRevisions.authorId,
      author: users.name,
      publishedBy: publisher.name,
      returns: returnsJson(procedureRevisions.id),
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
    .where(eq(procedureRevisions.procedureId, procedureId))
    .orderBy(desc(procedureRevisions.number));
  return rows.map((r) => {
    const returns = toReturns(r.returns);
    return { ...r, returns, waiting: waitingReturn(r, returns) };
  });
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
      returned: sql<boolean>`${waitingOnAuthor}`,
    })
    .from(procedureRevisions)
    .innerJoin(procedures, eq(procedures.id, procedureRevisions.procedureId))
    .leftJoin(users, eq(users.id, procedureRevisions.authorId));
  const where = opts.reviewQueue
    ? or(eq(procedureRevisions.state, "in_review"), and(eq(procedureRevisions.state, "draft"), eq(procedureRevisions.authorId, user.id)))
    : and(inArray(procedureRevisions.state, OPEN_STATES), eq(procedureRevisions.authorId, user.id));
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
