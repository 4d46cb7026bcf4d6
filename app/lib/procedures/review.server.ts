/**
 * Who reviewed a revision, in names people read: its author, the editor who published it, and
 * every return to Draft with its editor and reason, in order; and the drafts waiting on their
 * author after a return (the Shop floor).
 */
import { and, desc, eq, sql } from "drizzle-orm";
import { procedureRevisionReturns, procedureRevisions, procedures, users } from "~/db/schema";
import { db } from "~/lib/db.server";

/** One return to Draft; `by` is null for an account since removed. */
export type RevisionReturn = { by: string | null; reason: string; at: Date };
export type ReviewPeople = { author: string | null; publishedBy: string | null; returns: RevisionReturn[] };

export type ReturnJson = { by: string | null; reason: string; at: string };
/** The returns as the JSON column below gives them, with their times as dates. */
export const toReturns = (rows: ReturnJson[] | null): RevisionReturn[] =>
  (rows ?? []).map((r) => ({ by: r.by, reason: r.reason, at: new Date(r.at) }));

/** The returns of the revision `revisionId` (an id or a column) as a JSON array, oldest first: a column for a select. */
export const returnsJson = (revisionId: unknown) => sql<ReturnJson[]>`(
  select coalesce(json_agg(json_build_object('by', u.name, 'reason', x.reason, 'at', x.returned_at) order by x.returned_at, x.id), '[]'::json)
  from procedure_revision_returns x left join users u on u.id = x.returned_by where x.revision_id = ${revisionId})`;

/** Names of the author and the publisher of one revision, and its returns (one query). */
export async function reviewPeople(rev: { id: string; authorId: string | null; publishedBy: string | null }): Promise<ReviewPeople> {
  const r = await db().execute<{ author: string | null; published_by: string | null; returns: ReturnJson[] }>(
    sql`select (select name from users where id = ${rev.authorId}) as author, (select name from users where id = ${rev.publishedBy}) as published_by, ${returnsJson(sql`${rev.id}::uuid`)} as returns`,
  );
  const row = r.rows[0];
  return { author: row.author, publishedBy: row.published_by, returns: toReturns(row.returns) };
}

/** The return a draft waits on: its latest, when it came after the latest submission. */
export function waitingReturn(rev: { state: string; submittedAt: Date | string | null }, returns: RevisionReturn[]): RevisionReturn | null {
  const last = returns.at(-1);
  if (rev.state !== "draft" || !last) return null;
  return !rev.submittedAt || last.at >= new Date(rev.submittedAt) ? last : null;
}

/** A condition on procedure_revisions: a draft returned after its latest submission, still waiting on its author. */
export const waitingOnAuthor = and(
  eq(procedureRevisions.state, "draft"),
  sql`exists (select 1 from procedure_revision_returns x where x.revision_id = ${procedureRevisions.id} and x.returned_at >= coalesce(${procedureRevisions.submittedAt}, '-infinity'::timestamptz))`,
)!;

/** The person's own drafts that an editor returned and that are not yet submitted again, with the latest return. */
export async function returnedDraftsOf(authorId: string) {
  return db()
    .select({
      number: procedureRevisions.number,
      title: procedureRevisions.title,
      slug: procedures.slug,
      reason: procedureRevisionReturns.reason,
      returnedAt: procedureRevisionReturns.returnedAt,
      returnedBy: users.name,
    })
    .from(procedureRevisions)
    .innerJoin(procedures, eq(procedures.id, procedureRevisions.procedureId))
    .innerJoin(procedureRevisionReturns, eq(procedureRevisionReturns.revisionId, procedureRevisions.id))
    .leftJoin(users, eq(users.id, procedureRevisionReturns.returnedBy))
    .where(
      and(
        eq(procedureRevisions.authorId, authorId),
        waitingOnAuthor,
        sql`not exists (select 1 from procedure_revision_returns later where later.revision_id = ${procedureRevisions.id} and later.returned_at > ${procedureRevisionReturns.returnedAt})`,
      ),
    )
    .orderBy(desc(procedureRevisionReturns.returnedAt))
    .limit(20);
}
