/**
 * Storage benchmark (`npm run bench -- storage`), against instances started here on the S3
 * stand-in (scripts/fakes/s3) and a database of their own, seeded with the demo:
 *   - upload throughput: one tus upload of BENCH_STORAGE_SIZE (default 256M) through an
 *     instance into the store, against a raw write of the same file to the same stand-in with
 *     the S3 client (multipart, 64 MiB parts) in the same run; the ratio is the target (≥ 0.6);
 *   - Range time to first byte: 64 KiB ranges at random offsets of a ready recording's
 *     browser copy, from the store (proxied) and from the folder (the shared app), p50/p95;
 *   - the read page with 20 clients for 10 s: all on one instance, then 10 on each of two.
 * Speed is never asserted; numbers go to .data/bench-results.json and docs/benchmarks.md.
 */
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import autocannon from "autocannon";
import { storeConfigFrom } from "~/lib/storage/config";
import { s3Store } from "~/lib/storage/store.server";
import { addPerson, fakeStoreUrl, startStack } from "../../tests/support/stacks";
import { call, createUpload, signIn, type Target, waitReady } from "../../tests/support/tus-raw";

type Stat = { p50: number; p95: number; samples: number };
const stat = (xs: number[]): Stat => {
  const s = [...xs].sort((a, b) => a - b);
  const at = (q: number) => s[Math.min(s.length - 1, Math.floor(q * s.length))];
  return { p50: +at(0.5).toFixed(2), p95: +at(0.95).toFixed(2), samples: s.length };
};

function sizeFromEnv(): number {
  const m = /^(\d+)([MG])$/i.exec(process.env.BENCH_STORAGE_SIZE ?? "256M");
  if (!m) throw new Error("BENCH_STORAGE_SIZE: use e.g. 128M, 1G");
  return Number(m[1]) * 1024 ** (m[2].toUpperCase() === "G" ? 3 : 2);
}

/** One PATCH streaming the whole file, as a browser on a good network sends it. */
async function tusUploadSeconds(t: Target, file: string, size: number): Promise<number> {
  const a = performance.now();
  const upload = await createUpload(t, size, "bench-upload.bin");
  const res = await call(t, upload, {
    method: "PATCH",
    headers: { "Tus-Resumable": "1.0.0", "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream" },
    body: fs.createReadStream(file, { highWaterMark: 1024 ** 2 }) as unknown as BodyInit,
    duplex: "half",
  } as RequestInit);
  if (res.status !== 204) throw new Error(`upload answered ${res.status}: ${await res.text()}`);
  return (performance.now() - a) / 1000;
}

async function rangeTTFB(t: Target, id: string, n: number): Promise<Stat> {
  const head = await call(t, `/api/recordings/${id}/media`, { method: "HEAD" });
  const size = Number(head.headers.get("content-length"));
  const times: number[] = [];
  for (let i = 0; i < n + 5; i++) {
    const start = Math.floor(Math.random() * Math.max(1, size - 65536));
    const a = performance.now();
    const res = await call(t, `/api/recordings/${id}/media`, { headers: { Range: `bytes=${start}-${start + 65535}` } });
    const reader = res.body?.getReader();
    await reader?.read();
    const first = performance.now() - a;
    await reader?.cancel();
    if (res.status !== 206) throw new Error(`range answered ${res.status}`);
    if (i >= 5) times.push(first);
  }
  return stat(times);
}

async function cannon(
  urls: string[],
  cookie: string,
  connections: number,
): Promise<{ requestsPerSec: number; p50: number; p97_5: number }> {
  const results = await Promise.all(
    urls.map(
      (url) =>
        new Promise<autocannon.Result>((resolve, reject) =>
          autocannon({ url, connections: connections / urls.length, duration: 10, headers: { cookie }, timeout: 20 }, (err, r) =>
            err ? reject(err) : resolve(r),
          ),
        ),
    ),
  );
  const total = results.reduce((s, r) => s + r.requests.average, 0);
  return {
    requestsPerSec: +total.toFixed(1),
    p50: Math.max(...results.map((r) => r.latency.p50)),
    p97_5: Math.max(...results.map((r) => r.latency.p97_5)),
  };
}

