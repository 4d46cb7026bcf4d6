/**
 * Finding procedures and revisions: by slug (following renames), by number or id, the open
 * revision, free slugs for a title, and titles for links and the editor's link picker.
 */
import { and, eq, inArray, ne, sql } from "drizzle-orm";
import { procedureRevisions, procedures, procedureSlugs } from "~/db/schema";
import { db, type DbOrTx } from "~/lib/db.server";
import { recordingTitles } from "~/lib/recordings/procedure-links.server";
import { docReferences } from "./body";
import type { JSONNode } from "./document";
import { slugify } from "./slug";
import { OPEN_STATES, readableBy, type Reader } from "./visibility.server";

export type Procedure = typeof procedures.$inferSelect;
export type Revision = typeof procedureRevisions.$inferSelect;

/** The procedure at this slug, or the slug it moved to. */
export async function findBySlug(slug: string): Promise<{ procedure: Procedure } | { movedTo: string } | null> {
  const [p] = await db().select().from(procedures).where(eq(procedures.slug, slug)).limit(1);
  if (p) return { procedure: p };
  return movedTo(slug);
}

/** Where an old slug points now (a published rename keeps the old address working). */
export async function movedTo(slug: string): Promise<{ movedTo: string } | null> {
  const [old] = await db()
    .select({ slug: procedures.slug })
    .from(procedureSlugs)
    .innerJoin(procedures, eq(procedures.id, procedureSlugs.procedureId))
    .where(eq(procedureSlugs.slug, slug))
    .limit(1);
  return old ? { movedTo: old.slug } : null;
}

async function slugTaken(tx: DbOrTx, slug: string, exceptProcedureId?: string): Promise<boolean> {
  const [p] = await tx.select({ id: procedures.id }).from(procedures).where(eq(procedures.slug, slug)).limit(1);
  if (p && p.id !== exceptProcedureId) return true;
  const [o] = await tx
    .select({ procedureId: procedureSlugs.procedureId })
    .from(procedureSlugs)
    .where(eq(procedureSlugs.slug, slug))
    .limit(1);
  return Boolean(o && o.procedureId !== exceptProcedureId);
}

/** The first slug from the title that no procedure uses or used ("new" is the create page). */
export async function freeSlug(tx: DbOrTx, title: string, exceptProcedureId?: string): Promise<string> {
  const base = slugify(title);
  const reserved = new Set(["new"]);
  for (let i = 1; ; i++) {
    const candidate = i === 1 ? base : `${base}-${i}`;
    if (reserved.has(candidate)) continue;
    if (!(await slugTaken(tx, candidate, exceptProcedureId))) return candidate;
  }
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

/** The procedure's revision in draft or in review (at most one at a time), or null. */
export async function openRevisionOf(procedureId: string, tx: DbOrTx = db()) {
  const [r] = await tx
    .select()
    .from(procedureRevisions)
    .where(and(eq(procedureRevisions.procedureId, procedureId), inArray(procedureRevisions.state, OPEN_STATES)))
    .limit(1);
  return r ?? null;
}

/** Current titles and slugs of procedures a document links to. */
export async function titlesFor(ids: string[]) {
  if (!ids.length) return new Map<string, { title: string; slug: string }>();
  const rows = await db()
    .select({ id: procedures.id, title: procedures.title, slug: procedures.slug })
    .from(procedures)
    .where(inArray(procedures.id, ids));
  return new Map(rows.map((r) => [r.id, { title: r.title, slug: r.slug }]));
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

/** Current titles of the procedures and recordings that documents link to and show. */
export async function docTitles(...docs: JSONNode[]) {
  const { procedureIds, recordingIds } = docReferences(...docs);
  const [procedures, recordings] = await Promise.all([titlesFor(procedureIds), recordingTitles(recordingIds)]);
  return { procedures, recordings };
}
