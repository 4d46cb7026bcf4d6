import fs from "node:fs";
import path from "node:path";
import { env } from "../env.server";

/**
 * Where recording bytes live. Paths are built only from server-made ids (tus ids, uuids);
 * nothing the client sends (file names included) ever reaches the file system.
 */
export function uploadRoot(): string {
  return path.resolve(env().UPLOAD_DIR);
}

/** tus's working folder: one file per unfinished upload plus its JSON sidecar. */
export function tusDir(): string {
  const dir = path.join(uploadRoot(), "tus");
  fs.mkdirSync(dir, { recursive: true });
  return dir;
}

const ID = /^[A-Za-z0-9_-]{8,64}$/;

export function recordingDir(recordingId: string): string {
  if (!ID.test(recordingId)) throw new Error("bad recording id");
  return path.join(uploadRoot(), "recordings", recordingId);
}

export const originalPath = (id: string) => path.join(recordingDir(id), "original");
export const renditionPath = (id: string) => path.join(recordingDir(id), "web.mp4");
export const posterPath = (id: string) => path.join(recordingDir(id), "poster.jpg");

export function tusFilePath(uploadId: string): string {
  if (!ID.test(uploadId)) throw new Error("bad upload id");
  return path.join(tusDir(), uploadId);
}
