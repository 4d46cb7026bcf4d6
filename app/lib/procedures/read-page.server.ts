/**
 * Everything the read page shows, in two queries: the procedure with its published revision,
 * its author and publisher, its open revision and whether the reader watches it; then the
 * published revision's specs, the procedures that link here, the marks that point here and the
 * current titles of the procedures and recordings its body shows (from the rows extracted at save).
 * The page renders on every request (no page cache), so its database work is kept to this.
 */
import { eq, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { procedureRevisions, procedures, users } from "~/db/schema";
import { db } from "~/lib/db.server";
import type { MarkRef } from "~/lib/recordings/procedure-links.server";
import type { SpecView } from "./diff";
import { movedTo } from "./lookup.server";
import type { RevisionState } from "./state";

const published = alias(procedureRevisions, "published");
const author = alias(users, "author");
const publisher = alias(users, "publisher");

type OpenSummary = { number: number; state: RevisionState; authorId: string | null };
type Around = {
  specs: SpecView[];
  from: { title: string; slug: string; area: string }[];
  marks: MarkRef[];
  linkTitles: { id: string; title: string; slug: string }[];
  recordingTitles: { id: string; title: string }[];
};

async function procedureWithPublished(slug: string, userId: string) {
  const [row] = await db()
    .select({
      procedure: { id: procedures.id, slug: procedures.slug, title: procedures.title, publishedRevisionId: procedures.publishedRevisionId },
      rev: {
        id: published.id,
        number: published.number,
        version: published.version,
        title: published.title,
        summary: published.summary,
        tags: published.tags,
        doc: published.doc,
        changeNote: published.changeNote,
        publishedAt: published.publishedAt,
      },
      author: author.name,
      publishedBy: publisher.name,
      open: sql<OpenSummary | null>`(select json_build_object('number', o.number, 'state', o.state, 'authorId', o.author_id) from procedure_revisions o
        where o.procedure_id = ${procedures.id} and o.state in ('draft', 'in_review') limit 1)`,
      watching: sql<boolean>`exists (select 1 from procedure_watchers w where w.procedure_id = ${procedures.id} and w.user_id = ${userId})`,
    })
    .from(procedures)
    .leftJoin(published, eq(published.id, procedures.publishedRevisionId))
    .leftJoin(author, eq(author.id, published.authorId))
    .leftJoin(publisher, eq(publisher.id, published.publishedBy))
    .where(eq(procedures.slug, slug))
    .limit(1);
  return row ?? null;
}

/** The published revision's surroundings, each part a JSON array of one select. */
async function around(procedureId: string, revisionId: string): Promise<Around> {
  const r = await db().execute<Around>(sql`select
    (select coalesce(json_agg(json_build_object('id', s.id, 'specKey', s.spec_key, 'label', s.label, 'quantity', s.quantity, 'unit', s.unit,
        'nominal', s.nominal, 'min', s.min, 'max', s.max, 'note', s.note) order by s.position), '[]'::json)
      from procedure_specs s where s.revision_id = ${revisionId}) as "specs",
    (select coalesce(json_agg(json_build_object('title', p.title, 'slug', p.slug, 'area', p.area) order by p.title), '[]'::json)
      from procedure_links l join procedures p on p.id = l.from_procedure_id and p.published_revision_id = l.revision_id
      where l.to_procedure_id = ${procedureId}) as "from",
    (select coalesce(json_agg(json_build_object('id', m.id, 'recordingId', m.recording_id, 'recordingTitle', m.title, 'tStart', m.t_start, 'tEnd', m.t_end, 'text', m.text)
        order by m.title, m.t_start), '[]'::json)
      from (select m.id, m.recording_id, r.title, m.t_start, m.t_end, m.text from marks m join recordings r on r.id = m.recording_id
            where m.procedure_id = ${procedureId} order by r.title, m.t_start limit 100) m) as "marks",
    (select coalesce(json_agg(json_build_object('id', p.id, 'title', p.title, 'slug', p.slug)), '[]'::json)
      from procedures p where p.id = ${procedureId} or p.id in (select l.to_procedure_id from procedure_links l where l.revision_id = ${revisionId})) as "linkTitles",
    (select coalesce(json_agg(json_build_object('id', r.id, 'title', r.title)), '[]'::json)
      from recordings r where r.id in (select m.recording_id from procedure_moments m where m.revision_id = ${revisionId})) as "recordingTitles"`);
  return r.rows[0];
}

export type ReadPage = NonNullable<Awaited<ReturnType<typeof procedureWithPublished>>> & {
  around: Around | null;
  titles: { procedures: Map<string, { title: string; slug: string }>; recordings: Map<string, string> };
};

/**
 * The read page's data for the procedure at `slug` as `userId` sees it, `{ movedTo }` for a slug
 * a rename left behind, or null. `around` is null when nothing is published.
 */
export async function readPage(slug: string, userId: string): Promise<ReadPage | { movedTo: string } | null> {
  const row = await procedureWithPublished(slug, userId);
  if (!row) return movedTo(slug);
  const more = row.rev ? await around(row.procedure.id, row.rev.id) : null;
  return {
    ...row,
    around: more,
    titles: {
      procedures: new Map((more?.linkTitles ?? []).map((p) => [p.id, { title: p.title, slug: p.slug }])),
      recordings: new Map((more?.recordingTitles ?? []).map((r) => [r.id, r.title])),
    },
  };
}
