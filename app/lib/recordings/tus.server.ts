import fs from "node:fs/promises";
import { createWriteStream } from "node:fs";
import path from "node:path";
import type { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { randomBytes } from "node:crypto";
import { FileConfigstore, FileStore } from "@tus/file-store";
import { S3Store } from "@tus/s3-store";
import { Server, type Upload } from "@tus/server";
import { and, desc, eq, isNull, lt } from "drizzle-orm";
import { recordings, uploadActivity, uploads } from "~/db/schema";
import type { SessionUser } from "../auth.server";
import { db } from "../db.server";
import { env } from "../env.server";
import { normalizeTags, splitTags } from "../tags";
import { enqueueProcessing } from "./queue.server";
import { formatBytes } from "../byte-format";
import { fileNameProblem, titleFromFileName } from "./upload-names";
import { sameFile, type FileFingerprint } from "./file-fingerprint";
import { originalPath, recordingDir, tusDir, tusFilePath } from "./storage.server";
import { storeConfigFrom } from "../storage/config";
import { PgAdvisoryLocker } from "../storage/pg-locker.server";
import { configuredBackend, placeRecording, storeOf } from "../storage/recordings.server";
import { s3ClientConfig } from "../storage/store.server";

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
  return (s ?? "")
    .replace(/[\u0000-\u001f\u007f]/g, " ")
    .trim()
    .slice(0, max);
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
      tags: normalizeTags(splitTags(meta.tags)),
    });
  return {};
}

/**
 * The last byte arrived: the recording's row, where its bytes are, and the upload's link to it
 * are written in one transaction, so a recording row exists exactly when its upload is finished
 * (the sweep of abandoned uploads relies on it). tus's own sidecar goes after the commit: until
 * then a failure leaves the upload as it was, to be finished again or swept.
 */
async function onUploadFinish(_req: Request, upload: Upload) {
  const [row] = await db().select().from(uploads).where(eq(uploads.id, upload.id));
  if (!row) throw new UploadRefusal(404, "This upload is not known to the shop.");
  if (row.recordingId) return { headers: { "Benchreel-Recording": row.recordingId } };
  const backend = configuredBackend();
  const recId = await db().transaction(async (tx) => {
    const [rec] = await tx
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
    if (backend === "s3") {
      // The finished object stays where tus wrote it (no copy of gigabytes); the row says where.
      await placeRecording(rec.id, "s3", upload.id, null, tx);
    } else {
      await fs.mkdir(recordingDir(rec.id), { recursive: true });
      await fs.rename(tusFilePath(upload.id), originalPath(rec.id));
    }
    await tx.update(uploads).set({ recordingId: rec.id, finishedAt: new Date() }).where(eq(uploads.id, upload.id));
    return rec.id;
  });
  if (backend === "s3") await storeOf("s3").remove(`${upload.id}.info`);
  else await fs.rm(`${tusFilePath(upload.id)}.json`, { force: true });
  // The upload is finished and its recording kept whatever happens here: a job that cannot be
  // sent now is sent by the worker's check for recordings waiting without one.
  await enqueueProcessing(recId).catch((err) =>
    console.error(`[uploads] ${recId}: the processing job could not be sent yet (${(err as Error).message}); the worker will send it`),
  );
  return { headers: { "Benchreel-Recording": recId } };
}

/**
 * The file store with a larger write buffer: chunks from the socket (about 64 kB each) are
 * gathered into writev calls of up to 8 MiB instead of one write each, which roughly halves
 * the server's CPU per uploaded byte (see scripts/bench/recordings.ts).
 */
class BufferedFileStore extends FileStore {
  constructor(options: ConstructorParameters<typeof FileStore>[0]) {
    super(options);
    // Advertise only what is implemented (OPTIONS' Tus-Extension): every upload states its
    // size up front, so no creation-defer-length; expiration is done by handleTus and the
    // worker's clean-up below (the file store's own expiry is left off, expiry = 0).
    this.extensions = ["creation", "creation-with-upload", "termination", "expiration"];
  }

