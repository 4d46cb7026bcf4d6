/**
 * Photos taken during a run (a gauge's dial, a wrench's display), kept in the upload folder
 * beside the recordings (`uploadRoot()/run-photos/<run>/<photo>`). What a photo is comes from
 * its bytes (file-type), never from its name or the browser's word: only pictures a browser
 * shows are kept, and only up to MAX_PHOTO_BYTES.
 */
import { createReadStream } from "node:fs";
import { mkdir, readFile, rm, stat, writeFile } from "node:fs/promises";
import path from "node:path";
import { Readable } from "node:stream";
import { and, eq } from "drizzle-orm";
import { fileTypeFromBuffer } from "file-type";
import { procedureSpecs, runPhotos, runs } from "~/db/schema";
import { audit } from "~/lib/audit.server";
import { db } from "~/lib/db.server";
import { DomainError } from "~/lib/domain-error";
import { uploadRoot } from "~/lib/recordings/storage.server";
import { photosForBuild, type RunPhoto } from "./runs.server";

/** A phone or tablet camera's full-size JPEG is 2–8 MB. */
export const MAX_PHOTO_BYTES = 12 * 1024 * 1024;
const KINDS: Record<string, string> = { "image/jpeg": "jpg", "image/png": "png", "image/webp": "webp" };

const photoPath = (runId: string, id: string, ext: string) => path.join(uploadRoot(), "run-photos", runId, `${id}.${ext}`);

export async function savePhoto(actor: { id: string }, runId: string, specKey: string, file: File) {
  if (file.size === 0) throw new DomainError("The photo is empty; take it again.", { status: 422, field: "photo" });
  if (file.size > MAX_PHOTO_BYTES)
    throw new DomainError(`A photo may be up to ${MAX_PHOTO_BYTES / 1024 / 1024} MB.`, { status: 413, field: "photo" });
  const bytes = new Uint8Array(await file.arrayBuffer());
  const type = await fileTypeFromBuffer(bytes);
  const ext = type && KINDS[type.mime];
  if (!type || !ext)
    throw new DomainError("That file is not a photo Benchreel keeps (JPEG, PNG or WebP).", { status: 415, field: "photo" });
  return db().transaction(async (tx) => {
    const [run] = await tx.select().from(runs).where(eq(runs.id, runId)).for("update");
    if (!run) throw new DomainError("There is no such run.", { status: 404 });
    if (run.status !== "open") throw new DomainError("This run is closed; photos can no longer be added.", { field: "photo" });
    const [spec] = await tx
      .select({ id: procedureSpecs.id })
      .from(procedureSpecs)
      .where(and(eq(procedureSpecs.revisionId, run.revisionId), eq(procedureSpecs.specKey, specKey)));
    if (!spec) throw new DomainError("The revision this run follows has no such spec.", { status: 422, field: "specKey" });
    const [row] = await tx
      .insert(runPhotos)
      .values({ runId, specId: spec.id, specKey, mime: type.mime, bytes: bytes.byteLength, takenBy: actor.id })
      .returning({ id: runPhotos.id });
    const file = photoPath(runId, row.id, ext);
    await mkdir(path.dirname(file), { recursive: true });
    try {
      await writeFile(file, bytes);
      await audit(tx, actor.id, "photo", "run", runId, { photoId: row.id, specKey, bytes: bytes.byteLength });
    } catch (err) {
      await rm(file, { force: true });
      throw err;
    }
    return { id: row.id, url: `/api/runs/${runId}/photos/${row.id}` };
  });
}

/** The photo's bytes as a response body, or null when the run has no such photo. */
export async function photoResponse(runId: string, photoId: string): Promise<Response | null> {
  const [p] = await db()
    .select()
    .from(runPhotos)
    .where(and(eq(runPhotos.id, photoId), eq(runPhotos.runId, runId)));
  if (!p) return null;
  const file = photoPath(runId, p.id, KINDS[p.mime] ?? "bin");
  const size = await stat(file).then(
    (s) => s.size,
    () => null,
  );
  if (size == null) return null;
  return new Response(Readable.toWeb(createReadStream(file)) as ReadableStream, {
    headers: {
      "Content-Type": p.mime,
      "Content-Length": String(size),
      "Cache-Control": "private, max-age=86400, immutable",
      "X-Content-Type-Options": "nosniff",
    },
  });
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
      const data = await readFile(photoPath(p.runId, p.id, KINDS[p.mime])).catch(() => null);
      return { ...p, data };
    }),
  );
}
