// `npm run storage:migrate`: moves a shop's recordings from the local folder (UPLOAD_DIR) into
// the object store named by STORAGE_URL (or the S3 variables). For each recording still in the
// folder: every file it has (original, browser copy, poster) is copied to the store, unless the
// store already holds the same bytes; each object's SHA-256 is read back from the store and
// compared with the file's; only when all agree is the recording switched over (its row in
// recording_storage). Interrupted, it is run again: switched recordings are skipped, and an
// object already there with the right checksum is not copied twice. The local files are left
// in place (remove them after a backup); `--dry-run` only says what it would do.
// Run photos (`run-photos/…`) are copied the same way, checksum read back; no row switches for
// them: an instance on the store looks for a photo there first, then in the folder.
import path from "node:path";
import { eq, isNull, or } from "drizzle-orm";
import { recordingStorage, recordings } from "../app/db/schema";
import { db, pool } from "../app/lib/db.server";
import { env } from "../app/lib/env.server";
import { configuredBackend, placeRecording, recordingKeys, storeOf } from "../app/lib/storage/recordings.server";
import { PHOTO_PREFIX } from "../app/lib/storage/photos.server";
import { sha256Of } from "../app/lib/storage/store.server";

const dryRun = process.argv.includes("--dry-run");
env();
if (configuredBackend() !== "s3") {
  console.error("[storage:migrate] STORAGE_URL (or S3_BUCKET with the S3 variables) must name the object store to move into.");
  process.exit(2);
}
const folder = storeOf("folder");
const store = storeOf("s3");
const summary = { recordings: 0, switched: 0, photos: 0, copied: 0, alreadyThere: 0, failed: 0 };

/**
 * Copies one file of the folder into the store unless the store holds the same bytes; the copy's
 * SHA-256 is read back from the store and must be the file's.
 */
async function copyVerified(key: string): Promise<void> {
  const local = await sha256Of(await folder.read(key));
  if ((await store.head(key)) && (await sha256Of(await store.read(key))) === local) {
    summary.alreadyThere++;
    return;
  }
  if (dryRun) {
    console.log(`would copy ${key}`);
    return;
  }
  await store.putFile(key, path.join(path.resolve(env().UPLOAD_DIR), key));
  const stored = await sha256Of(await store.read(key));
  if (stored !== local) throw new Error(`${key}: the store's copy reads back with another checksum (${stored} ≠ ${local})`);
  summary.copied++;
}

const rows = await db()
  .select({ id: recordings.id })
  .from(recordings)
  .leftJoin(recordingStorage, eq(recordingStorage.recordingId, recordings.id))
  .where(or(isNull(recordingStorage.recordingId), eq(recordingStorage.backend, "folder")))
  .orderBy(recordings.createdAt);

for (const { id } of rows) {
  summary.recordings++;
  const keys = recordingKeys(id);
  try {
    for (const key of [keys.original, keys.rendition, keys.poster]) {
      if (await folder.head(key)) await copyVerified(key);
    }
    if (dryRun) continue;
    await placeRecording(id, "s3", keys.original, new Date());
    summary.switched++;
  } catch (err) {
    summary.failed++;
    console.error(`[storage:migrate] ${id}: ${(err as Error).message}; it stays in the folder`);
  }
}
for (const key of await folder.list(PHOTO_PREFIX)) {
  if (key.endsWith(".tmp")) continue;
  summary.photos++;
  try {
    await copyVerified(key);
  } catch (err) {
    summary.failed++;
    console.error(`[storage:migrate] ${key}: ${(err as Error).message}; it stays in the folder`);
  }
}
console.log(JSON.stringify(summary));
await pool().end();
process.exit(summary.failed ? 1 : 0);