  override async write(readable: Readable, fileId: string, offset: number): Promise<number> {
    const file = path.join(this.directory, fileId);
    const out = createWriteStream(file, { flags: "r+", start: offset, highWaterMark: 8 * 1024 * 1024 });
    try {
      await pipeline(readable, out);
    } catch (err) {
      // A body longer than the upload's declared length is tus's 413, answered as such.
      if ((err as { status_code?: number }).status_code === 413) throw err;
      // An aborted PATCH keeps what reached the file; the client resumes from the file size.
      throw Object.assign(new Error("upload interrupted"), {
        status_code: 500,
        body: "Something went wrong receiving the file; the upload can continue.\n",
      });
    }
    return offset + out.bytesWritten;
  }
}

/**
 * Where unfinished uploads are kept: tus's folder under UPLOAD_DIR, or, with object storage,
 * a multipart upload in the store (@tus/s3-store; objects <id>, <id>.info and <id>.part at
 * the bucket's top), so any instance can continue it.
 */
function createDatastore() {
  const c = storeConfigFrom(env());
  if (typeof c === "string" || c.kind === "folder") return new BufferedFileStore({ directory: tusDir() });
  const store = new S3Store({ partSize: 8 * 1024 ** 2, s3ClientConfig: { ...s3ClientConfig(c), bucket: c.bucket } });
  store.extensions = ["creation", "creation-with-upload", "termination", "expiration"];
  return store;
}

function createServer() {
  const max = env().MAX_UPLOAD_BYTES;
  return new Server({
    path: TUS_PATH,
    relativeLocation: true,
    datastore: createDatastore(),
    // Holds across app instances (PostgreSQL advisory locks): an upload begun through one
    // instance can be continued through another, never by two requests at once.
    locker: new PgAdvisoryLocker(),
    maxSize: max,
    namingFunction: () => randomBytes(16).toString("hex"),
    disableTerminationForFinishedUploads: true,
    exposedHeaders: ["Benchreel-Recording", "Upload-Expires"],
    onUploadCreate: onUploadCreate as never,
    onUploadFinish: onUploadFinish as never,
    onResponseError: async (req, err) => {
      const e = err as { status_code?: number; body?: string; message?: string };
      if (e.status_code === 413) return { status_code: 413, body: await tooLargeReason(req as Request, max) };
      // 501 is tus's answer for an extension it does not offer: the client's request, not a fault.
      if (e.status_code === 501) return { status_code: 400, body: e.body ?? "This tus extension is not supported." };
      if (!e.status_code || e.status_code >= 500) console.error("[uploads]", e.message ?? e.body);
      return undefined;
    },
  });
}

/**
 * Why a request was too large: a new upload over the shop's limit, or bytes beyond the length
 * the upload declared when it was created (a PATCH, or a creation-with-upload body).
 */
async function tooLargeReason(req: Request, max: number): Promise<string> {
  const declared = Number(req.headers.get("upload-length"));
  if (req.method === "POST" && declared > max) return `The file is larger than the shop's limit of ${formatBytes(max)}.`;
  const id = req.method === "PATCH" ? uploadIdFrom(new URL(req.url).pathname) : null;
  const [row] = id ? await db().select({ size: uploads.size }).from(uploads).where(eq(uploads.id, id)) : [];
  const size = row?.size ?? (Number.isFinite(declared) ? declared : null);
  const offset = Number(req.headers.get("upload-offset") ?? 0);
  const sent = req.headers.get("content-length");
  const declaredAs = size != null ? ` (Upload-Length ${size})` : "";
  const where = size != null ? `, where ${size - offset} remain` : "";
  return `The request sends more bytes than the upload declared${declaredAs}: ${sent != null ? `${sent} bytes` : "a longer body"} at offset ${offset}${where}. Nothing past the declared length is stored.`;
}

const g = globalThis as unknown as { __benchreelTus?: Server };
export function tusServer(): Server {
  g.__benchreelTus ??= createServer();
  return g.__benchreelTus;
}

