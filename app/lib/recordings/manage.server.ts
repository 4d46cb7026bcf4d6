/**
 * What a recording's page changes about the recording itself: its details, processing it again,
 * deleting it. Each change is written with its audit entry in one transaction. Who may do which
 * is the route's check (app/lib/permissions.ts); these functions do the work.
 */
import { eq } from "drizzle-orm";
import { rm } from "node:fs/promises";
import { z } from "zod";
import { recordings } from "~/db/schema";
import { audit } from "../audit.server";
import { db } from "../db.server";
import { DomainError } from "../domain-error";
import { normalizeTags } from "../tags";
import { retryRecording } from "./processing.server";
import { recordingDir } from "./storage.server";
import { placementOf, removePlaced } from "../storage/recordings.server";

/** The "Edit details" form; tags are typed as a comma list and kept as the shop's tags (app/lib/tags.ts). */
export const recordingDetailsSchema = z.object({
  title: z.string().trim().min(1, "Give the recording a title.").max(200, "Keep the title under 200 characters."),
  description: z.string().trim().max(4000, "Keep the description under 4000 characters.").default(""),
  tags: z
    .string()
    .max(600)
    .default("")
    .transform((s) => normalizeTags(s)),
});

export type RecordingDetails = z.infer<typeof recordingDetailsSchema>;

export async function saveRecordingDetails(actorId: string, recordingId: string, details: RecordingDetails): Promise<void> {
  await db().transaction(async (tx) => {
    await tx
      .update(recordings)
      .set({ ...details, updatedAt: new Date() })
      .where(eq(recordings.id, recordingId));
    await audit(tx, actorId, "recording.edit", "recording", recordingId, { title: details.title });
  });
}

/** Processing again from the kept original; a rejected recording has none left (409). */
export async function retryProcessing(actorId: string, rec: { id: string; state: string; hasOriginal: boolean }): Promise<void> {
  if (rec.state === "rejected" || !rec.hasOriginal)
    throw new DomainError("A rejected recording has no file left to process; upload it again.");
  await retryRecording(rec.id);
  await db().transaction((tx) => audit(tx, actorId, "recording.retry", "recording", rec.id, {}));
}

/**
 * The recording goes with its marks and readings (the database cascades), then its files: a
 * failure to remove them leaves files no row names, never a row whose files are gone.
 */
export async function deleteRecording(actorId: string, rec: { id: string; title: string }): Promise<void> {
  // Where its bytes are is read before the row (and its placement, by cascade) goes.
  const where = await placementOf(rec.id);
  await db().transaction(async (tx) => {
    await tx.delete(recordings).where(eq(recordings.id, rec.id));
    await audit(tx, actorId, "recording.delete", "recording", rec.id, { title: rec.title });
  });
  await rm(recordingDir(rec.id), { recursive: true, force: true });
  await removePlaced(rec.id, where);
}
