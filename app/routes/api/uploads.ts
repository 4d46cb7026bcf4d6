import { z } from "zod";
import type { Route } from "./+types/uploads";
import { requirePermission, type SessionUser } from "~/lib/auth.server";
import { invalidInput } from "~/lib/edge.server";
import { discardUpload, handleTus, unfinishedUploads, uploadIdFrom } from "~/lib/recordings/tus.server";
import { assertMayHandleUpload, uploadStatus } from "~/lib/recordings/uploads.server";

/**
 * /api/uploads and /api/uploads/:id — the tus endpoint (OPTIONS/HEAD via the loader,
 * POST/PATCH/DELETE via the action), guarded on every request: a session, the
 * recording:upload capability, and for an existing upload, being the one who started it.
 * OPTIONS alone is open: it tells a client what the server supports, nothing about anyone.
 * A plain GET answers JSON about the caller's uploads (never tus's download, see docs/platform-notes.md).
 */
async function guard(request: Request): Promise<{ user: SessionUser; uploadId: string | null }> {
  const user = await requirePermission(request, "recording:upload");
  const uploadId = uploadIdFrom(new URL(request.url).pathname);
  if (uploadId) await assertMayHandleUpload(request, user, uploadId);
  return { user, uploadId };
}

/** ?fileName=…&size=…&lastModified=…&sample=…: the caller's unfinished uploads of that file (to continue it from any browser). */
const fileQuery = z.object({
  fileName: z
    .string()
    .min(1)
    .max(255)
    .refine((s) => !s.includes("\u0000"), "The file name cannot contain NUL.")
    .optional(),
  size: z.coerce.number().int("The size is a whole number of bytes.").min(1).max(Number.MAX_SAFE_INTEGER).optional(),
  // What tells two files of the same name and size apart (app/lib/recordings/file-fingerprint.ts).
  lastModified: z
    .string()
    .regex(/^\d{1,16}$/, "lastModified is the file's time in milliseconds.")
    .optional(),
  sample: z
    .string()
    .regex(/^[0-9a-f]{64}$/, "sample is a SHA-256 in hex.")
    .optional(),
});

export async function loader({ request }: Route.LoaderArgs) {
  if (request.method === "OPTIONS") return handleTus(request, null);
  const { user, uploadId } = await guard(request);
  if (request.method !== "GET") return handleTus(request, user);
  if (uploadId) {
    const upload = await uploadStatus(uploadId);
    if (!upload) return Response.json({ error: "not found" }, { status: 404 });
    return Response.json({ upload });
  }
  const query = fileQuery.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  if (!query.success) return invalidInput(request, query.error);
  const { fileName, size, lastModified, sample } = query.data;
  const file = fileName != null && size != null ? { fileName, size, lastModified, sample } : undefined;
  return Response.json({ unfinished: await unfinishedUploads(user.id, file) });
}

export async function action({ request }: Route.ActionArgs) {
  const { user, uploadId } = await guard(request);
  const res = await handleTus(request, user);
  if (request.method === "DELETE" && uploadId && res.status === 204) await discardUpload(uploadId);
  return res;
}