/** The tus protocol version this server speaks (the only one, 1.0.0). */
export const TUS_VERSION = "1.0.0";

function tusAnswer(status: number, body: string | null, headers: Record<string, string> = {}): Response {
  return new Response(body, {
    status,
    headers: {
      "Tus-Resumable": TUS_VERSION,
      "Cache-Control": "no-store",
      ...(body ? { "Content-Type": "text/plain; charset=utf-8" } : {}),
      ...headers,
    },
  });
}

/**
 * What tus 1.0.0 says a server must refuse before touching an upload, answered here because
 * @tus/server answers them with other statuses: a missing or unsupported Tus-Resumable is 412
 * with Tus-Version; a PATCH that is not application/offset+octet-stream is 415; extensions
 * not offered (deferred length, concatenation) are 400 with the reason.
 */
export function protocolRefusal(request: Request): Response | null {
  const method = request.method;
  if (method === "OPTIONS") return null;
  const version = request.headers.get("tus-resumable");
  if (version !== TUS_VERSION) {
    const why = version
      ? `This server speaks tus ${TUS_VERSION}, not ${version}.`
      : `The Tus-Resumable header is required (tus ${TUS_VERSION}).`;
    return tusAnswer(412, why, { "Tus-Version": TUS_VERSION });
  }
  if (method === "PATCH" && request.headers.get("content-type")?.trim() !== "application/offset+octet-stream") {
    return tusAnswer(415, "A PATCH carries the bytes as Content-Type: application/offset+octet-stream.");
  }
  if (method === "POST" && request.headers.has("upload-defer-length")) {
    return tusAnswer(400, "State the file's size when the upload is created (Upload-Length); a deferred length is not supported.");
  }
  if (method === "PATCH" && request.headers.has("upload-length")) {
    return tusAnswer(400, "The upload's length was fixed when it was created; send no Upload-Length with a PATCH.");
  }
  if (request.headers.has("upload-concat")) {
    return tusAnswer(400, "Concatenated (parallel) uploads are not supported; send the file as one upload.");
  }
  return null;
}

/**
 * An unfinished upload expires this many days after its last byte arrived (docs/decisions/003;
 * `UPLOAD_EXPIRY_DAYS`, 14 unless the shop sets it): within it an upload resumes from any
 * browser, after it it is gone (410) and its bytes are swept.
 */
export function uploadExpiryDays(): number {
  return env().UPLOAD_EXPIRY_DAYS;
}
const expiryMs = () => uploadExpiryDays() * 24 * 3600 * 1000;

type UploadRow = typeof uploads.$inferSelect;

/** When an unfinished upload expires: its last byte (the file's mtime) or its creation, plus the expiry time. */
export async function expiresAt(row: Pick<UploadRow, "id" | "createdAt">): Promise<Date> {
  const mtime = await lastByteAt(row.id);
  return new Date(Math.max(row.createdAt.getTime(), mtime) + expiryMs());
}

/** When the last bytes of an unfinished upload arrived (0 when none): the file's mtime, or the store's activity row. */
async function lastByteAt(uploadId: string): Promise<number> {
  if (configuredBackend() === "s3") {
    const [a] = await db().select().from(uploadActivity).where(eq(uploadActivity.uploadId, uploadId));
    return a?.lastByteAt.getTime() ?? 0;
  }
  return fs.stat(tusFilePath(uploadId)).then(
    (s) => s.mtimeMs,
    () => 0,
  );
}

function metadataHeader(row: UploadRow): string {
  const pairs: [string, string][] = [
    ["filename", row.fileName],
    ["filetype", row.fileType ?? ""],
    ["title", row.title],
  ];
  return pairs.map(([k, v]) => (v ? `${k} ${Buffer.from(v).toString("base64")}` : k)).join(",");
}

/**
 * A finished upload keeps answering at its URL, as one whose bytes are all there, so that a
 * client resuming from a stored URL finishes instead of starting over (and making a second
 * recording): HEAD says Upload-Offset = Upload-Length, a PATCH at that offset with no bytes
 * is acknowledged, anything else is refused with the reason.
 */
