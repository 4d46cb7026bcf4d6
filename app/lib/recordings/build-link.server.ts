/**
 * Attaching recordings and marks to a build (issue 16): chosen by the build's number, never
 * typed as text in a title. Every change of a recording's or a mark's build is a build event on
 * the timeline of the build it left ("detached") and of the one it joined ("attached"), with an
 * audit entry, in the change's transaction. A new mark takes its recording's build unless its
 * writer chose another or none; it shows on the timeline as "Marked …" (read from the marks
 * table), so it writes no event of its own. Who may do which is the caller's check.
 */
import { and, desc, eq, isNull, ne } from "drizzle-orm";
import { builds, marks, recordings } from "~/db/schema";
import { audit } from "../audit.server";
import { addBuildEvent } from "../builds/write.server";
import { type DbOrTx, db } from "../db.server";
import { DomainError } from "../domain-error";

type Linked = { id: string; number: string } | null;

/** The build a number names; null for none; an unknown number is a 422 on `field`. */
export async function resolveBuild(number: string | null | undefined, h: DbOrTx = db(), field = "buildNumber"): Promise<Linked> {
  if (!number) return null;
  const [b] = await h.select({ id: builds.id, number: builds.number }).from(builds).where(eq(builds.number, number.toUpperCase()));
  if (!b)
    throw new DomainError(`No build has the work order ${number}: choose one from the list, or open the build first.`, {
      status: 422,
      field,
      issues: [{ path: field, message: `No build has the work order ${number}.` }],
    });
  return b;
}

async function numberOf(h: DbOrTx, buildId: string | null): Promise<string | null> {
  if (!buildId) return null;
  const [b] = await h.select({ number: builds.number }).from(builds).where(eq(builds.id, buildId));
  return b?.number ?? null;
}

/** The timeline's and the audit's record of one move of a recording or a mark between builds. */
async function recordMove(
  h: DbOrTx,
  actorId: string,
  what: { kind: "recording" | "mark"; id: string; recordingId: string; title: string; t?: number },
  from: string | null,
  to: Linked,
) {
  const detail = { what: what.kind, id: what.id, recordingId: what.recordingId, title: what.title.slice(0, 200), t: what.t ?? null };
  if (from) await addBuildEvent(h, from, actorId, "detached", { ...detail, to: to?.number ?? null });
  if (to) await addBuildEvent(h, to.id, actorId, "attached", { ...detail, from: await numberOf(h, from) });
  await audit(h, actorId, `${what.kind}.build`, what.kind, what.id, { from: await numberOf(h, from), to: to?.number ?? null });
}

/**
 * Puts a recording on the build `number` names (null: on none). Answers whether it changed;
 * the same build again changes nothing and writes no event.
 */
export async function setRecordingBuild(actorId: string, recordingId: string, number: string | null): Promise<boolean> {
  return db().transaction(async (tx) => {
    const [rec] = await tx
      .select({ id: recordings.id, title: recordings.title, buildId: recordings.buildId })
      .from(recordings)
      .where(eq(recordings.id, recordingId))
      .for("update");
    if (!rec) throw new DomainError("That recording does not exist.", { status: 404 });
    const to = await resolveBuild(number, tx);
    if ((to?.id ?? null) === rec.buildId) return false;
    await tx
      .update(recordings)
      .set({ buildId: to?.id ?? null, updatedAt: new Date() })
      .where(eq(recordings.id, rec.id));
    await recordMove(tx, actorId, { kind: "recording", id: rec.id, recordingId: rec.id, title: rec.title }, rec.buildId, to);
    return true;
  });
}

/** A recording's build from the build page: only a recording on no build may be attached there. */
export async function attachRecordingToBuild(actorId: string, buildNumber: string, recordingId: string): Promise<{ title: string }> {
  const [rec] = await db()
    .select({ title: recordings.title, buildId: recordings.buildId })
    .from(recordings)
    .where(eq(recordings.id, recordingId));
  if (!rec) throw new DomainError("That recording does not exist.", { status: 404, field: "recordingId" });
  if (rec.buildId) {
    const on = await numberOf(db(), rec.buildId);
    if (on !== buildNumber)
      throw new DomainError(`“${rec.title}” is on build ${on}; change it on the recording's page.`, { status: 409, field: "recordingId" });
  }
  await setRecordingBuild(actorId, recordingId, buildNumber);
  return rec;
}

/** Takes a recording off this build (the build page's Detach); one on another build is refused. */
export async function detachRecordingFromBuild(actorId: string, buildId: string, recordingId: string): Promise<{ title: string }> {
  const [rec] = await db()
    .select({ title: recordings.title })
    .from(recordings)
    .where(and(eq(recordings.id, recordingId), eq(recordings.buildId, buildId)));
  if (!rec) throw new DomainError("That recording is not on this build.", { status: 409 });
  await setRecordingBuild(actorId, recordingId, null);
  return rec;
}

/** Takes a mark off this build (the build page's Detach). */
export async function detachMarkFromBuild(actorId: string, buildId: string, markId: string): Promise<{ text: string }> {
  const [m] = await db()
    .select({ text: marks.text })
    .from(marks)
    .where(and(eq(marks.id, markId), eq(marks.buildId, buildId)));
  if (!m) throw new DomainError("That mark is not on this build.", { status: 409 });
  await db().transaction((tx) => moveMark(tx, actorId, markId, null));
  return m;
}

/** The build a new mark goes on: the one chosen, none, or (not said) its recording's. */
export async function newMarkBuildId(h: DbOrTx, recordingId: string, number: string | null | undefined): Promise<string | null> {
  if (number !== undefined) return (await resolveBuild(number, h))?.id ?? null;
  const [rec] = await h.select({ buildId: recordings.buildId }).from(recordings).where(eq(recordings.id, recordingId));
  return rec?.buildId ?? null;
}

/** Moves a mark to the build `to` (resolved), with the events; nothing when it is already there. */
export async function moveMark(h: DbOrTx, actorId: string, markId: string, to: Linked): Promise<void> {
  const [m] = await h
    .select({ id: marks.id, recordingId: marks.recordingId, text: marks.text, tStart: marks.tStart, buildId: marks.buildId })
    .from(marks)
    .where(eq(marks.id, markId))
    .for("update");
  if (!m || (to?.id ?? null) === m.buildId) return;
  await h
    .update(marks)
    .set({ buildId: to?.id ?? null, updatedAt: new Date() })
    .where(eq(marks.id, markId));
  await recordMove(h, actorId, { kind: "mark", id: m.id, recordingId: m.recordingId, title: m.text, t: m.tStart }, m.buildId, to);
}

/**
 * Recordings the build page offers to attach: the most recent that are on no build and not
 * refused at upload, newest first.
 */
export async function unattachedRecordings(limit = 40) {
  return db()
    .select({ id: recordings.id, title: recordings.title, createdAt: recordings.createdAt })
    .from(recordings)
    .where(and(isNull(recordings.buildId), ne(recordings.state, "rejected")))
    .orderBy(desc(recordings.createdAt))
    .limit(limit);
}
