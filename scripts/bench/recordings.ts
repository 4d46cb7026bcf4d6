// Benchmark of the recordings path (not a test): a large tus upload over loopback against the
// running app, beside the raw write speed of the same disk (dd … conv=fdatasync) measured in
// the same run; the app server's memory (RSS) while it streams the upload; the time to first
// byte of Range requests into the middle of the uploaded file; and processing, from the end
// of an upload to "Ready", for a 60 s 1080p clip that is remuxed and one that is transcoded,
// beside ffmpeg run bare with the same arguments.
//
//   npx tsx scripts/bench/recordings.ts --size 1G [--env .data/…/run/env.json] [--chunk 64M] [--ranges 200] [--processing-runs 2]
//
// It needs a running stack with its worker (BENCHREEL_URL, DATABASE_URL, UPLOAD_DIR in the
// environment, or --env pointing at the env.json that `npm test -- --keep` writes). Targets
// (issue 15): upload ≥ 60 % of the raw write speed; Range time to first byte p95 ≤ 15 ms;
// upload done → Ready ≤ 1.15 × bare ffmpeg for the transcoded clip, ≤ 3 s for the remuxed
// one (medians). Kept from issue 4: server memory grows by < 150 MB during a 2 GB upload.
import { execFileSync } from "node:child_process";
import { randomBytes, randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import os from "node:os";
import { renditionArgs } from "../../app/lib/recordings/processing.server";
import { listenerPid, rssBytes } from "./proc";

const FFMPEG = "/usr/bin/ffmpeg";

export type RecordingsBenchOptions = {
  baseUrl: string;
  cookie: string;
  uploadDir: string;
  sizeBytes: number;
  chunkBytes?: number;
  ranges?: number;
  /** Transcode runs of the processing benchmark (remux: one more); 0 leaves processing out. */
  processingRuns?: number;
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
  processing: ProcessingBenchResult | null;
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
  execFileSync(FFMPEG, [
    "-hide_banner",
    "-loglevel",
    "error",
    "-y",
    "-f",
    "lavfi",
    "-i",
    "testsrc=duration=5:size=320x240:rate=25",
    "-pix_fmt",
    "yuv420p",
    "-c:v",
    "libx264",
    "-movflags",
    "+faststart",
    head,
  ]);
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

async function tusUpload(
  opts: RecordingsBenchOptions,
  file: string,
  fileName = "bench-run.mp4",
): Promise<{ seconds: number; recordingId: string | null; doneAt: number }> {
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
      metadata: {
        filename: fileName,
        filetype: fileName.endsWith(".mov") ? "video/quicktime" : "video/mp4",
        title: `Benchmark upload ${new Date().toISOString()}`,
        tags: "benchmark",
      },
      onAfterResponse: (_req, res) => {
        recordingId = res.getHeader("Benchreel-Recording") ?? recordingId;
      },
      onSuccess: () => resolve(),
      onError: reject,
    });
    u.start();
  });
  return { seconds: (performance.now() - t0) / 1000, recordingId, doneAt: Date.now() };
}