function finishedAnswer(request: Request, row: UploadRow): Response {
  const done = { "Upload-Offset": String(row.size), "Benchreel-Recording": row.recordingId! };
  if (request.method === "HEAD")
    return tusAnswer(200, null, { ...done, "Upload-Length": String(row.size), "Upload-Metadata": metadataHeader(row) });
  if (request.method === "PATCH") {
    const offset = request.headers.get("upload-offset");
    if (offset !== String(row.size))
      return tusAnswer(409, `This upload is complete: all ${row.size} bytes arrived (Upload-Offset ${row.size}).`, done);
    if (Number(request.headers.get("content-length") ?? 0) > 0 || request.headers.has("transfer-encoding")) {
      return tusAnswer(413, `This upload is complete at its declared length of ${row.size} bytes; no more bytes can be added.`, done);
    }
    return tusAnswer(204, null, done);
  }
  return tusAnswer(400, "This upload is complete and became a recording; it cannot be terminated.", done);
}

/**
 * Hand a guarded request to tus (OPTIONS needs no person: it tells only what the server
 * supports). Before tus: the protocol's refusals, finished uploads, expired ones (410, and
 * discarded). After: Upload-Expires on every answer about an unfinished upload.
 */
export async function handleTus(request: Request, user: SessionUser | null): Promise<Response> {
  const refused = protocolRefusal(request);
  if (refused) return refused;
  const id = uploadIdFrom(new URL(request.url).pathname);
  let row: UploadRow | undefined;
  if (id && request.method !== "OPTIONS" && request.method !== "POST") {
    [row] = await db().select().from(uploads).where(eq(uploads.id, id));
    // Every upload has its row from its creation on; without one it was discarded (by a person,
    // or swept by another process, whose work tus's per-instance cache of the store would not see).
    if (!row) return tusAnswer(404, "This upload is not known to the shop: it was discarded, or never begun.");
    if (row.recordingId) return finishedAnswer(request, row);
    if ((await expiresAt(row)) < new Date()) {
      await discardUpload(row.id);
      return tusAnswer(
        410,
        `This unfinished upload expired (no bytes for ${uploadExpiryDays()} days) and was discarded; start the upload again.`,
      );
    }
  }
  if (user) requestUser.set(request, user);
  const res = await tusServer().handleWeb(request);
  const created = request.method === "POST" && res.status === 201 ? uploadIdFrom(res.headers.get("location") ?? "") : null;
  const wrote = created ?? (request.method === "PATCH" && res.status === 204 && row ? row.id : null);
  if (wrote && configuredBackend() === "s3" && !res.headers.has("Benchreel-Recording")) {
    await db()
      .insert(uploadActivity)
      .values({ uploadId: wrote })
      .onConflictDoUpdate({ target: uploadActivity.uploadId, set: { lastByteAt: new Date() } });
  }
  const about = created ?? (row && (request.method === "HEAD" || request.method === "PATCH") ? row.id : null);
  if (about && res.status < 300 && !res.headers.has("Benchreel-Recording")) {
    res.headers.set("Upload-Expires", (await expiresAt({ id: about, createdAt: row?.createdAt ?? new Date() })).toUTCString());
  }
  return res;
}

/** The upload id from /api/uploads/<id>, or null for the bare collection URL. */
export function uploadIdFrom(pathname: string): string | null {
  const rest = pathname.slice(TUS_PATH.length).replace(/^\/+/, "").replace(/\/+$/, "");
  if (!rest) return null;
  return path.basename(rest);
}

/** Bytes the server holds for an unfinished upload (the file size; the sidecar's offset lags). */
export async function receivedBytes(uploadId: string): Promise<number> {
  if (configuredBackend() === "s3") {
    return tusServer()
      .datastore.getUpload(uploadId)
      .then(
        (u) => u.offset,
        () => 0,
      );
  }
  try {
    return (await fs.stat(tusFilePath(uploadId))).size;
  } catch {
    return 0;
  }
}

