// Benchmark of the recordings path (not a test): a large tus upload over loopback against the
// running app, beside the raw write speed of the same disk (dd … conv=fdatasync) measured in
// the same run; the app server's memory (RSS) while it streams the upload; and the time to
// first byte of Range requests into the middle of the uploaded file.
//
//   npx tsx scripts/bench/recordings.ts --size 1G [--env .data/…/run/env.json] [--chunk 64M] [--ranges 200]
//
// It needs a running stack (BENCHREEL_URL, DATABASE_URL, UPLOAD_DIR in the environment, or
// --env pointing at the env.json that `npm test -- --keep` writes). Targets (issue 4): upload
// ≥ 60 % of the raw write speed; server memory grows by < 150 MB during a 2 GB upload; Range
// time to first byte p95 ≤ 10 ms.
import { execFileSync } from "node:child_process";
import { randomBytes, randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { listenerPid, rssBytes } from "./proc";

export type RecordingsBenchOptions = {
  baseUrl: string;
  cookie: string;
  uploadDir: string;
  sizeBytes: number;
  chunkBytes?: number;
  ranges?: number;
  workDir?: string;
  log?: (line: string) => void;
};

export type RecordingsBenchResult = {
  sizeBytes: number;
  upload: { seconds: number; MBps: number };
  rawDisk: { seconds: number; MBps: number };
  uploadToDiskRatio: number;
  serverMemory: { pid: number | null; baselineMB: number | null; peakMB: number | null; growthMB: number | null };
  rangeTTFB: { n: number; medianMs: number; p95Ms: number; maxMs: number };
  /** The same measure for GET /api/me (session check, no file): what any request costs on this machine now. */
  baselineTTFB: { n: number; medianMs: number; p95Ms: number; maxMs: number };
  loadAverage: number[];
  targets: { uploadRatio: boolean; memory: boolean | null; rangeP95: boolean };
};

const MB = 1e6;

function parseSize(s: string): number {
  const m = /^(\d+(?:\.\d+)?)\s*([kKmMgG]?)i?B?$/.exec(s.trim());
  if (!m) throw new Error(`bad size "${s}" (use e.g. 512M, 1G, 2G)`);
  const mult = { "": 1, k: 1024, m: 1024 ** 2, g: 1024 ** 3 }[m[2].toLowerCase() as "" | "k" | "m" | "g"];
  return Math.round(Number(m[1]) * mult);
}

const quantile = (xs: number[], q: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1))];
};

/** Resident memory in MiB, as the memory target is stated. */
function rssMB(pid: number): number | null {
  const bytes = rssBytes(pid);
  return bytes === null ? null : bytes / 1024 / 1024;
}

/** A source file: a tiny faststart H.264 clip (so the app accepts it as a video) padded with random bytes. */
function makeSource(file: string, size: number, log: (s: string) => void) {
  const head = `${file}.head.mp4`;
  execFileSync("/usr/bin/ffmpeg", ["-hide_banner", "-loglevel", "error", "-y", "-f", "lavfi", "-i", "testsrc=duration=5:size=320x240:rate=25", "-pix_fmt", "yuv420p", "-c:v", "libx264", "-movflags", "+faststart", head]);
  const fd = fs.openSync(file, "w");
  const clip = fs.readFileSync(head);
  fs.writeSync(fd, clip);
  const block = randomBytes(8 * 1024 * 1024);
  let written = clip.length;
  while (written < size) {
    const n = Math.min(block.length, size - written);
    fs.writeSync(fd, block, 0, n);
    written += n;
  }
  fs.closeSync(fd);
  fs.rmSync(head);
  log(`source: ${(size / MB).toFixed(0)} MB at ${file}`);
}

/** Raw sequential write of the same size on the upload disk, flushed (dd conv=fdatasync). */
function rawDisk(dir: string, size: number): { seconds: number; MBps: number } {
  const out = path.join(dir, `bench-dd-${process.pid}`);
  const bs = 8 * 1024 * 1024;
  const count = Math.max(1, Math.round(size / bs));
  const t0 = performance.now();
  execFileSync("dd", ["if=/dev/zero", `of=${out}`, `bs=${bs}`, `count=${count}`, "conv=fdatasync", "status=none"]);
  const seconds = (performance.now() - t0) / 1000;
  fs.rmSync(out, { force: true });
  return { seconds, MBps: (count * bs) / MB / seconds };
}

