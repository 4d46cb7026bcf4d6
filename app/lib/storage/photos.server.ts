import type { Readable } from "node:stream";
import { serveObject } from "../recordings/media.server";
import { type Backend, configuredBackend, storeOf } from "./recordings.server";
import type { ObjectStore } from "./store.server";

/**
 * Run photos (issue 16) through the store interface, so that with object storage any instance
 * serves a photo another took in: a new photo goes to the configured store (STORAGE_URL, else
 * the folder), under `run-photos/<run>/<photo>.<ext>`. A photo taken before the shop moved to
 * object storage stays in the folder until `npm run storage:migrate` has copied it (checksum
 * verified), so a photo is looked for in the configured store first, then in the folder: no
 * row says where a photo is, and none is needed, since a photo never changes once taken.
 */
export const PHOTO_PREFIX = "run-photos/";

export function photoKey(runId: string, photoId: string, ext: string): string {
  return `${PHOTO_PREFIX}${runId}/${photoId}.${ext}`;
}

/** Writes a new photo into the configured store. */
export async function keepPhoto(key: string, bytes: Uint8Array): Promise<void> {
  await storeOf(configuredBackend()).put(key, bytes);
}

/** Removes a photo whose row was not kept (the transaction that took it failed). */
export async function dropPhoto(key: string): Promise<void> {
  await storeOf(configuredBackend()).remove(key);
}

/** The store holding the photo: the configured one, else the folder it was taken into before a move. */
async function photoStore(key: string): Promise<ObjectStore | null> {
  const order: Backend[] = configuredBackend() === "s3" ? ["s3", "folder"] : ["folder"];
  for (const backend of order) {
    const store = storeOf(backend);
    if (await store.head(key)) return store;
  }
  return null;
}

/**
 * The photo as the answer to a request that has passed its permission check: proxied from the
 * store like a recording's media (decision 013: no presigned address outlives the person's
 * right to see it), with its ETag, conditional requests and Range. Null when it is not stored.
 */
export async function servePhoto(request: Request, key: string, mime: string): Promise<Response | null> {
  const store = await photoStore(key);
  if (!store) return null;
  const res = await serveObject(request, store, key, { contentType: mime, cacheSeconds: 86_400 });
  res.headers.set("X-Content-Type-Options", "nosniff");
  return res;
}

/**
 * Where a run's photo is stored and how large it is, found by its ids alone (the restore check
 * reads rows, not the app's mime table): the key under the run that names the photo, in the
 * configured store, else the folder. Null when neither holds it.
 */
export async function storedPhoto(runId: string, photoId: string): Promise<{ key: string; size: number } | null> {
  const order: Backend[] = configuredBackend() === "s3" ? ["s3", "folder"] : ["folder"];
  const prefix = `${PHOTO_PREFIX}${runId}/`;
  for (const backend of order) {
    const store = storeOf(backend);
    const key = (await store.list(prefix)).find((k) => k.startsWith(`${prefix}${photoId}.`) && !k.endsWith(".tmp"));
    const info = key ? await store.head(key) : null;
    if (key && info) return { key, size: info.size };
  }
  return null;
}

async function bytesOf(stream: Readable): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}

/** A photo's bytes (for the build sheet's PDF), or null when it is not stored. */
export async function photoBytes(key: string): Promise<Buffer | null> {
  const store = await photoStore(key);
  return store ? bytesOf(await store.read(key)) : null;
}