const UNFINISHED_SHOWN = 50;

/** The fingerprint an upload was begun with (tus keeps its metadata in the upload's sidecar). */
async function storedFingerprint(uploadId: string): Promise<Partial<FileFingerprint>> {
  const meta: Record<string, string | null> = await tusServer()
    .datastore.getUpload(uploadId)
    .then(
      (u) => u.metadata ?? {},
      () => ({}),
    );
  return { lastModified: meta.lastmodified ?? undefined, sample: meta.sample ?? undefined };
}

/**
 * The caller's unfinished uploads, newest first, with the bytes the server holds; given a
 * file's name, size and fingerprint, only the ones of that file (how a browser that has no
 * record of an upload, another profile or machine, finds it to continue): name and size alone
 * never join, two files can share them (`sameFile`). The upload page and the API list the
 * same ones, at most `UNFINISHED_SHOWN` (far more than anyone leaves unfinished).
 */
export async function unfinishedUploads(userId: string, file?: { fileName: string; size: number } & Partial<FileFingerprint>) {
  const where = [eq(uploads.userId, userId), isNull(uploads.recordingId)];
  if (file) where.push(eq(uploads.fileName, file.fileName), eq(uploads.size, file.size));
  let rows = await db()
    .select({
      id: uploads.id,
      fileName: uploads.fileName,
      size: uploads.size,
      title: uploads.title,
      description: uploads.description,
      tags: uploads.tags,
      createdAt: uploads.createdAt,
    })
    .from(uploads)
    .where(and(...where))
    .orderBy(desc(uploads.createdAt))
    .limit(UNFINISHED_SHOWN);
  if (file) {
    const same = await Promise.all(rows.map(async (r) => sameFile(await storedFingerprint(r.id), file)));
    rows = rows.filter((_, i) => same[i]);
  }
  return Promise.all(rows.map(async (r) => ({ ...r, received: await receivedBytes(r.id), expiresAt: await expiresAt(r) })));
}

/**
 * Discard an unfinished upload: its bytes, its sidecar and its row (its activity row goes with
 * it). In a store, tus removes the multipart upload and its .info; the .part object (bytes short
 * of a whole part) and anything a half-finished upload left are removed by key as well.
 */
export async function discardUpload(uploadId: string): Promise<void> {
  if (configuredBackend() === "s3") {
    await tusServer()
      .datastore.remove(uploadId)
      .catch(() => {});
    const store = storeOf("s3");
    for (const key of [`${uploadId}.part`, `${uploadId}.info`]) await store.remove(key).catch(() => {});
    // The object at the id itself is a finished upload: a recording's original once a recording names it.
    const [rec] = await db().select({ id: recordings.id }).from(recordings).where(eq(recordings.uploadId, uploadId));
    if (!rec) await store.remove(uploadId).catch(() => {});
  }
  await fs.rm(tusFilePath(uploadId), { force: true });
  await fs.rm(`${tusFilePath(uploadId)}.json`, { force: true });
  await db().delete(uploads).where(eq(uploads.id, uploadId));
}

/** tus's upload ids (namingFunction): nothing else in the store or tus's folder is the sweep's. */
const ID = /^[0-9a-f]{32}$/;

/**
 * The sweep of abandoned uploads (the worker, hourly: tus-sweep.server.ts). First the uploads
 * the shop knows: an unfinished one with no bytes for the expiry time is discarded, bytes, row
 * and activity together; one still receiving bytes is kept, however long ago it began. A row
 * whose recording exists (a finish interrupted after its commit) is linked to it, never
 * discarded. Then tus's own expiration (`deleteExpired` of the store, with the stores'
 * `expirationPeriodInMilliseconds`) for bytes no row knows, which tus counts from their start:
 * left behind by a failed creation, a lost row or a crash, they are removed once as old.
 * Returns how many uploads went.
 */
