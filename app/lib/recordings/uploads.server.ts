/**
 * Unfinished uploads as their people see them, beside the tus server (tus.server.ts): who may
 * go on with one (its starter; an admin any, app/lib/permissions.ts), what one has received,
 * and discarding one from the upload page.
 */
import { and, eq, isNull } from "drizzle-orm";
import { recordings, uploads } from "~/db/schema";
import { forbidden, type SessionUser } from "../auth.server";
import { db } from "../db.server";
import { DomainError } from "../domain-error";
import { canOnOwned } from "../permissions";
import { discardUpload, receivedBytes } from "./tus.server";

/** Someone else's upload is refused (403) unless the person may handle anyone's; an unknown id is tus's 404. */
export async function assertMayHandleUpload(request: Request, user: SessionUser, uploadId: string): Promise<void> {
  const [row] = await db().select({ userId: uploads.userId }).from(uploads).where(eq(uploads.id, uploadId));
  if (row && !canOnOwned(user, "upload:manage", row.userId)) forbidden(request, "This upload was started by someone else.");
}

/** An upload as its client follows it: the bytes received, and once finished its recording's state. */
export async function uploadStatus(uploadId: string) {
  const [row] = await db()
    .select({
      id: uploads.id,
      fileName: uploads.fileName,
      size: uploads.size,
      title: uploads.title,
      recordingId: uploads.recordingId,
      createdAt: uploads.createdAt,
      state: recordings.state,
      stateReason: recordings.stateReason,
      progress: recordings.progress,
    })
    .from(uploads)
    .leftJoin(recordings, eq(recordings.id, uploads.recordingId))
    .where(eq(uploads.id, uploadId));
  if (!row) return null;
  return { ...row, received: row.recordingId ? row.size : await receivedBytes(row.id) };
}

/**
 * The upload page's "Discard": an unfinished upload of the person's own (an admin's: anyone's).
 * A finished, discarded or someone else's upload gets the same answer, so no one learns of others' files.
 */
export async function discardUnfinishedUpload(user: SessionUser, uploadId: string): Promise<{ fileName: string }> {
  const [row] = await db()
    .select({ userId: uploads.userId, fileName: uploads.fileName })
    .from(uploads)
    .where(and(eq(uploads.id, uploadId), isNull(uploads.recordingId)));
  if (!row || !canOnOwned(user, "upload:manage", row.userId))
    throw new DomainError("That unfinished upload is gone or not yours.", { status: 404 });
  await discardUpload(uploadId);
  return { fileName: row.fileName };
}