async function tusUpload(opts: RecordingsBenchOptions, file: string): Promise<{ seconds: number; recordingId: string | null }> {
  const tus = await import("tus-js-client");
  const size = fs.statSync(file).size;
  let recordingId: string | null = null;
  // A random-access source, as a browser's File is (slices, no re-buffering of a stream);
  // read before the clock starts.
  const data = Buffer.allocUnsafe(size); // readFileSync stops at 2 GiB
  const fd = fs.openSync(file, "r");
  for (let off = 0; off < size; ) off += fs.readSync(fd, data, off, Math.min(64 * 1024 * 1024, size - off), off);
  fs.closeSync(fd);
  const t0 = performance.now();
  await new Promise<void>((resolve, reject) => {
    const u = new tus.Upload(data, {
      endpoint: `${opts.baseUrl}/api/uploads`,
      uploadSize: size,
      chunkSize: opts.chunkBytes ?? 64 * 1024 * 1024,
      retryDelays: [0, 1000, 3000],
      headers: { Origin: opts.baseUrl, Cookie: opts.cookie },
      metadata: { filename: "bench-run.mp4", filetype: "video/mp4", title: `Benchmark upload ${new Date().toISOString()}`, tags: "benchmark" },
      onAfterResponse: (_req, res) => {
        recordingId = res.getHeader("Benchreel-Recording") ?? recordingId;
      },
      onSuccess: () => resolve(),
      onError: reject,
    });
    u.start();
  });
  return { seconds: (performance.now() - t0) / 1000, recordingId };
}

async function ttfb(opts: RecordingsBenchOptions, n: number, request: () => { url: string; headers: Record<string, string>; status: number }) {
  const times: number[] = [];
  for (let i = 0; i < n + 5; i++) {
    const r = request();
    const t0 = performance.now();
    const res = await fetch(r.url, { headers: { Cookie: opts.cookie, ...r.headers } });
    const reader = res.body!.getReader();
    await reader.read();
    const ms = performance.now() - t0;
    await reader.cancel();
    if (res.status !== r.status) throw new Error(`${r.url} answered ${res.status}`);
    if (i >= 5) times.push(ms); // the first few warm the connection and caches
  }
  return { n: times.length, medianMs: quantile(times, 0.5), p95Ms: quantile(times, 0.95), maxMs: Math.max(...times) };
}

function rangeTTFB(opts: RecordingsBenchOptions, recordingId: string, size: number, n: number) {
  const url = `${opts.baseUrl}/api/recordings/${recordingId}/media`;
  return ttfb(opts, n, () => {
    const start = Math.floor(size * (0.25 + 0.5 * Math.random()));
    return { url, headers: { Range: `bytes=${start}-${start + 65535}` }, status: 206 };
  });
}