async function ttfb(
  opts: RecordingsBenchOptions,
  n: number,
  request: () => { url: string; headers: Record<string, string>; status: number },
) {
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

/**
 * The processing clips, 60 s of 1080p at 25 fps from ffmpeg's test source with a tone: H.264
 * (8-bit 4:2:0) and AAC in an MP4 whose index comes last, which processing only remuxes; and
 * MPEG-4 part 2 with PCM sound in a QuickTime file, which it transcodes. Made once and kept
 * in the temporary folder (they take a minute or two to encode here).
 */
function processingClips(log: (s: string) => void): { remux: string; transcode: string } {
  const dir = path.join(os.tmpdir(), "benchreel-bench-clips-v1");
  fs.mkdirSync(dir, { recursive: true });
  const src = ["-f", "lavfi", "-i", "testsrc2=duration=60:size=1920x1080:rate=25", "-f", "lavfi", "-i", "sine=frequency=440:duration=60"];
  const clips = {
    remux: {
      file: path.join(dir, "h264-1080p-60s.mp4"),
      codecs: ["-pix_fmt", "yuv420p", "-c:v", "libx264", "-preset", "veryfast", "-crf", "23", "-c:a", "aac"],
    },
    transcode: { file: path.join(dir, "mpeg4-1080p-60s.mov"), codecs: ["-c:v", "mpeg4", "-q:v", "4", "-c:a", "pcm_s16le"] },
  };
  for (const c of Object.values(clips)) {
    if (fs.existsSync(c.file)) continue;
    log(`making ${path.basename(c.file)}…`);
    execFileSync(FFMPEG, ["-hide_banner", "-loglevel", "error", "-y", ...src, ...c.codecs, `${c.file}.part${path.extname(c.file)}`]);
    fs.renameSync(`${c.file}.part${path.extname(c.file)}`, c.file);
  }
  return { remux: clips.remux.file, transcode: clips.transcode.file };
}

/** ffmpeg alone with the rendition's own arguments: the floor processing is measured against. */
function bareRendition(plan: "remux" | "transcode", src: string, workDir: string): number {
  const out = path.join(workDir, `bare-${plan}.mp4`);
  const t0 = performance.now();
  execFileSync(FFMPEG, ["-hide_banner", "-nostdin", "-y", "-v", "error", ...renditionArgs(plan, src, out)]);
  const seconds = (performance.now() - t0) / 1000;
  fs.rmSync(out, { force: true });
  return seconds;
}

/** Upload a clip through tus; seconds from the upload's completion to the recording's readyAt. */
async function uploadToReady(opts: RecordingsBenchOptions, file: string): Promise<number> {
  const { db } = await import("../../app/lib/db.server");
  const { recordings } = await import("../../app/db/schema");
  const { eq } = await import("drizzle-orm");
  const up = await tusUpload(opts, file, path.basename(file));
  if (!up.recordingId) throw new Error("the upload finished without a recording id");
  const deadline = Date.now() + 900_000;
  for (;;) {
    const [r] = await db()
      .select({ state: recordings.state, reason: recordings.stateReason, readyAt: recordings.readyAt })
      .from(recordings)
      .where(eq(recordings.id, up.recordingId));
    if (r?.state === "ready" && r.readyAt) {
      // Each run starts with the worker idle: the decode check that follows "Ready" for a file
      // that was not transcoded is waited out here, outside the measure.
      await workerIdle(up.recordingId, opts.uploadDir);
      return (r.readyAt.getTime() - up.doneAt) / 1000;
    }
    if (r && r.state !== "processing") throw new Error(`${path.basename(file)}: recording ${r.state}: ${r.reason}`);
    if (Date.now() > deadline) throw new Error(`${path.basename(file)}: not ready in 15 minutes`);
    await new Promise((res) => setTimeout(res, 50));
  }
}

/** Waits until no ffmpeg works on this recording's files (found by its command line). */
async function workerIdle(recordingId: string, uploadDir: string): Promise<void> {
  const dir = path.join(path.resolve(uploadDir), "recordings", recordingId);
  const busy = () =>
    fs
      .readdirSync("/proc")
      .filter((p) => /^\d+$/.test(p))
      .some((pid) => {
        try {
          const argv = fs.readFileSync(`/proc/${pid}/cmdline`, "latin1").split("\0");
          return /ff(mpeg|probe)$/.test(argv[0] ?? "") && argv.some((a) => a.startsWith(dir));
        } catch {
          return false;
        }
      });
  for (let i = 0; i < 6000 && busy(); i++) await new Promise((res) => setTimeout(res, 100));
}

const median = (xs: number[]) => quantile(xs, 0.5);

export type ProcessingBenchResult = {
  remux: { readySeconds: number[]; medianS: number; bareFfmpegS: number[] };
  transcode: { readySeconds: number[]; medianS: number; bareFfmpegS: number[]; bareMedianS: number; ratio: number };
  loadAverage: number[];
  targets: { remux: boolean; transcodeRatio: boolean };
};

/**
 * Processing, measured as a person feels it: from the end of the upload to "Ready", beside
 * ffmpeg run bare with the same arguments in the same run. The transcode runs alternate
 * (bare, app, app, bare…) so that a change in the machine's load falls on both sides.
 */
export async function benchProcessing(opts: RecordingsBenchOptions & { runs?: number }): Promise<ProcessingBenchResult> {
  const log = opts.log ?? console.log;
  const runs = opts.runs ?? 2;
  const workDir = fs.mkdtempSync(path.join(os.tmpdir(), "benchreel-bench-proc-"));
  const clips = processingClips(log);
  const remux = { readySeconds: [] as number[], bareFfmpegS: [] as number[] };
  for (let i = 0; i < runs + 1; i++) {
    remux.bareFfmpegS.push(bareRendition("remux", clips.remux, workDir));
    remux.readySeconds.push(await uploadToReady(opts, clips.remux));
  }
  log(
    `remux: upload done → Ready ${remux.readySeconds.map((x) => x.toFixed(2)).join(", ")} s (bare ffmpeg remux ${remux.bareFfmpegS.map((x) => x.toFixed(2)).join(", ")} s)`,
  );
  const transcode = { readySeconds: [] as number[], bareFfmpegS: [] as number[] };
  for (let i = 0; i < runs; i++) {
    const bareFirst = i % 2 === 0;
    if (bareFirst) transcode.bareFfmpegS.push(bareRendition("transcode", clips.transcode, workDir));
    transcode.readySeconds.push(await uploadToReady(opts, clips.transcode));
    if (!bareFirst) transcode.bareFfmpegS.push(bareRendition("transcode", clips.transcode, workDir));
  }
  fs.rmSync(workDir, { recursive: true, force: true });
  const medianS = median(transcode.readySeconds);
  const bareMedianS = median(transcode.bareFfmpegS);
  log(
    `transcode: upload done → Ready ${transcode.readySeconds.map((x) => x.toFixed(1)).join(", ")} s; bare ffmpeg ${transcode.bareFfmpegS.map((x) => x.toFixed(1)).join(", ")} s; ratio of medians ${(medianS / bareMedianS).toFixed(2)}`,
  );
  return {
    remux: { ...remux, medianS: median(remux.readySeconds) },
    transcode: { ...transcode, medianS, bareMedianS, ratio: medianS / bareMedianS },
    loadAverage: os.loadavg().map((x) => Number(x.toFixed(2))),
    targets: { remux: median(remux.readySeconds) <= 3, transcodeRatio: medianS / bareMedianS <= 1.15 },
  };
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
  log(
    `tus upload: ${uploadMBps.toFixed(0)} MB/s (${up.seconds.toFixed(1)} s); server RSS ${rssBefore?.toFixed(0)} → peak ${peak?.toFixed(0)} MB`,
  );
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
  log(
    `Range TTFB over ${ranges.n} requests: median ${ranges.medianMs.toFixed(2)} ms, p95 ${ranges.p95Ms.toFixed(2)} ms (GET /api/me: median ${baseline.medianMs.toFixed(2)} ms, p95 ${baseline.p95Ms.toFixed(2)} ms)`,
  );
  fs.rmSync(workDir, { recursive: true, force: true });

  const growth = rssBefore != null && peak != null ? peak - rssBefore : null;
  const ratio = uploadMBps / disk.MBps;
  const loadAverage = os.loadavg().map((x) => Number(x.toFixed(2)));
  const processing = opts.processingRuns === 0 ? null : await benchProcessing({ ...opts, runs: opts.processingRuns });
  return {
    sizeBytes: size,
    upload: { seconds: up.seconds, MBps: uploadMBps },
    rawDisk: disk,
    uploadToDiskRatio: ratio,
    serverMemory: { pid, baselineMB: rssBefore, peakMB: peak, growthMB: growth },
    rangeTTFB: ranges,
    baselineTTFB: baseline,
    loadAverage,
    targets: { uploadRatio: ratio >= 0.6, memory: growth == null ? null : growth < 150, rangeP95: ranges.p95Ms <= 15 },
    processing,
  };
}

/** A signed-in session for a throw-away builder (made directly in the database, as the tests do). */
export async function benchSession(): Promise<string> {
  const { users } = await import("../../app/db/schema");
  const { hashPassword, lucia } = await import("../../app/lib/auth.server");
  const { db } = await import("../../app/lib/db.server");
  const id = randomUUID();
  await db()
    .insert(users)
    .values({
      id,
      email: `bench-${id.slice(0, 8)}@test.larkspur.example`,
      name: "Benchmark builder",
      role: "builder",
      passwordHash: await hashPassword(randomUUID()),
    });
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
    processingRuns: arg("processing-runs") ? Number(arg("processing-runs")) : undefined,
  });
  console.log(JSON.stringify(result, null, 2));
  const { pool } = await import("../../app/lib/db.server");
  await pool().end();
}
