import { createHash, randomBytes } from "node:crypto";
import { createReadStream, createWriteStream } from "node:fs";
import fs from "node:fs/promises";
import path from "node:path";
import type { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import {
  AbortMultipartUploadCommand,
  CompleteMultipartUploadCommand,
  CreateMultipartUploadCommand,
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
  type S3ClientConfig,
  UploadPartCommand,
} from "@aws-sdk/client-s3";
import type { StoreConfig } from "./config";

/** What a reader needs to answer Range and conditional requests about one stored object. */
export type ObjectInfo = { size: number; etag: string; lastModified: Date };

/**
 * Where recording bytes are kept, by key ("recordings/<uuid>/original"). Two backends: the
 * local folder (UPLOAD_DIR, the embedded default; a key is a path below it) and an
 * S3-compatible store. Keys are built only from server-made ids; nothing a client sends
 * becomes a key.
 */
export interface ObjectStore {
  readonly kind: "folder" | "s3";
  head(key: string): Promise<ObjectInfo | null>;
  /** The bytes start..end (inclusive), or the whole object. */
  read(key: string, range?: { start: number; end: number }): Promise<Readable>;
  /** Stores a local file under the key (replacing what was there). */
  putFile(key: string, file: string): Promise<void>;
  /** Stores bytes held in memory (a photo) under the key, whole or not at all. */
  put(key: string, bytes: Uint8Array): Promise<void>;
  /** Writes the object to a local file, through a temporary name, so a half copy is never taken for the file. */
  getFile(key: string, file: string): Promise<void>;
  /** Removes every object whose key starts with the prefix. */
  removePrefix(prefix: string): Promise<void>;
  remove(key: string): Promise<void>;
  list(prefix: string): Promise<string[]>;
}

const KEY = /^[A-Za-z0-9_-][A-Za-z0-9_./-]{0,300}$/;
function checkedKey(key: string): string {
  if (!KEY.test(key) || key.split("/").some((p) => p === ".." || p === ".")) throw new Error(`bad storage key ${key}`);
  return key;
}

/** SHA-256 of a stream's bytes, hex. */
export async function sha256Of(stream: Readable): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of stream) hash.update(chunk as Buffer);
  return hash.digest("hex");
}

/** The local folder: the layout recordings have always had under UPLOAD_DIR. */
export function folderStore(root: string): ObjectStore {
  const at = (key: string) => path.join(root, checkedKey(key));
  return {
    kind: "folder",
    async head(key) {
      const s = await fs.stat(at(key)).catch(() => null);
      if (!s?.isFile()) return null;
      return { size: s.size, etag: `"${s.size.toString(16)}-${Math.floor(s.mtimeMs).toString(16)}"`, lastModified: s.mtime };
    },
    async read(key, range) {
      return createReadStream(at(key), { ...(range ?? {}), highWaterMark: 256 * 1024 });
    },
    async putFile(key, file) {
      const dest = at(key);
      await fs.mkdir(path.dirname(dest), { recursive: true });
      const tmp = `${dest}.${randomBytes(4).toString("hex")}.tmp`;
      await fs.copyFile(file, tmp);
      await fs.rename(tmp, dest);
    },
    async put(key, bytes) {
      const dest = at(key);
      await fs.mkdir(path.dirname(dest), { recursive: true });
      const tmp = `${dest}.${randomBytes(4).toString("hex")}.tmp`;
      try {
        await fs.writeFile(tmp, bytes);
        await fs.rename(tmp, dest);
      } finally {
        await fs.rm(tmp, { force: true });
      }
    },
    async getFile(key, file) {
      if (path.resolve(file) === path.resolve(at(key))) return;
      const tmp = `${file}.${randomBytes(4).toString("hex")}.tmp`;
      await fs.mkdir(path.dirname(file), { recursive: true });
      await fs.copyFile(at(key), tmp);
      await fs.rename(tmp, file);
    },
    async removePrefix(prefix) {
      await fs.rm(at(prefix.replace(/\/+$/, "")), { recursive: true, force: true });
    },
    async remove(key) {
      await fs.rm(at(key), { force: true });
    },
    async list(prefix) {
      const base = at(prefix.replace(/\/+$/, ""));
      const entries = await fs.readdir(base, { recursive: true, withFileTypes: true }).catch(() => []);
      return entries
        .filter((e) => e.isFile())
        .map((e) => path.relative(root, path.join(e.parentPath, e.name)).split(path.sep).join("/"))
        .sort();
    },
  };
}

