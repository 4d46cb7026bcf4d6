/**
 * Recordings as procedures see them: the ready recordings the editor's video-moment picker
 * offers, recording titles for the moments in a document, and the shape of a mark pointing at a
 * procedure (the read page asks for those with its other data, read-page.server.ts).
 */
import { and, asc, eq, ilike, inArray } from "drizzle-orm";
import { recordings } from "~/db/schema";
import { db } from "~/lib/db.server";
import { isUuid } from "~/lib/edge";

/** A mark that points at a procedure, as its read page lists it. */
export type MarkRef = { id: string; recordingId: string; recordingTitle: string; tStart: number; tEnd: number | null; text: string };

export type RecordingOption = { id: string; title: string; durationS: number | null };

/** Ready recordings whose title contains `q` (LIKE's wildcards taken literally), at most 20. */
export async function readyRecordings(q: string): Promise<RecordingOption[]> {
  return db()
    .select({ id: recordings.id, title: recordings.title, durationS: recordings.durationS })
    .from(recordings)
    .where(and(eq(recordings.state, "ready"), ilike(recordings.title, `%${q.replace(/[%_\\]/g, (c) => `\\${c}`)}%`)))
    .orderBy(asc(recordings.title))
    .limit(20);
}

export async function recordingTitles(ids: string[]): Promise<Map<string, string>> {
  // A draft's video moment may have no recording yet (its id is null): ask only for real ids.
  const valid = [...new Set(ids.filter(isUuid))];
  if (!valid.length) return new Map();
  const rows = await db().select({ id: recordings.id, title: recordings.title }).from(recordings).where(inArray(recordings.id, valid));
  return new Map(rows.map((x) => [x.id, x.title]));
}
