/**
 * Photos taken during a run (a gauge's dial, a wrench's display), kept through the store
 * interface beside the recordings (`run-photos/<run>/<photo>` in the object store when one is
 * configured, else under the upload folder: app/lib/storage/photos.server.ts). What a photo is comes from
 * its bytes (file-type), never from its name or the browser's word: only pictures a browser
 * shows are kept, and only up to MAX_PHOTO_BYTES.
 */
import { and, eq } from "drizzle-orm";
import { fileTypeFromBuffer } from "file-type";
import { runPhotos } from "~/db/schema";
import { audit } from "~/lib/audit.server";
import { db } from "~/lib/db.server";
import { DomainError } from "~/lib/domain-error";
import { dropPhoto, keepPhoto, photoBytes, photoKey, servePhoto } from "~/lib/storage/photos.server";
import type { Place } from "./entries";
import { photosForBuild, photoTarget, type RunPhoto } from "./runs.server";

/** A phone or tablet camera's full-size JPEG is 2–8 MB. */
export const MAX_PHOTO_BYTES = 12 * 1024 * 1024;
const KINDS: Record<string, string> = { "image/jpeg": "jpg", "image/png": "png", "image/webp": "webp" };

/** Keeps a photo for a spec (at its place, for a per-cylinder, journal or stud spec); `sent.key` makes a resend a no-op. */
export async function savePhoto(
  actor: { id: string },
  runId: string,
  specKey: string,
  file: File,
  sent: { key?: string | null; position?: Place } = {},
) {
  if (file.size === 0) throw new DomainError("The photo is empty; take it again.", { status: 422, field: "photo" });
  if (file.size > MAX_PHOTO_BYTES)
    throw new DomainError(`A photo may be up to ${MAX_PHOTO_BYTES / 1024 / 1024} MB.`, { status: 413, field: "photo" });
  const bytes = new Uint8Array(await file.arrayBuffer());
  const type = await fileTypeFromBuffer(bytes);
  const ext = type && KINDS[type.mime];
  if (!type || !ext)
    throw new DomainError("That file is not a photo Benchreel keeps (JPEG, PNG or WebP).", { status: 415, field: "photo" });
  return db().transaction(async (tx) => {
    const target = await photoTarget(tx, runId, specKey, sent);
    if (target.earlier) return target.earlier;
    const [row] = await tx
      .insert(runPhotos)
      .values({
        runId,
        specId: target.spec.id,
        specKey,
        ...target.place,
        idempotencyKey: sent.key ?? null,
        mime: type.mime,
        bytes: bytes.byteLength,
        takenBy: actor.id,
      })
      .returning({ id: runPhotos.id });
    const key = photoKey(runId, row.id, ext);
    try {
      await keepPhoto(key, bytes);
      await audit(tx, actor.id, "photo", "run", runId, { photoId: row.id, specKey, bytes: bytes.byteLength });
    } catch (err) {
      await dropPhoto(key).catch(() => {});
      throw err;
    }
    return { id: row.id, url: `/api/runs/${runId}/photos/${row.id}`, duplicate: false };
  });
}

/** The photo's bytes as the answer to the request, or null when the run has no such photo. */
export async function photoResponse(request: Request, runId: string, photoId: string): Promise<Response | null> {
  const [p] = await db()
    .select()
    .from(runPhotos)
    .where(and(eq(runPhotos.id, photoId), eq(runPhotos.runId, runId)));
  if (!p) return null;
  return servePhoto(request, photoKey(runId, p.id, KINDS[p.mime] ?? "bin"), p.mime);
}

/** A photo on the build sheet's PDF, with its bytes when the PDF can draw it (JPEG and PNG). */
export type SheetPhoto = RunPhoto & { data: Buffer | null };

/**
 * Every photo of a build's runs for its sheet's PDF. The PDF draws JPEG and PNG; a WebP photo is
 * listed without its picture (the build page and the print view show it). A photo whose file is
 * gone is listed too, without its picture, rather than failing the sheet.
 */
export async function sheetPhotos(buildId: string): Promise<SheetPhoto[]> {
  const photos = await photosForBuild(buildId);
  return Promise.all(
    photos.map(async (p) => {
      if (p.mime !== "image/jpeg" && p.mime !== "image/png") return { ...p, data: null };
      const data = await photoBytes(photoKey(p.runId, p.id, KINDS[p.mime])).catch(() => null);
      return { ...p, data };
    }),
  );
}