export async function cleanUpExpiredUploads(now = new Date()): Promise<number> {
  const candidates = await db()
    .select({ upload: uploads, recordingId: recordings.id })
    .from(uploads)
    .leftJoin(recordings, eq(recordings.uploadId, uploads.id))
    .where(and(isNull(uploads.recordingId), lt(uploads.createdAt, new Date(now.getTime() - expiryMs()))))
    .limit(500);
  let n = 0;
  for (const { upload: u, recordingId } of candidates) {
    if (recordingId) {
      await db()
        .update(uploads)
        .set({ recordingId, finishedAt: u.finishedAt ?? now })
        .where(eq(uploads.id, u.id));
      continue;
    }
    if ((await expiresAt(u)) >= now) continue;
    await discardUpload(u.id);
    n++;
  }
  return n + (await sweepUnknownBytes(now));
}

/** Ids of every upload the shop has a row for (tus's sweep must not touch those: their expiry is by last byte). */
async function knownUploadIds(): Promise<Set<string>> {
  const rows = await db().select({ id: uploads.id }).from(uploads).where(isNull(uploads.recordingId));
  return new Set(rows.map((r) => r.id));
}

/** tus's S3 store for the sweep, seeing only the multipart uploads `only` lets through. */
class SweepingS3Store extends S3Store {
  constructor(options: ConstructorParameters<typeof S3Store>[0], only: (key: string) => boolean) {
    super(options);
    const list = this.client.listMultipartUploads.bind(this.client);
    this.client.listMultipartUploads = (async (args: Parameters<typeof list>[0]) => {
      const page = await list(args);
      return { ...page, Uploads: (page.Uploads ?? []).filter((u) => u.Key && only(u.Key)) };
    }) as typeof this.client.listMultipartUploads;
  }
}

/**
 * tus's own expiration over the bytes no upload row knows. tus measures an upload's age from its
 * creation and would take any upload that old, so the sweeping store is a second instance (the
 * serving one keeps no creation-based expiry, which would refuse an upload still receiving
 * bytes) that sees only the unknown ones: the file store through a config store listing only
 * them, the S3 store through a listing of multipart uploads without the known ones.
 */
async function sweepUnknownBytes(now: Date): Promise<number> {
  const known = await knownUploadIds();
  const unknown = (id: string) => ID.test(id) && !known.has(id);
  const expirationPeriodInMilliseconds = expiryMs();
  const c = storeConfigFrom(env());
  if (typeof c !== "string" && c.kind === "s3") {
    const sweeper = new SweepingS3Store(
      {
        s3ClientConfig: { ...s3ClientConfig(c), bucket: c.bucket },
        expirationPeriodInMilliseconds,
        // Tags mark finished uploads for a lifecycle rule; the sweep needs none.
        useTags: false,
      },
      unknown,
    );
    // deleteExpired counts the objects it deleted (.info and .part): two per upload.
    return Math.ceil((await sweeper.deleteExpired()) / 2);
  }
  const dir = tusDir();
  const configs = new FileConfigstore(dir);
  const listAll = configs.list.bind(configs);
  configs.list = async () => (await listAll()).filter(unknown);
  const sweeper = new FileStore({ directory: dir, configstore: configs, expirationPeriodInMilliseconds });
  let n = await sweeper.deleteExpired();
  // A file without its sidecar or a sidecar without its file (a crash between the two writes)
  // is not an upload to tus at all: removed here once as old, by its time on disk.
  const names = await fs.readdir(dir);
  for (const id of new Set(names.map((f) => f.replace(/\.json$/, "")))) {
    if (!unknown(id) || (names.includes(id) && names.includes(`${id}.json`))) continue;
    const [file] = names.includes(id) ? [tusFilePath(id)] : [`${tusFilePath(id)}.json`];
    const mtime = await fs.stat(file).then(
      (st) => st.mtimeMs,
      () => now.getTime(),
    );
    if (mtime + expirationPeriodInMilliseconds >= now.getTime()) continue;
    await discardUpload(id);
    n++;
  }
  return n;
}
