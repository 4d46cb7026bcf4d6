// The local S3-compatible stand-in for tests, the benchmark and development: s3rver (from
// npm) on loopback, keeping objects under --dir, with the multipart calls s3rver 3.7 lacks and
// tus's S3 store needs answered here from s3rver's own folder of parts: ListParts
// (GET ?uploadId), AbortMultipartUpload (DELETE ?uploadId) and ListMultipartUploads (GET on
// the bucket with ?uploads, which tus's expiration sweep reads; an upload's Initiated is its
// folder's `key` file's time). Its one account is s3rver's built-in S3RVER / S3RVER.
//
//   tsx scripts/fakes/s3/server.ts --port 9100 --dir .data/s3 --bucket benchreel
import fs from "node:fs/promises";
import http from "node:http";
import path from "node:path";
import { parseArgs } from "node:util";
import S3rver from "s3rver";

const { values } = parseArgs({
  options: {
    port: { type: "string", default: "9100" },
    dir: { type: "string", default: ".data/s3" },
    bucket: { type: "string", multiple: true, default: ["benchreel"] },
  },
});

await fs.mkdir(values.dir, { recursive: true });
const s3 = new S3rver({ directory: path.resolve(values.dir), silent: true, configureBuckets: [] });
for (const name of values.bucket) await s3.store.putBucket(name);
const handle = s3.callback();

const xml = (body: string) => `<?xml version="1.0" encoding="UTF-8"?>\n${body}`;
const esc = (s: string) => s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;");

/** s3rver keeps an unfinished multipart upload as a folder of numbered part files with .md5 beside them. */
function partsDir(bucket: string, uploadId: string): string | null {
  if (!/^[0-9a-f]{32}$/.test(uploadId)) return null;
  return path.join(s3.store.getResourcePath(bucket, undefined, "uploads"), uploadId);
}

async function listParts(res: http.ServerResponse, bucket: string, key: string, uploadId: string) {
  const dir = partsDir(bucket, uploadId);
  const names = dir ? await fs.readdir(dir).catch(() => null) : null;
  if (!dir || !names) {
    res.writeHead(404, { "content-type": "application/xml" });
    return res.end(xml(`<Error><Code>NoSuchUpload</Code><Message>The specified upload does not exist.</Message></Error>`));
  }
  const numbers = names
    .filter((n) => /^\d+$/.test(n))
    .map(Number)
    .sort((a, b) => a - b);
  const parts = await Promise.all(
    numbers.map(async (n) => {
      const [stat, md5] = await Promise.all([fs.stat(path.join(dir, String(n))), fs.readFile(path.join(dir, `${n}.md5`), "utf8")]);
      return `<Part><PartNumber>${n}</PartNumber><LastModified>${stat.mtime.toISOString()}</LastModified><ETag>"${md5.trim()}"</ETag><Size>${stat.size}</Size></Part>`;
    }),
  );
  res.writeHead(200, { "content-type": "application/xml" });
  res.end(
    xml(
      `<ListPartsResult><Bucket>${esc(bucket)}</Bucket><Key>${esc(key)}</Key><UploadId>${uploadId}</UploadId><IsTruncated>false</IsTruncated>${parts.join("")}</ListPartsResult>`,
    ),
  );
}

/** Every unfinished multipart upload of the bucket (one page: a stand-in holds few). */
async function listUploads(res: http.ServerResponse, bucket: string, prefix: string) {
  const root = s3.store.getResourcePath(bucket, undefined, "uploads");
  const ids = (await fs.readdir(root).catch(() => [] as string[])).filter((n) => /^[0-9a-f]{32}$/.test(n)).sort();
  const uploads = (
    await Promise.all(
      ids.map(async (id) => {
        const keyFile = path.join(root, id, "key");
        const [key, stat] = await Promise.all([fs.readFile(keyFile, "utf8"), fs.stat(keyFile)]).catch(() => [null, null] as const);
        if (key === null || stat === null || !key.startsWith(prefix)) return "";
        return `<Upload><Key>${esc(key)}</Key><UploadId>${id}</UploadId><Initiated>${stat.mtime.toISOString()}</Initiated><StorageClass>STANDARD</StorageClass></Upload>`;
      }),
    )
  ).join("");
  res.writeHead(200, { "content-type": "application/xml" });
  res.end(
    xml(
      `<ListMultipartUploadsResult><Bucket>${esc(bucket)}</Bucket><KeyMarker></KeyMarker><UploadIdMarker></UploadIdMarker><Prefix>${esc(prefix)}</Prefix><MaxUploads>1000</MaxUploads><IsTruncated>false</IsTruncated>${uploads}</ListMultipartUploadsResult>`,
    ),
  );
}

http
  .createServer((req, res) => {
    const url = new URL(req.url ?? "/", "http://s3.local");
    const [, bucket, ...rest] = url.pathname.split("/");
    const key = decodeURIComponent(rest.join("/"));
    const uploadId = url.searchParams.get("uploadId");
    if (bucket && !key && url.searchParams.has("uploads") && req.method === "GET")
      return void listUploads(res, bucket, url.searchParams.get("prefix") ?? "");
    if (bucket && key && uploadId && req.method === "GET") return void listParts(res, bucket, key, uploadId);
    if (bucket && key && uploadId && req.method === "DELETE") {
      const dir = partsDir(bucket, uploadId);
      return void (dir ? fs.rm(dir, { recursive: true, force: true }) : Promise.resolve()).then(() => res.writeHead(204).end());
    }
    handle(req, res);
  })
  .listen(Number(values.port), "127.0.0.1", () => console.log(`[s3 fake] listening on 127.0.0.1:${values.port}, objects in ${values.dir}`));