function clip(file: string) {
  execFileSync("/usr/bin/ffmpeg", [
    ...["-hide_banner", "-loglevel", "error", "-y", "-f", "lavfi", "-i", "testsrc2=duration=20:size=1280x720:rate=30"],
    ...["-pix_fmt", "yuv420p", "-c:v", "libx264", "-preset", "ultrafast", "-b:v", "4M", file],
  ]);
}

export async function benchStorage(log: (s: string) => void = console.log) {
  const work = path.join(process.env.BENCHREEL_RUN_DIR ?? "/tmp", "bench-storage");
  fs.mkdirSync(work, { recursive: true });
  const size = sizeFromEnv();
  const file = path.join(work, "payload.bin");
  const fd = fs.openSync(file, "w");
  const block = Buffer.alloc(8 * 1024 ** 2);
  for (let i = 0; i < block.length; i += 4) block.writeUInt32LE((i * 2654435761) >>> 0, i);
  for (let written = 0; written < size; written += block.length) fs.writeSync(fd, block, 0, Math.min(block.length, size - written));
  fs.closeSync(fd);

  const stack = await startStack({ name: "bench", apps: 2, workers: 1, storageUrl: fakeStoreUrl() });
  try {
    execFileSync(path.resolve("node_modules/.bin/tsx"), ["scripts/seed.ts"], {
      env: { ...process.env, DATABASE_URL: stack.databaseUrl },
      stdio: "ignore",
    });
    const person = await addPerson(stack, "editor");
    const cookie = await signIn(stack.apps[0], stack.publicUrl, person.email, person.password);
    const a: Target = { url: stack.apps[0], origin: stack.publicUrl, cookie };

    log(`upload of ${size / 1024 ** 2} MiB through an instance into the store, then the same file written raw…`);
    const c = storeConfigFrom({ STORAGE_URL: fakeStoreUrl() });
    if (typeof c === "string" || c.kind !== "s3") throw new Error("no store");
    const store = s3Store(c);
    const uploads: number[] = [];
    const raws: number[] = [];
    for (let i = 0; i < 3; i++) {
      uploads.push(await tusUploadSeconds(a, file, size));
      const t0 = performance.now();
      await store.putFile(`bench/raw-${i}`, file);
      raws.push((performance.now() - t0) / 1000);
      await store.remove(`bench/raw-${i}`);
    }
    const median = (xs: number[]) => [...xs].sort((x, y) => x - y)[Math.floor(xs.length / 2)];
    const mb = size / 1024 ** 2;
    const upload = { MBps: +(mb / median(uploads)).toFixed(1), rawMBps: +(mb / median(raws)).toFixed(1) };
    const ratio = +(upload.MBps / upload.rawMBps).toFixed(2);

    log("Range time to first byte, store and folder…");
    const video = path.join(work, "clip.mp4");
    clip(video);
    const bytes = fs.readFileSync(video);
    const up = await createUpload(a, bytes.length, "bench-clip.mp4");
    const done = await call(a, up, {
      method: "PATCH",
      headers: { "Tus-Resumable": "1.0.0", "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream" },
      body: new Uint8Array(bytes),
    });
    const id = done.headers.get("benchreel-recording") ?? "";
    await waitReady(a, id, 180_000);
    const fromStore = await rangeTTFB(a, id, 100);

    log("the read page, 20 clients: one instance, then two…");
    const { rows } = await stack.sql.query<{ slug: string }>(
      "select slug from procedures where published_revision_id is not null order by created_at limit 1",
    );
    const page = `/procedures/${rows[0].slug}`;
    const one = await cannon([`${stack.apps[0]}${page}`], cookie, 20);
    const two = await cannon([`${stack.apps[0]}${page}`, `${stack.apps[1]}${page}`], cookie, 20);
    return {
      upload: { ...upload, sizeMiB: mb, runs: uploads.length, ratio, target: "≥ 0.6", met: ratio >= 0.6 },
      rangeTTFBms: { store: fromStore },
      readPage20Clients: { oneInstance: one, twoInstances: two, speedup: +(two.requestsPerSec / one.requestsPerSec).toFixed(2) },
    };
  } finally {
    await stack.stop();
    fs.rmSync(work, { recursive: true, force: true });
  }
}
