import fs from "node:fs/promises";
import { createWriteStream } from "node:fs";
import path from "node:path";
import type { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { randomBytes } from "node:crypto";
import { FileStore } from "@tus/file-store";
import { Server, type Upload } from "@tus/server";
import { and, eq, isNull, lt } from "drizzle-orm";
import { recordings, uploads } from "~/db/schema";
import type { SessionUser } from "../auth.server";
import { db } from "../db.server";
import { env } from "../env.server";
import { enqueueProcessing } from "./queue.server";
import { fileNameProblem, formatBytes, splitTags, titleFromFileName } from "./rules";
import { originalPath, recordingDir, tusDir, tusFilePath } from "./storage.server";

/**
 * The tus server (resumable uploads) behind the resource route /api/uploads/*. One
 * module-level instance; the route guards every request (session + recording:upload +
 * owner of the upload) before handing the web Request to `handleWeb`.
 */
export const TUS_PATH = "/api/uploads";

/** Who sent a request, set by the route before tus sees it (tus hooks get the same object). */
const requestUser = new WeakMap<Request, SessionUser>();

class UploadRefusal extends Error {
  status_code: number;
  body: string;
  constructor(status: number, message: string) {
    super(message);
    this.status_code = status;
    this.body = message;
  }
}

function clean(s: string | null | undefined, max: number): string {
  // eslint-disable-next-line no-control-regex
  return (s ?? "").replace(/[\u0000-\u001f\u007f]/g, " ").trim().slice(0, max);
}

async function onUploadCreate(req: Request, upload: Upload) {
  const user = requestUser.get(req);
  if (!user) throw new UploadRefusal(401, "Sign in to upload.");
  const meta = upload.metadata ?? {};
  const fileName = meta.filename ?? meta.name ?? "";
  const problem = fileNameProblem(fileName);
  if (problem) throw new UploadRefusal(400, problem);
  if (upload.size == null) throw new UploadRefusal(400, "The upload must state its size (Upload-Length).");
  if (upload.size === 0) throw new UploadRefusal(400, "The file is empty (0 bytes); there is nothing to upload.");
  const title = clean(meta.title, 200) || titleFromFileName(fileName);
  await db()
    .insert(uploads)
    .values({
      id: upload.id,
      userId: user.id,
      fileName,
      fileType: clean(meta.filetype, 100) || null,
      size: upload.size,
      title,
      description: clean(meta.description, 4000),
      tags: [...new Set(splitTags(meta.tags).map((t) => t.toLowerCase().slice(0, 40)))].slice(0, 12),
    });
  return {};
}

async function onUploadFinish(_req: Request, upload: Upload) {
  const [row] = await db().select().from(uploads).where(eq(uploads.id, upload.id));
  if (!row) throw new UploadRefusal(404, "This upload is not known to the shop.");
  if (row.recordingId) return { headers: { "Benchreel-Recording": row.recordingId } };
  const [rec] = await db()
    .insert(recordings)
    .values({
      title: row.title,
      description: row.description,
      tags: row.tags,
      state: "processing",
      uploadId: row.id,
      originalName: row.fileName,
      originalSize: row.size,
      uploadedBy: row.userId,
    })
    .returning({ id: recordings.id });
  await fs.mkdir(recordingDir(rec.id), { recursive: true });
  await fs.rename(tusFilePath(upload.id), originalPath(rec.id));
  await fs.rm(`${tusFilePath(upload.id)}.json`, { force: true });
  await db().update(uploads).set({ recordingId: rec.id, finishedAt: new Date() }).where(eq(uploads.id, upload.id));
  await enqueueProcessing(rec.id);
  return { headers: { "Benchreel-Recording": rec.id } };
}

/**
 * The file store with a larger write buffer: chunks from the socket (about 64 kB each) are
 * gathered into writev calls of up to 8 MiB instead of one write each, which roughly halves
 * the server's CPU per uploaded byte (see scripts/bench/recordings.ts).
 */
class BufferedFileStore extends FileStore {
  override async write(readable: Readable, fileId: string, offset: number): Promise<number> {
    const file = path.join(this.directory, fileId);
    const out = createWriteStream(file, { flags: "r+", start: offset, highWaterMark: 8 * 1024 * 1024 });
    try {
      await pipeline(readable, out);
    } catch {
      // An aborted PATCH keeps what reached the file; the client resumes from the file size.
      throw Object.assign(new Error("upload interrupted"), { status_code: 500, body: "Something went wrong receiving the file; the upload can continue.\n" });
    }
    return offset + out.bytesWritten;
  }
}

function createServer() {
  const max = env().MAX_UPLOAD_BYTES;
  return new Server({
    path: TUS_PATH,
    relativeLocation: true,
    datastore: new BufferedFileStore({ directory: tusDir() }),
    maxSize: max,
    namingFunction: () => randomBytes(16).toString("hex"),
    disableTerminationForFinishedUploads: true,
    exposedHeaders: ["Benchreel-Recording"],
    onUploadCreate: onUploadCreate as never,
    onUploadFinish: onUploadFinish as never,
    onResponseError: (_req, err) => {
      const e = err as { status_code?: number; body?: string; message?: string };
      if (e.status_code === 413) {
        return { status_code: 413, body: `The file is larger than the shop's limit of ${formatBytes(max)}.` };
      }
      if (!e.status_code || e.status_code >= 500) console.error("[uploads]", e.message ?? e.body);
      return undefined;
    },
  });
}

const g = globalThis as unknown as { __benchreelTus?: Server };
export function tusServer(): Server {
  g.__benchreelTus ??= createServer();
  return g.__benchreelTus;
}

/** Hand a guarded request to tus. */
export function handleTus(request: Request, user: SessionUser): Promise<Response> {
  requestUser.set(request, user);
  return tusServer().handleWeb(request);
}

/** The upload id from /api/uploads/<id>, or null for the bare collection URL. */
export function uploadIdFrom(pathname: string): string | null {
  const rest = pathname.slice(TUS_PATH.length).replace(/^\/+/, "").replace(/\/+$/, "");
  if (!rest) return null;
  return path.basename(rest);
}

/** Bytes the server holds for an unfinished upload (the file size; the sidecar's offset lags). */
export async function receivedBytes(uploadId: string): Promise<number> {
  try {
    return (await fs.stat(tusFilePath(uploadId))).size;
  } catch {
    return 0;
  }
}

/** Discard an unfinished upload: its bytes, its sidecar and its row. */
export async function discardUpload(uploadId: string): Promise<void> {
  await fs.rm(tusFilePath(uploadId), { force: true });
  await fs.rm(`${tusFilePath(uploadId)}.json`, { force: true });
  await db().delete(uploads).where(eq(uploads.id, uploadId));
}

/** Unfinished uploads older than this are discarded by the worker (bytes and row). */
export const STALE_UPLOAD_DAYS = 14;

export async function cleanUpStaleUploads(now = new Date()): Promise<number> {
  const before = new Date(now.getTime() - STALE_UPLOAD_DAYS * 24 * 3600 * 1000);
  const stale = await db()
    .select({ id: uploads.id })
    .from(uploads)
    .where(and(isNull(uploads.recordingId), lt(uploads.createdAt, before)))
    .limit(200);
  for (const u of stale) await discardUpload(u.id);
  return stale.length;
}
