/**
 * Who reviewed a revision, in names people read: the editor who published it, the editor who
 * returned it to Draft (with the reason), and the drafts waiting on their author after a return.
 */
import { and, desc, eq, inArray, isNotNull } from "drizzle-orm";
import { procedureRevisions, procedures, users } from "~/db/schema";
import { db } from "~/lib/db.server";

export type ReviewPeople = { author: string | null; publishedBy: string | null; returnedBy: string | null };

/** Names of the author, the publisher and the returner of one revision (null for nobody, or for an account since removed). */
export async function reviewPeople(rev: { authorId: string | null; publishedBy: string | null; returnedBy: string | null }): Promise<ReviewPeople> {
  const ids = [rev.authorId, rev.publishedBy, rev.returnedBy].filter((x): x is string => Boolean(x));
  const rows = ids.length ? await db().select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, ids)) : [];
  const name = (id: string | null) => (id ? (rows.find((r) => r.id === id)?.name ?? null) : null);
  return { author: name(rev.authorId), publishedBy: name(rev.publishedBy), returnedBy: name(rev.returnedBy) };
}

/**
 * The person's own drafts that an editor returned: a return sets the reason, a new submission
 * clears it, so a draft with a reason is still waiting on its author.
 */
export async function returnedDraftsOf(authorId: string) {
  return db()
    .select({
      number: procedureRevisions.number,
      title: procedureRevisions.title,
      slug: procedures.slug,
      reason: procedureRevisions.returnReason,
      returnedAt: procedureRevisions.returnedAt,
      returnedBy: users.name,
    })
    .from(procedureRevisions)
    .innerJoin(procedures, eq(procedures.id, procedureRevisions.procedureId))
    .leftJoin(users, eq(users.id, procedureRevisions.returnedBy))
    .where(and(eq(procedureRevisions.state, "draft"), eq(procedureRevisions.authorId, authorId), isNotNull(procedureRevisions.returnReason)))
    .orderBy(desc(procedureRevisions.returnedAt))
    .limit(20);
}
