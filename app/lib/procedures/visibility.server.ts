/**
 * Who may read a procedure: anyone signed in once it is published; before that, only those who
 * may see its open revision (the author with "procedure:view-drafts:own", everyone with ":any").
 * That is the rule of the read page (app/routes/procedures/read.tsx) and of `canSeeRevision`
 * (routes.server.ts), in SQL for lists, so that a never-published draft's title and slug reach
 * no one else through the editor's link picker, the recording page or the marks API.
 */
import { and, eq, exists, inArray, isNotNull, or, sql, type SQL } from "drizzle-orm";
import { procedureRevisions, procedures } from "~/db/schema";
import { db } from "~/lib/db.server";
import { can, type Role } from "~/lib/permissions";
import type { RevisionState } from "./state";

export type Reader = { id: string; role: Role };

/** A procedure's open revision is the one in one of these states (at most one at a time). */
export const OPEN_STATES: RevisionState[] = ["draft", "in_review"];

/** A condition on `procedures`: the row is a procedure `reader` may read. */
export function readableBy(reader: Reader): SQL {
  if (can(reader.role, "procedure:view-drafts:any")) return sql`true`;
  const published = isNotNull(procedures.publishedRevisionId);
  if (!can(reader.role, "procedure:view-drafts:own")) return published;
  const ownOpenRevision = db()
    .select({ one: sql`1` })
    .from(procedureRevisions)
    .where(
      and(
        eq(procedureRevisions.procedureId, procedures.id),
        inArray(procedureRevisions.state, OPEN_STATES),
        eq(procedureRevisions.authorId, reader.id),
      ),
    );
  return or(published, exists(ownOpenRevision))!;
}

/** Which of `ids` are procedures `reader` may read (unknown ids are not). */
export async function readableProcedureIds(reader: Reader, ids: readonly string[]): Promise<Set<string>> {
  const unique = [...new Set(ids)];
  if (!unique.length) return new Set();
  const rows = await db()
    .select({ id: procedures.id })
    .from(procedures)
    .where(and(inArray(procedures.id, unique), readableBy(reader)));
  return new Set(rows.map((r) => r.id));
}

/** What a reader who may not read a linked procedure sees in its place (no title, no address). */
export const UNREADABLE_PROCEDURE = "a procedure not yet published";