export async function benchRecordings(opts: RecordingsBenchOptions): Promise<RecordingsBenchResult> {
  const log = opts.log ?? console.log;
  const workDir = opts.workDir ?? fs.mkdtempSync("/tmp/benchreel-bench-");
  const file = path.join(workDir, "source.bin");
  makeSource(file, opts.sizeBytes, log);
  const size = fs.statSync(file).size;

  const disk = rawDisk(opts.uploadDir, size);
  log(`raw disk write (dd conv=fdatasync): ${disk.MBps.toFixed(0)} MB/s`);

  const pid = listenerPid(Number(new URL(opts.baseUrl).port)); // the `node server.js` process
  const rssBefore = pid ? rssMB(pid) : null;
  let peak = rssBefore;
  const sampler = setInterval(() => {
    const v = pid ? rssMB(pid) : null;
    if (v != null && (peak == null || v > peak)) peak = v;
  }, 100);
  const up = await tusUpload(opts, file).finally(() => clearInterval(sampler));
  const uploadMBps = size / MB / up.seconds;
  log(`tus upload: ${uploadMBps.toFixed(0)} MB/s (${up.seconds.toFixed(1)} s); server RSS ${rssBefore?.toFixed(0)} → peak ${peak?.toFixed(0)} MB`);
  if (!up.recordingId) throw new Error("the upload finished without a recording id");

  // Wait for processing (probe + poster; the padded file is served as it is).
  const deadline = Date.now() + 120_000;
  for (;;) {
    const res = await fetch(`${opts.baseUrl}/api/recordings/${up.recordingId}`, { headers: { Cookie: opts.cookie } });
    const { recording } = (await res.json()) as { recording: { state: string; stateReason: string | null } };
    if (recording.state === "ready") break;
    if (recording.state !== "processing") throw new Error(`recording ${recording.state}: ${recording.stateReason}`);
    if (Date.now() > deadline) throw new Error("processing did not finish in 120 s");
    await new Promise((r) => setTimeout(r, 500));
  }
  const ranges = await rangeTTFB(opts, up.recordingId, size, opts.ranges ?? 200);
  const baseline = await ttfb(opts, opts.ranges ?? 200, () => ({ url: `${opts.baseUrl}/api/me`, headers: {}, status: 200 }));
  log(`Range TTFB over ${ranges.n} requests: median ${ranges.medianMs.toFixed(2)} ms, p95 ${ranges.p95Ms.toFixed(2)} ms (GET /api/me: median ${baseline.medianMs.toFixed(2)} ms, p95 ${baseline.p95Ms.toFixed(2)} ms)`);
  fs.rmSync(workDir, { recursive: true, force: true });

  const growth = rssBefore != null && peak != null ? peak - rssBefore : null;
  const ratio = uploadMBps / disk.MBps;
  return {
    sizeBytes: size,
    upload: { seconds: up.seconds, MBps: uploadMBps },
    rawDisk: disk,
    uploadToDiskRatio: ratio,
    serverMemory: { pid, baselineMB: rssBefore, peakMB: peak, growthMB: growth },
    rangeTTFB: ranges,
    baselineTTFB: baseline,
    loadAverage: (await import("node:os")).loadavg().map((x) => Number(x.toFixed(2))),
    targets: { uploadRatio: ratio >= 0.6, memory: growth == null ? null : growth < 150, rangeP95: ranges.p95Ms <= 10 },
  };
}

/** A signed-in session for a throw-away builder (made directly in the database, as the tests do). */
export async function benchSession(): Promise<string> {
  const { users } = await import("../../app/db/schema");
  const { hashPassword, lucia } = await import("../../app/lib/auth.server");
  const { db } = await import("../../app/lib/db.server");
  const id = randomUUID();
  await db().insert(users).values({ id, email: `bench-${id.slice(0, 8)}@test.larkspur.example`, name: "Benchmark builder", role: "builder", passwordHash: await hashPassword(randomUUID()) });
  const session = await lucia().createSession(id, {});
  return lucia().createSessionCookie(session.id).serialize().split(";")[0];
}

// ---- CLI --------------------------------------------------------------------------------------
if (import.meta.url === `file://${process.argv[1]}`) {
  const args = process.argv.slice(2);
  const arg = (name: string) => {
    const i = args.indexOf(`--${name}`);
    return i >= 0 ? args[i + 1] : undefined;
  };
  const envFile = arg("env");
  if (envFile) Object.assign(process.env, JSON.parse(fs.readFileSync(envFile, "utf8")));
  const baseUrl = process.env.BENCHREEL_URL;
  if (!baseUrl || !process.env.DATABASE_URL) {
    console.error("Needs a running stack: BENCHREEL_URL and DATABASE_URL (or --env path/to/env.json from `npm test -- --keep`).");
    process.exit(2);
  }
  const sizeBytes = parseSize(arg("size") ?? args.find((a) => /^\d/.test(a)) ?? "1G");
  const cookie = await benchSession();
  const result = await benchRecordings({
    baseUrl,
    cookie,
    uploadDir: path.resolve(process.env.UPLOAD_DIR ?? "uploads"),
    sizeBytes,
    chunkBytes: arg("chunk") ? parseSize(arg("chunk")!) : undefined,
    ranges: arg("ranges") ? Number(arg("ranges")) : undefined,
  });
  console.log(JSON.stringify(result, null, 2));
  const { pool } = await import("../../app/lib/db.server");
  await pool().end();
}
