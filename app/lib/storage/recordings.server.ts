import { randomBytes } from "node:crypto";
import fs from "node:fs/promises";
import path from "node:path";
import { eq } from "drizzle-orm";
import { recordingStorage } from "~/db/schema";
import { type DbOrTx, db } from "../db.server";
import { env } from "../env.server";
import { originalPath, recordingDir, uploadRoot } from "../recordings/storage.server";
import { storeConfigFrom } from "./config";
import { folderStore, type ObjectStore, s3Store } from "./store.server";

/**
 * Which store a recording's bytes are in, and under which keys. New recordings go to the
 * configured store (STORAGE_URL, else the folder); a recording keeps the store it was put in
 * until `npm run storage:migrate` moves it (its row in recording_storage says where; no row
 * means the folder, where every recording was before object storage).
 */
export type Backend = "folder" | "s3";
export type Placement = { backend: Backend; store: ObjectStore; original: string; rendition: string; poster: string };

const g = globalThis as unknown as { __benchreelStores?: Partial<Record<Backend, ObjectStore>> };

/** The configured store for new recordings and uploads (one per process). */
export function configuredBackend(): Backend {
  const c = storeConfigFrom(env());
  return typeof c !== "string" && c.kind === "s3" ? "s3" : "folder";
}

export function storeOf(backend: Backend): ObjectStore {
  g.__benchreelStores ??= {};
  const made = g.__benchreelStores[backend];
  if (made) return made;
  let store: ObjectStore;
  if (backend === "folder") store = folderStore(uploadRoot());
  else {
    const c = storeConfigFrom(env());
    if (typeof c === "string" || c.kind !== "s3") throw new Error("a recording is in object storage, but STORAGE_URL names none");
    store = s3Store(c);
  }
  g.__benchreelStores[backend] = store;
  return store;
}

export const recordingKeys = (id: string) => ({
  original: `recordings/${id}/original`,
  rendition: `recordings/${id}/web.mp4`,
  poster: `recordings/${id}/poster.jpg`,
});

export async function placementOf(id: string): Promise<Placement> {
  const [row] = await db().select().from(recordingStorage).where(eq(recordingStorage.recordingId, id));
  const backend: Backend = row?.backend === "s3" ? "s3" : "folder";
  const keys = recordingKeys(id);
  return { backend, store: storeOf(backend), ...keys, original: row?.originalKey ?? keys.original };
}

/** Says where a new recording's original is, when that is not the folder's usual place. */
export async function placeRecording(
  id: string,
  backend: Backend,
  originalKey: string,
  movedAt: Date | null = null,
  tx: DbOrTx = db(),
): Promise<void> {
  await tx
    .insert(recordingStorage)
    .values({ recordingId: id, backend, originalKey, movedAt })
    .onConflictDoUpdate({ target: recordingStorage.recordingId, set: { backend, originalKey, movedAt } });
}

/**
 * The worker works on local files (ffmpeg, ffprobe): for a recording in object storage its
 * original is streamed into the recording's scratch folder first. True when it is there.
 */
export async function fetchOriginal(id: string): Promise<boolean> {
  const where = await placementOf(id);
  if (where.backend === "folder") return true;
  const local = originalPath(id);
  if (
    await fs.stat(local).then(
      (s) => s.isFile(),
      () => false,
    )
  )
    return true;
  if (!(await where.store.head(where.original))) return false;
  await where.store.getFile(where.original, local);
  return true;
}

/**
 * Runs `work` on a local file of the recording's original: the folder's own file, or, for a
 * recording in object storage, a private copy streamed into the worker's scratch space
 * (`UPLOAD_DIR/scratch/<random>/original`) and removed when `work` ends, however it ends. Private,
 * so a job working beside the processing job (the decode check after "Ready") never reads a
 * copy that the other removes. Null when the store holds no original.
 */
export async function withOriginalFile<T>(id: string, work: (file: string) => Promise<T>): Promise<T | null> {
  const where = await placementOf(id);
  if (where.backend === "folder") return work(originalPath(id));
  if (!(await where.store.head(where.original))) return null;
  const dir = path.join(uploadRoot(), "scratch", randomBytes(8).toString("hex"));
  try {
    const file = path.join(dir, "original");
    await where.store.getFile(where.original, file);
    return await work(file);
  } finally {
    await fs.rm(dir, { recursive: true, force: true });
  }
}

/** A finished output (web.mp4, poster.jpg) of the scratch folder copied to the recording's store. */
export async function publishOutput(id: string, name: "web.mp4" | "poster.jpg"): Promise<void> {
  const where = await placementOf(id);
  if (where.backend === "folder") return;
  await where.store.putFile(name === "web.mp4" ? where.rendition : where.poster, path.join(recordingDir(id), name));
}

/** The scratch copy of a recording kept in object storage, dropped once the worker is done with it. */
export async function dropScratch(id: string): Promise<void> {
  if ((await placementOf(id)).backend === "folder") return;
  await fs.rm(recordingDir(id), { recursive: true, force: true });
}

/** Every byte of a recording: its objects in the store (the folder's are removed by the caller, as before). */
export async function removeStored(id: string): Promise<void> {
  await removePlaced(id, await placementOf(id));
}

export async function removePlaced(id: string, where: Placement): Promise<void> {
  if (where.backend === "folder") return;
  await where.store.removePrefix(`recordings/${id}/`);
  if (!where.original.startsWith(`recordings/${id}/`)) await where.store.remove(where.original);
}
