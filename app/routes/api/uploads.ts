import { and, desc, eq, isNull } from "drizzle-orm";
import type { Route } from "./+types/uploads";
import { recordings, uploads } from "~/db/schema";
import { forbidden, requirePermission, type SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { discardUpload, handleTus, receivedBytes, uploadIdFrom } from "~/lib/recordings/tus.server";

/**
 * /api/uploads and /api/uploads/:id — the tus endpoint (OPTIONS/HEAD via the loader,
 * POST/PATCH/DELETE via the action), guarded on every request: a session, the
 * recording:upload capability, and for an existing upload, being the one who started it.
 * A plain GET answers JSON about the caller's uploads (never tus's download, see STACK.md).
 */
async function guard(request: Request): Promise<{ user: SessionUser; uploadId: string | null }> {
  const user = await requirePermission(request, "recording:upload");
  const uploadId = uploadIdFrom(new URL(request.url).pathname);
  if (uploadId) {
    const [row] = await db().select({ userId: uploads.userId }).from(uploads).where(eq(uploads.id, uploadId));
    if (row && row.userId !== user.id && user.role !== "admin") forbidden(request, "This upload was started by someone else.");
  }
  return { user, uploadId };
}

export async function loader({ request }: Route.LoaderArgs) {
  const { user, uploadId } = await guard(request);
  if (request.method !== "GET") return handleTus(request, user);
  if (uploadId) {
    const [row] = await db()
      .select({ id: uploads.id, fileName: uploads.fileName, size: uploads.size, title: uploads.title, recordingId: uploads.recordingId, createdAt: uploads.createdAt, state: recordings.state, stateReason: recordings.stateReason, progress: recordings.progress })
      .from(uploads)
      .leftJoin(recordings, eq(recordings.id, uploads.recordingId))
      .where(eq(uploads.id, uploadId));
    if (!row) return Response.json({ error: "not found" }, { status: 404 });
    return Response.json({ upload: { ...row, received: row.recordingId ? row.size : await receivedBytes(row.id) } });
  }
  const rows = await db()
    .select({ id: uploads.id, fileName: uploads.fileName, size: uploads.size, title: uploads.title, createdAt: uploads.createdAt })
    .from(uploads)
    .where(and(eq(uploads.userId, user.id), isNull(uploads.recordingId)))
    .orderBy(desc(uploads.createdAt))
    .limit(50);
  const unfinished = await Promise.all(rows.map(async (r) => ({ ...r, received: await receivedBytes(r.id) })));
  return Response.json({ unfinished });
}

export async function action({ request }: Route.ActionArgs) {
  const { user, uploadId } = await guard(request);
  const res = await handleTus(request, user);
  if (request.method === "DELETE" && uploadId && res.status === 204) await discardUpload(uploadId);
  return res;
}