/** The SDK's settings for an S3-compatible server: path-style addresses, checksums only where S3 requires them. */
export function s3ClientConfig(c: Extract<StoreConfig, { kind: "s3" }>): S3ClientConfig {
  return {
    endpoint: c.endpoint,
    region: c.region,
    credentials: { accessKeyId: c.accessKeyId, secretAccessKey: c.secretAccessKey },
    forcePathStyle: true,
    // Newer SDKs add CRC checksums (aws-chunked bodies with trailers) to every upload, which
    // not every S3-compatible server reads; the store's own MD5 ETag is checked instead.
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
  };
}

/** Objects above this go up in parts (a single PUT is limited to 5 GiB). */
const PART = 64 * 1024 ** 2;

export function s3Store(c: Extract<StoreConfig, { kind: "s3" }>): ObjectStore & { client: S3Client; bucket: string } {
  const client = new S3Client(s3ClientConfig(c));
  const Bucket = c.bucket;
  return {
    kind: "s3",
    client,
    bucket: Bucket,
    async head(key) {
      try {
        const h = await client.send(new HeadObjectCommand({ Bucket, Key: checkedKey(key) }));
        return { size: h.ContentLength ?? 0, etag: h.ETag ?? `"${key}"`, lastModified: h.LastModified ?? new Date(0) };
      } catch (err) {
        const status = (err as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode;
        if (status === 404 || (err as Error).name === "NotFound" || (err as Error).name === "NoSuchKey") return null;
        throw err;
      }
    },
    async read(key, range) {
      const out = await client.send(
        new GetObjectCommand({ Bucket, Key: checkedKey(key), ...(range ? { Range: `bytes=${range.start}-${range.end}` } : {}) }),
      );
      return out.Body as Readable;
    },
    async putFile(key, file) {
      const size = (await fs.stat(file)).size;
      const Key = checkedKey(key);
      if (size <= PART) {
        await client.send(new PutObjectCommand({ Bucket, Key, Body: createReadStream(file), ContentLength: size }));
        return;
      }
      const { UploadId } = await client.send(new CreateMultipartUploadCommand({ Bucket, Key }));
      try {
        const parts: { ETag: string; PartNumber: number }[] = [];
        for (let start = 0, n = 1; start < size; start += PART, n++) {
          const end = Math.min(size, start + PART) - 1;
          const r = await client.send(
            new UploadPartCommand({
              Bucket,
              Key,
              UploadId,
              PartNumber: n,
              Body: createReadStream(file, { start, end }),
              ContentLength: end - start + 1,
            }),
          );
          parts.push({ ETag: r.ETag ?? "", PartNumber: n });
        }
        await client.send(new CompleteMultipartUploadCommand({ Bucket, Key, UploadId, MultipartUpload: { Parts: parts } }));
      } catch (err) {
        await client.send(new AbortMultipartUploadCommand({ Bucket, Key, UploadId })).catch(() => {});
        throw err;
      }
    },
    async put(key, bytes) {
      await client.send(new PutObjectCommand({ Bucket, Key: checkedKey(key), Body: bytes, ContentLength: bytes.byteLength }));
    },
    async getFile(key, file) {
      const tmp = `${file}.${randomBytes(4).toString("hex")}.tmp`;
      await fs.mkdir(path.dirname(file), { recursive: true });
      try {
        await pipeline(await this.read(key), createWriteStream(tmp, { highWaterMark: 8 * 1024 ** 2 }));
        await fs.rename(tmp, file);
      } finally {
        await fs.rm(tmp, { force: true });
      }
    },
    async removePrefix(prefix) {
      for (const key of await this.list(prefix)) await this.remove(key);
    },
    async remove(key) {
      await client.send(new DeleteObjectCommand({ Bucket, Key: checkedKey(key) }));
    },
    async list(prefix) {
      const keys: string[] = [];
      let ContinuationToken: string | undefined;
      do {
        const page = await client.send(new ListObjectsV2Command({ Bucket, Prefix: prefix, ContinuationToken }));
        for (const o of page.Contents ?? []) if (o.Key) keys.push(o.Key);
        ContinuationToken = page.IsTruncated ? page.NextContinuationToken : undefined;
      } while (ContinuationToken);
      return keys.sort();
    },
  };
}
