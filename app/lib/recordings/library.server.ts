import { and, asc, desc, eq, notInArray, sql } from "drizzle-orm";
import { builds, marks, procedures, readings, recordings, users } from "~/db/schema";
import { db } from "../db.server";
import { STATES_WITHOUT_READINGS } from "./reading-targets";

/** `takesReadings`: only recordings new readings may go to (reading-targets.ts). */
export type LibraryFilter = {
  tag?: string | null;
  uploader?: string | null;
  sort?: "newest" | "oldest";
  q?: string | null;
  takesReadings?: boolean;
};

const markCount = sql<number>`(select count(*)::int from ${marks} where ${marks.recordingId} = ${recordings.id})`;
const readingCount = sql<number>`(select count(*)::int from ${readings} where ${readings.recordingId} = ${recordings.id})`;

export async function listRecordings(f: LibraryFilter = {}) {
  const where = [];
  // Tags are compared without case; each keeps its author's spelling (app/lib/tags.ts).
  if (f.tag) where.push(sql`exists (select 1 from unnest(${recordings.tags}) t where lower(t) = lower(${f.tag}))`);
  if (f.uploader) where.push(eq(recordings.uploadedBy, f.uploader));
  if (f.takesReadings) where.push(notInArray(recordings.state, [...STATES_WITHOUT_READINGS]));
  // The title contains the words as typed: LIKE's own wildcards and escape in them are escaped.
  if (f.q) where.push(sql`${recordings.title} ilike ${`%${f.q.replace(/[%_\\]/g, "\\$&")}%`}`);
  return db()
    .select({
      id: recordings.id,
      title: recordings.title,
      tags: recordings.tags,
      state: recordings.state,
      stateReason: recordings.stateReason,
      progress: recordings.progress,
      durationS: recordings.durationS,
      hasPoster: recordings.hasPoster,
      createdAt: recordings.createdAt,
      uploadedBy: recordings.uploadedBy,
      uploaderName: users.name,
      buildNumber: builds.number,
      markCount,
      readingCount,
    })
    .from(recordings)
    .leftJoin(users, eq(users.id, recordings.uploadedBy))
    .leftJoin(builds, eq(builds.id, recordings.buildId))
    .where(where.length ? and(...where) : undefined)
    .orderBy(f.sort === "oldest" ? asc(recordings.createdAt) : desc(recordings.createdAt))
    .limit(200);
}

/** Tags and uploaders that occur, for the library's filters. */
export async function libraryFacets() {
  const tags = await db().execute<{ tag: string; n: number }>(
    sql`select mode() within group (order by t) as tag, count(*)::int as n from ${recordings}, unnest(${recordings.tags}) t group by lower(t) order by n desc, lower(t) limit 60`,
  );
  const uploaders = await db()
    .selectDistinct({ id: users.id, name: users.name })
    .from(recordings)
    .innerJoin(users, eq(users.id, recordings.uploadedBy))
    .orderBy(users.name);
  return { tags: tags.rows, uploaders };
}

export async function getRecording(id: string) {
  if (!/^[0-9a-f-]{36}$/i.test(id)) return null;
  const [row] = await db()
    .select({ r: recordings, uploaderName: users.name, buildNumber: builds.number })
    .from(recordings)
    .leftJoin(users, eq(users.id, recordings.uploadedBy))
    .leftJoin(builds, eq(builds.id, recordings.buildId))
    .where(eq(recordings.id, id));
  return row ? { ...row.r, uploaderName: row.uploaderName, buildNumber: row.buildNumber } : null;
}

export async function listMarks(recordingId: string) {
  return db()
    .select({
      id: marks.id,
      tStart: marks.tStart,
      tEnd: marks.tEnd,
      text: marks.text,
      tags: marks.tags,
      procedureId: marks.procedureId,
      procedureTitle: procedures.title,
      procedureSlug: procedures.slug,
      buildNumber: builds.number,
      createdBy: marks.createdBy,
      authorName: users.name,
      createdAt: marks.createdAt,
    })
    .from(marks)
    .leftJoin(users, eq(users.id, marks.createdBy))
    .leftJoin(procedures, eq(procedures.id, marks.procedureId))
    .leftJoin(builds, eq(builds.id, marks.buildId))
    .where(eq(marks.recordingId, recordingId))
    .orderBy(asc(marks.tStart), asc(marks.createdAt));
}

export async function listReadings(recordingId: string) {
  return db()
    .select({
      id: readings.id,
      quantity: readings.quantity,
      label: readings.label,
      valueSi: readings.valueSi,
      valueEntered: readings.valueEntered,
      valueDecimals: readings.valueDecimals,
      unitEntered: readings.unitEntered,
      conditions: readings.conditions,
      fastener: readings.fastener,
      cylinder: readings.cylinder,
      journal: readings.journal,
      depthM: readings.depthM,
      depthUnit: readings.depthUnit,
      angleDeg: readings.angleDeg,
      t: readings.t,
      createdBy: readings.createdBy,
      authorName: users.name,
      createdAt: readings.createdAt,
    })
    .from(readings)
    .leftJoin(users, eq(users.id, readings.createdBy))
    .where(eq(readings.recordingId, recordingId))
    .orderBy(sql`${readings.t} asc nulls last`, asc(readings.createdAt));
}

export async function procedureChoices() {
  return db()
    .select({ id: procedures.id, title: procedures.title, area: procedures.area })
    .from(procedures)
    .orderBy(procedures.title)
    .limit(500);
}

type MediaFacts = { id: string; state: string; hasRendition: boolean; hasPoster: boolean; hasOriginal: boolean; originalName: string };
/**
 * What the media routes need to know about a recording, from one narrow query by primary key
 * (a fraction of a millisecond; the Range target in `npm run bench -- recordings` is met
 * without remembering it between a player's many range requests).
 */
export async function mediaFacts(id: string): Promise<MediaFacts | null> {
  if (!/^[0-9a-f-]{36}$/i.test(id)) return null;
  const [row] = await db()
    .select({
      id: recordings.id,
      state: recordings.state,
      hasRendition: recordings.hasRendition,
      hasPoster: recordings.hasPoster,
      hasOriginal: recordings.hasOriginal,
      originalName: recordings.originalName,
    })
    .from(recordings)
    .where(eq(recordings.id, id));
  return row ?? null;
}
