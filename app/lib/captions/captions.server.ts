import { and, asc, eq, inArray } from "drizzle-orm";
import { z } from "zod";
import { captionCues, captionEdits, captionSources, recordings, users } from "~/db/schema";
import { audit } from "../audit.server";
import { assertCan, type SessionUser } from "../auth.server";
import { db } from "../db.server";
import { DomainError } from "../domain-error";
import { notFound } from "../edge.server";
import { type CaptionCue, CAPTION_LIMITS, problemLines, readCaptions, toSrt, toWebVtt } from "./format";
import { extractSubtitleTrack, type RunFfmpeg } from "./embedded";
import type { CaptionSource } from "./import";

/**
 * A recording's captions: attaching a file or an embedded track (replacing what was there),
 * listing the cues with their corrections, correcting a cue's words (kept with who and when),
 * and the files served to the player and the export.
 */

async function recordingOr404(request: { url: string }, recordingId: string) {
  const [rec] = await db()
    .select({ id: recordings.id, durationS: recordings.durationS, state: recordings.state })
    .from(recordings)
    .where(eq(recordings.id, recordingId));
  if (!rec) notFound(request, "recording");
  return rec;
}

/** The words of a refused file, one issue per problem, as the API's 422 lists them. */
function refusedFile(problems: string[]): DomainError {
  return new DomainError(
    `The caption file was not attached: ${problems[0]}${problems.length > 1 ? ` (and ${problems.length - 1} more)` : ""}`,
    {
      status: 422,
      field: "file",
      issues: problems.map((message) => ({ path: "file", message })),
    },
  );
}

/**
 * Reads `source`, checks its cues against the recording and stores them in place of any earlier
 * captions (their corrections go with them). `by` is null for a track found during processing.
 */
export async function importCaptions(recordingId: string, durationS: number | null, source: CaptionSource, by: string | null) {
  const text = await source.text();
  const read = readCaptions(source.name, text, durationS);
  if (!read.ok) throw refusedFile(problemLines(read.problems));
  await db().transaction(async (tx) => {
    await tx.delete(captionCues).where(eq(captionCues.recordingId, recordingId));
    const row = { kind: source.kind, name: source.name.slice(0, 200), format: read.format, attachedBy: by, attachedAt: new Date() };
    await tx
      .insert(captionSources)
      .values({ recordingId, ...row })
      .onConflictDoUpdate({ target: captionSources.recordingId, set: row });
    await tx
      .insert(captionCues)
      .values(read.cues.map((c, i) => ({ recordingId, position: i + 1, startS: c.start, endS: c.end, text: c.text })));
    await audit(tx, by, "captions.attach", "recording", recordingId, { kind: source.kind, name: source.name, cues: read.cues.length });
  });
  return { cues: read.cues.length, format: read.format };
}

/** A caption file someone attached (the API's POST, or the upload form's optional file). */
export async function attachCaptionFile(request: Request, user: SessionUser, recordingId: string, file: File) {
  assertCan(request, user, "caption:edit");
  const rec = await recordingOr404(request, recordingId);
  if (file.size > CAPTION_LIMITS.fileBytes) throw refusedFile([`The file is larger than ${CAPTION_LIMITS.fileBytes / 1000} kB.`]);
  return importCaptions(rec.id, rec.durationS, { kind: "file", name: file.name || "captions", text: () => file.text() }, user.id);
}

export type CaptionEditRow = {
  version: number;
  textBefore: string;
  textAfter: string;
  editedBy: string | null;
  editorName: string | null;
  editedAt: Date;
};
export type CaptionCueRow = {
  id: string;
  position: number;
  start: number;
  end: number;
  text: string;
  version: number;
  edits: CaptionEditRow[];
};

/** The recording's cues in order, each with its corrections (oldest first), and where they came from. */
export async function captionsFor(recordingId: string) {
  const [source] = await db()
    .select({
      kind: captionSources.kind,
      name: captionSources.name,
      format: captionSources.format,
      attachedAt: captionSources.attachedAt,
      by: users.name,
    })
    .from(captionSources)
    .leftJoin(users, eq(users.id, captionSources.attachedBy))
    .where(eq(captionSources.recordingId, recordingId));
  const cues = await db()
    .select({
      id: captionCues.id,
      position: captionCues.position,
      start: captionCues.startS,
      end: captionCues.endS,
      text: captionCues.text,
      version: captionCues.version,
    })
    .from(captionCues)
    .where(eq(captionCues.recordingId, recordingId))
    .orderBy(asc(captionCues.position));
  const edits = cues.some((c) => c.version > 1)
    ? await db()
        .select({
          cueId: captionEdits.cueId,
          version: captionEdits.version,
          textBefore: captionEdits.textBefore,
          textAfter: captionEdits.textAfter,
          editedBy: captionEdits.editedBy,
          editorName: users.name,
          editedAt: captionEdits.editedAt,
        })
        .from(captionEdits)
        .leftJoin(users, eq(users.id, captionEdits.editedBy))
        .where(
          inArray(
            captionEdits.cueId,
            cues.filter((c) => c.version > 1).map((c) => c.id),
          ),
        )
        .orderBy(asc(captionEdits.version))
    : [];
  const byCue = new Map<string, typeof edits>();
  for (const e of edits) byCue.set(e.cueId, [...(byCue.get(e.cueId) ?? []), e]);
  return {
    source: source ?? null,
    cues: cues.map((c): CaptionCueRow => ({ ...c, edits: (byCue.get(c.id) ?? []).map(({ cueId: _, ...e }) => e) })),
  };
}

/** A correction: the new words, and the version they correct (another person's correction in between is a 409). */
export const cueCorrectionSchema = z.object({
  text: z
    .string()
    .trim()
    .min(1, "Say what is said, or leave the line as it was.")
    .max(CAPTION_LIMITS.cueChars, `Keep a line under ${CAPTION_LIMITS.cueChars} characters.`),
  version: z.number().int().min(1),
});

/** Corrects one cue's words; the edit is kept with who and when, and search and the player follow. */
export async function correctCue(
  request: Request,
  user: SessionUser,
  recordingId: string,
  cueId: string,
  input: z.infer<typeof cueCorrectionSchema>,
) {
  assertCan(request, user, "caption:edit");
  await recordingOr404(request, recordingId);
  const text = input.text.replace(/\r\n?/g, "\n");
  return db().transaction(async (tx) => {
    const [cue] = await tx
      .select()
      .from(captionCues)
      .where(and(eq(captionCues.id, cueId), eq(captionCues.recordingId, recordingId)))
      .for("update");
    if (!cue) notFound(request, "caption line");
    if (cue.version !== input.version) {
      throw new DomainError("Someone corrected this line while you were editing it. Read their words and correct it again if needed.", {
        field: "text",
        details: { current: { text: cue.text, version: cue.version } },
      });
    }
    if (cue.text === text) return { id: cue.id, text: cue.text, version: cue.version };
    const version = cue.version + 1;
    await tx.update(captionCues).set({ text, version, updatedAt: new Date() }).where(eq(captionCues.id, cue.id));
    await tx.insert(captionEdits).values({ cueId: cue.id, version, textBefore: cue.text, textAfter: text, editedBy: user.id });
    await audit(tx, user.id, "captions.correct", "recording", recordingId, { cue: cue.position, version });
    return { id: cue.id, text, version };
  });
}

/** The stored cues as the file formats want them. */
async function storedCues(recordingId: string): Promise<CaptionCue[]> {
  return db()
    .select({ start: captionCues.startS, end: captionCues.endS, text: captionCues.text })
    .from(captionCues)
    .where(eq(captionCues.recordingId, recordingId))
    .orderBy(asc(captionCues.position));
}

/** The corrected captions as a file: WebVTT (what the player loads) or SRT; a 404 when there are none. */
export async function captionFile(request: Request, recordingId: string, format: "vtt" | "srt", download: boolean) {
  await recordingOr404(request, recordingId);
  const cues = await storedCues(recordingId);
  if (!cues.length) notFound(request, "captions");
  const body = format === "vtt" ? toWebVtt(cues) : toSrt(cues);
  const headers: Record<string, string> = {
    "Content-Type": format === "vtt" ? "text/vtt; charset=utf-8" : "application/x-subrip; charset=utf-8",
    // Corrections change the file at once: never kept by a browser or a proxy.
    "Cache-Control": "private, no-store",
  };
  if (download) headers["Content-Disposition"] = `attachment; filename="captions-${recordingId.slice(0, 8)}.${format}"`;
  return new Response(body, { headers });
}

/**
 * During processing: a subtitle track inside the video becomes the recording's captions, unless
 * someone has already attached a file (theirs is kept). A track whose cues the checks refuse is
 * left out with a line in the worker's log; the recording is ready all the same.
 */
export async function attachEmbeddedCaptions(
  recordingId: string,
  src: string,
  durationS: number | null,
  codec: string,
  runFfmpeg: RunFfmpeg,
) {
  const [had] = await db()
    .select({ id: captionSources.recordingId })
    .from(captionSources)
    .where(eq(captionSources.recordingId, recordingId));
  if (had) return;
  const vtt = await extractSubtitleTrack(src, runFfmpeg);
  if (!vtt) return;
  try {
    await importCaptions(
      recordingId,
      durationS,
      { kind: "embedded", name: `Subtitle track in the video (${codec}).vtt`, text: async () => vtt },
      null,
    );
  } catch (err) {
    if (!(err instanceof DomainError)) throw err;
    console.warn(`[captions] ${recordingId}: the video's subtitle track was not attached: ${err.message}`);
  }
}
