import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import fs from "node:fs/promises";
import { existsSync } from "node:fs";
import path from "node:path";
import { and, eq, sql } from "drizzle-orm";
import type PgBoss from "pg-boss";
import { recordings } from "~/db/schema";
import { attachEmbeddedCaptions } from "../captions/captions.server";
import { db } from "../db.server";
import { formatTime } from "../time-format";
import { env } from "../env.server";
import {
  boss,
  DECODE_QUEUE,
  enqueueDecodeCheck,
  enqueueProcessing,
  listenForJobs,
  PROCESS_QUEUE,
  stopBoss,
  UPLOAD_SWEEP_QUEUE,
} from "./queue.server";
import { originalPath, posterPath, recordingDir, renditionPath } from "./storage.server";
import { dropScratch, fetchOriginal, publishOutput, removeStored, withOriginalFile } from "../storage/recordings.server";
import { holdingJobLock, watchForOrphans } from "./job-liveness.server";
import { scheduleUploadSweep } from "./tus-sweep.server";

export type Probe = {
  formatName: string;
  majorBrand: string | null;
  durationS: number | null;
  /** The first video stream's own duration (the container's may include longer audio). */
  videoDurationS: number | null;
  video: { codec: string; profile: string | null; pixFmt: string | null; width: number; height: number; frameRate: number | null } | null;
  audio: { codec: string } | null;
  /** The first subtitle track's codec (a phone's mov_text), read out as captions (issue 17). */
  subtitle?: { codec: string } | null;
};

type Run = { code: number | null; stdout: string; stderr: string };

/**
 * ffmpeg and ffprobe die with the process that started them. A worker killed with SIGKILL
 * runs no handler, so its children would keep running (and writing) as orphans; instead each
 * is started through util-linux's setpriv, which sets the kernel's parent-death signal
 * (PR_SET_PDEATHSIG = SIGKILL) and then execs the tool, so the kernel kills the child when
 * this process ends, however it ends. Without setpriv (not Linux) the tool starts directly and
 * the sweep at the start of each job (killLeftovers) is the only guard.
 */
const SETPRIV = "/usr/bin/setpriv";
const hasSetpriv = existsSync(SETPRIV);
/** Children still running, killed on a graceful stop (the parent-death signal covers the rest). */
const children = new Set<ChildProcess>();

export function killChildren(): void {
  for (const c of children) c.kill("SIGKILL");
}

function run(cmd: string, args: string[], onStdout?: (chunk: string) => void): Promise<Run> {
  return new Promise((resolve, reject) => {
    const [exe, argv] = hasSetpriv ? [SETPRIV, ["--pdeathsig", "KILL", "--", cmd, ...args]] : [cmd, args];
    const child = spawn(exe, argv, { stdio: ["ignore", "pipe", "pipe"] });
    children.add(child);
    child.on("exit", () => children.delete(child));
    let stdout = "";
    let stderr = "";
    child.stdout.setEncoding("utf8").on("data", (c: string) => {
      if (onStdout) onStdout(c);
      else stdout += c;
    });
    child.stderr.setEncoding("utf8").on("data", (c: string) => {
      stderr = (stderr + c).slice(-8000);
    });
    child.on("error", reject);
    child.on("close", (code) => resolve({ code, stdout, stderr }));
  });
}

function rate(s: string | undefined): number | null {
  if (!s) return null;
  const [a, b] = s.split("/").map(Number);
  const v = b ? a / b : a;
  return Number.isFinite(v) && v > 0 && v < 1000 ? v : null;
}

/** ffprobe the file; null when ffprobe cannot read it as media at all. */
export async function probe(file: string): Promise<Probe | null> {
  const r = await run(env().FFPROBE_PATH, ["-v", "error", "-print_format", "json", "-show_format", "-show_streams", file]);
  if (r.code !== 0) return null;
  let j: { format?: { format_name?: string; duration?: string; tags?: Record<string, string> }; streams?: Record<string, unknown>[] };
  try {
    j = JSON.parse(r.stdout);
  } catch {
    return null;
  }
  const streams = j.streams ?? [];
  const v = streams.find((s) => s.codec_type === "video" && !(s.disposition as { attached_pic?: number } | undefined)?.attached_pic) as
    | Record<string, string & number>
    | undefined;
  const a = streams.find((s) => s.codec_type === "audio") as Record<string, string> | undefined;
  const sub = streams.find((s) => s.codec_type === "subtitle") as Record<string, string> | undefined;
  const duration = Number(j.format?.duration ?? v?.duration);
  const videoDuration = Number(v?.duration);
  return {
    formatName: j.format?.format_name ?? "",
    majorBrand: j.format?.tags?.major_brand?.trim() ?? null,
    durationS: Number.isFinite(duration) && duration > 0 ? duration : null,
    videoDurationS: Number.isFinite(videoDuration) && videoDuration > 0 ? videoDuration : null,
    video: v
      ? {
          codec: String(v.codec_name),
          profile: v.profile ? String(v.profile) : null,
          pixFmt: v.pix_fmt ? String(v.pix_fmt) : null,
          width: Number(v.width) || 0,
          height: Number(v.height) || 0,
          frameRate: rate(v.avg_frame_rate as string) ?? rate(v.r_frame_rate as string),
        }
      : null,
    audio: a ? { codec: String(a.codec_name) } : null,
    subtitle: sub ? { codec: String(sub.codec_name) } : null,
  };
}

/** Top-level MP4/MOV boxes in order, to see whether "moov" comes before "mdat" (faststart). */
export async function topLevelBoxes(file: string, limit = 64): Promise<string[]> {
  const fh = await fs.open(file, "r");
  try {
    const { size } = await fh.stat();
    const out: string[] = [];
    let pos = 0;
    const head = Buffer.alloc(16);
    while (pos + 8 <= size && out.length < limit) {
      await fh.read(head, 0, 16, pos);
      let boxSize = head.readUInt32BE(0);
      const type = head.toString("latin1", 4, 8);
      if (boxSize === 1) boxSize = Number(head.readBigUInt64BE(8));
      else if (boxSize === 0) boxSize = size - pos;
      if (boxSize < 8 || !/^[\x20-\x7e]{4}$/.test(type)) break;
      out.push(type);
      pos += boxSize;
    }
    return out;
  } finally {
    await fh.close();
  }
}

export type Plan = "as-is" | "remux" | "transcode";

/**
 * The browser-safe rendition is H.264 (8-bit 4:2:0) with AAC or no audio, in MP4 with the
 * index (moov) first. A file that is all that is served as it is; one that only lacks
 * faststart is remuxed; anything else (HEVC, ProRes, QuickTime-only, 10-bit…) is transcoded.
 */
export function planFor(p: Probe, boxes: string[]): Plan {
  const v = p.video!;
  const isMp4 = p.formatName.split(",").includes("mp4") && p.majorBrand !== "qt";
  const h264 = v.codec === "h264" && (v.pixFmt === "yuv420p" || v.pixFmt === "yuvj420p") && !/10|4:2:2|4:4:4/.test(v.profile ?? "");
  const audioOk = !p.audio || p.audio.codec === "aac";
  if (!(h264 && audioOk)) return "transcode";
  if (!isMp4) return "remux";
  const moov = boxes.indexOf("moov");
  const mdat = boxes.indexOf("mdat");
  return moov >= 0 && (mdat < 0 || moov < mdat) ? "as-is" : "remux";
}

/** ffmpeg's arguments for the browser-safe rendition (also run bare by scripts/bench/recordings.ts). */
export function renditionArgs(plan: Exclude<Plan, "as-is">, src: string, out: string): string[] {
  const codecs =
    plan === "remux"
      ? ["-c", "copy"]
      : [
          "-c:v",
          "libx264",
          "-preset",
          "veryfast",
          "-crf",
          "23",
          "-pix_fmt",
          "yuv420p",
          "-vf",
          "scale='min(1920,iw)':-2",
          "-threads",
          "2",
          "-c:a",
          "aac",
          "-b:a",
          "128k",
        ];
  return ["-i", src, "-map", "0:v:0", "-map", "0:a:0?", ...codecs, "-movflags", "+faststart", "-f", "mp4", out];
}

async function setProgress(id: string, progress: number) {
  await db().update(recordings).set({ progress, updatedAt: new Date() }).where(eq(recordings.id, id));
}

/** Runs ffmpeg; onSeconds gets the output's time as it grows (from -progress). */
async function ffmpeg(args: string[], onSeconds: (s: number) => void = () => {}): Promise<void> {
  const r = await run(
    env().FFMPEG_PATH,
    ["-hide_banner", "-nostdin", "-y", "-progress", "pipe:1", "-nostats", ...args],
    progressParser(onSeconds),
  );
  if (r.code !== 0) {
    const last = r.stderr.trim().split("\n").slice(-2).join(" ").slice(0, 400);
    throw new Error(`ffmpeg failed: ${last || `exit code ${r.code}`}`);
  }
}

function progressParser(onSeconds: (s: number) => void): (chunk: string) => void {
  let buf = "";
  return (chunk) => {
    buf += chunk;
    const lines = buf.split("\n");
    buf = lines.pop() ?? "";
    for (const line of lines) {
      const m = /^out_time_us=(\d+)/.exec(line);
      if (m) onSeconds(Number(m[1]) / 1e6);
    }
  };
}

export type DecodeCheck = { ok: boolean; decodedS: number; error: string | null };

/**
 * Decodes every frame of the first video stream and throws the pictures away: ffmpeg's own
 * error check (-xerror stops at the first decoding error). A file whose index promises more
 * than its data holds (the first kilobytes of a faststart MP4) probes fine but fails here.
 */
export function decodeCheck(file: string, onSeconds: (s: number) => void = () => {}): Promise<DecodeCheck> {
  return readThrough(file, [], onSeconds);
}

/**
 * Reads every packet of the first video stream without decoding it (a copy to nowhere): a
 * file cut short, or whose index promises more than its data holds, fails or comes out short.
 */
export function packetCheck(file: string): Promise<DecodeCheck> {
  return readThrough(file, ["-c", "copy"], () => {});
}

async function readThrough(file: string, codec: string[], onSeconds: (s: number) => void): Promise<DecodeCheck> {
  let decodedS = 0;
  const r = await run(
    env().FFMPEG_PATH,
    [
      "-hide_banner",
      "-nostdin",
      "-v",
      "error",
      "-xerror",
      "-progress",
      "pipe:1",
      "-nostats",
      "-i",
      file,
      "-map",
      "0:v:0",
      ...codec,
      "-f",
      "null",
      "-",
    ],
    progressParser((sec) => {
      decodedS = sec;
      onSeconds(sec);
    }),
  );
  const error = r.code === 0 ? null : r.stderr.trim().split("\n").slice(-2).join(" ").slice(0, 300) || `exit code ${r.code}`;
  return { ok: r.code === 0, decodedS, error };
}

/** Decoded time may fall short of the stated duration by a frame or two, never by more than this. */
export function durationTolerance(seconds: number): number {
  return Math.max(0.5, seconds * 0.02);
}

/** Why a file does not decode as a whole, in words for the page; null when it does. */
export function damageReason(check: DecodeCheck, expectedS: number): string | null {
  if (check.ok && check.decodedS >= expectedS - durationTolerance(expectedS)) return null;
  const where = check.ok
    ? `only ${formatTime(check.decodedS)} of its ${formatTime(expectedS)} could be played back`
    : `playback breaks off at ${formatTime(check.decodedS)} of ${formatTime(expectedS)}`;
  return `The video is damaged: ${where}. The file may have been cut off or corrupted while it was copied; upload the complete file again. The uploaded file is kept for download.${check.error ? ` (Decoder: ${check.error})` : ""}`;
}

/** A process's command line as its arguments, or null when it has ended. */
async function cmdline(pid: number): Promise<string[] | null> {
  return fs.readFile(`/proc/${pid}/cmdline`, "latin1").then(
    (s) => s.split("\0"),
    () => null,
  );
}

/**
 * Kills ffmpeg/ffprobe processes still working on this recording's files that are not this
 * worker's own children: leftovers of a worker that died mid-job where the parent-death signal
 * could not be set. Found by their command line naming the recording's folder (a recycled pid
 * names something else).
 */
export async function killLeftovers(id: string): Promise<number[]> {
  const dir = recordingDir(id) + path.sep;
  const mine = new Set([...children].map((c) => c.pid));
  const pids = (await fs.readdir("/proc").catch(() => [] as string[])).filter((p) => /^\d+$/.test(p)).map(Number);
  const killed: number[] = [];
  for (const pid of pids) {
    if (pid === process.pid || mine.has(pid)) continue;
    const argv = await cmdline(pid);
    if (!argv || !/ff(mpeg|probe)$/.test(path.basename(argv[0] ?? "")) || !argv.some((a) => a.startsWith(dir))) continue;
    try {
      process.kill(pid, "SIGKILL");
      killed.push(pid);
    } catch {
      /* already gone */
    }
  }
  for (const pid of killed) {
    for (let i = 0; i < 50 && (await cmdline(pid)) !== null; i++) await new Promise((r) => setTimeout(r, 100));
  }
  if (killed.length) console.warn(`[recordings] ${id}: killed leftover ffmpeg ${killed.join(", ")} of an earlier attempt`);
  return killed;
}

/** Temporary outputs are named per attempt, so two attempts can never write the same file. */
function attemptTemp(finalPath: string, attempt: string, ext: string): string {
  return `${finalPath}.${attempt}.tmp${ext}`;
}

async function removeTemps(id: string): Promise<void> {
  const dir = recordingDir(id);
  for (const f of await fs.readdir(dir).catch(() => [] as string[]))
    if (/\.tmp(\.\w+)?$/.test(f)) await fs.rm(path.join(dir, f), { force: true });
}

async function exists(p: string) {
  return fs.stat(p).then(
    () => true,
    () => false,
  );
}

/** Reject: the bytes are not a video. The original is removed; the row keeps the reason. */
async function reject(id: string, reason: string) {
  await removeStored(id);
  await fs.rm(recordingDir(id), { recursive: true, force: true });
  await db()
    .update(recordings)
    .set({
      state: "rejected",
      stateReason: reason,
      hasOriginal: false,
      hasPoster: false,
      hasRendition: false,
      progress: 1,
      updatedAt: new Date(),
    })
    .where(eq(recordings.id, id));
}

/**
 * The processing job: one probe, then the source checked once (every packet read for a file
 * that is already H.264, every picture decoded by the transcode itself for one that is not)
 * with the poster and a remux running beside it → ready (or rejected, or damaged); a file that
 * was not transcoded has its pictures decoded after "Ready". Idempotent. Each attempt first kills leftovers of an earlier one and writes only
 * to temporary files of its own; a rendition replaces nothing until every packet of it reads
 * back and it lasts as long as the source (docs/decisions/003).
 */
export async function processRecording(id: string): Promise<"ready" | "rejected" | "damaged" | "skipped"> {
  // Work started beside the main line (the poster, embedded captions) reads the scratch copy too.
  const beside: Promise<unknown>[] = [];
  try {
    return await processOnce(id, beside);
  } finally {
    // The scratch copy of an original kept in object storage leaves the worker's disk in every
    // outcome (ready, rejected, damaged, failed, a retry to come: it streams the original again).
    await Promise.allSettled(beside);
    await dropScratch(id).catch((err) => console.warn(`[recordings] ${id}: scratch copy not removed: ${(err as Error).message}`));
  }
}

async function processOnce(id: string, beside: Promise<unknown>[]): Promise<"ready" | "rejected" | "damaged" | "skipped"> {
  const [rec] = await db().select().from(recordings).where(eq(recordings.id, id));
  if (!rec || rec.state === "ready" || rec.state === "rejected" || rec.state === "damaged") return "skipped";
  await killLeftovers(id);
  await removeTemps(id);
  const attempt = `${process.pid}-${randomBytes(4).toString("hex")}`;
  await db()
    .update(recordings)
    .set({ attempts: sql`${recordings.attempts} + 1`, state: "processing", stateReason: null, progress: 0.02, updatedAt: new Date() })
    .where(eq(recordings.id, id));
  const src = originalPath(id);
  // In object storage the worker works on a scratch copy (docs/decisions/013).
  if (!(await fetchOriginal(id)) || !(await exists(src))) {
    await db()
      .update(recordings)
      .set({ state: "failed", stateReason: "The uploaded file is missing from the store.", hasOriginal: false, updatedAt: new Date() })
      .where(eq(recordings.id, id));
    return "skipped";
  }
  const p = await probe(src);
  if (!p) {
    await reject(
      id,
      "This file is not a video the shop can read (ffprobe found no media in it). It may be another kind of file, or truncated.",
    );
    return "rejected";
  }
  if (!p.video || p.video.width === 0) {
    await reject(
      id,
      p.audio
        ? "This file has sound but no picture; only videos can be recordings."
        : "This file has no video stream; only videos can be recordings.",
    );
    return "rejected";
  }
  if (!p.durationS || /^(image2|png_pipe|jpeg_pipe|gif|webp_pipe)/.test(p.formatName)) {
    await reject(id, "This file is a still image or has no duration; only videos can be recordings.");
    return "rejected";
  }
  await db()
    .update(recordings)
    .set({
      container: p.majorBrand ? `${p.formatName} (${p.majorBrand})` : p.formatName,
      videoCodec: p.video.codec,
      audioCodec: p.audio?.codec ?? null,
      width: p.video.width,
      height: p.video.height,
      frameRate: p.video.frameRate,
      durationS: p.durationS,
      progress: 0.08,
      updatedAt: new Date(),
    })
    .where(eq(recordings.id, id));

  // One ffprobe said what the file is; the plan follows from it and the box order.
  const expectedS = p.videoDurationS ?? p.durationS;
  const plan = planFor(p, await topLevelBoxes(src).catch(() => []));
  // The poster (one frame) is made while the long work runs and shown as soon as it is there.
  const poster = makePoster(id, src, p.durationS, attemptTemp(posterPath(id), attempt, ".jpg"));
  poster.catch(() => {}); // awaited below; never an unhandled rejection meanwhile
  beside.push(poster);
  // A subtitle track inside the file becomes the recording's captions, read out beside the long work.
  const captions = p.subtitle
    ? attachEmbeddedCaptions(id, src, p.durationS, p.subtitle.codec, (args) => run(env().FFMPEG_PATH, args)).catch((err) =>
        console.warn(`[captions] ${id}: ${err instanceof Error ? err.message : err}`),
      )
    : undefined;
  if (captions) beside.push(captions);
  const tmp = attemptTemp(renditionPath(id), attempt, ".mp4");
  let made = plan === "transcode" ? await transcodeChecked(id, src, expectedS, tmp) : await decodeAndCopy(src, expectedS, plan, tmp);
  if (!("damage" in made) && plan !== "as-is") {
    // Verified before it replaces anything: every packet of the new file reads back and it
    // lasts as long as the source decoded. A transcode that comes out short may be the
    // source's fault (its audio can outlast a cut-off picture): then the source is checked.
    const check = await packetCheck(tmp);
    if (!check.ok || Math.abs(check.decodedS - made.decodedS) > durationTolerance(made.decodedS)) {
      await fs.rm(tmp, { force: true });
      const damage = plan === "transcode" ? damageReason(await decodeCheck(src), expectedS) : null;
      if (!damage)
        throw new Error(
          `the browser copy did not verify (${check.ok ? `it lasts ${formatTime(check.decodedS)}, the source ${formatTime(made.decodedS)}` : `it does not read back: ${check.error}`})`,
        );
      made = { damage };
    }
  }
  if ("damage" in made) {
    await Promise.allSettled([poster]);
    await removeTemps(id);
    await db()
      .update(recordings)
      .set({ state: "damaged", stateReason: made.damage, progress: 1, updatedAt: new Date() })
      .where(eq(recordings.id, id));
    return "damaged";
  }
  await poster;
  await captions;
  if (plan !== "as-is") await fs.rename(tmp, renditionPath(id));
  if (plan !== "as-is") await publishOutput(id, "web.mp4");
  // Sent before "Ready" is written, so no moment exists where the file is ready with no check to come.
  if (plan !== "transcode") await enqueueDecodeCheck(id, expectedS);
  await db()
    .update(recordings)
    .set({ state: "ready", stateReason: null, progress: 1, hasRendition: plan !== "as-is", readyAt: new Date(), updatedAt: new Date() })
    .where(eq(recordings.id, id));
  return "ready";
}

/** Poster: a frame a little way in (or the first, when seeking fails), at most 640 px wide. */
async function makePoster(id: string, src: string, durationS: number, tmp: string): Promise<void> {
  const frame = ["-frames:v", "1", "-vf", "scale='min(640,iw)':-2", "-q:v", "4", tmp];
  const at = Math.min(2, durationS / 10);
  await ffmpeg(["-ss", at.toFixed(2), "-i", src, ...frame]).catch(() => ffmpeg(["-i", src, ...frame]));
  await fs.rename(tmp, posterPath(id));
  await publishOutput(id, "poster.jpg");
  await db().update(recordings).set({ hasPoster: true, updatedAt: new Date() }).where(eq(recordings.id, id));
}

type Made = { decodedS: number } | { damage: string };

/**
 * A file that is already H.264 is checked before "Ready" by reading every packet of its video
 * (a file cut short, or whose index promises more than its data holds, fails or comes out
 * short) while the remux, which copies packets, runs beside it. Its pictures are decoded after
 * "Ready" (`checkDecodeAfterReady`): that costs as long as playing the file through at full speed.
 */
async function decodeAndCopy(src: string, expectedS: number, plan: "as-is" | "remux", out: string): Promise<Made> {
  const copy = plan === "remux" ? ffmpeg(renditionArgs("remux", src, out)) : Promise.resolve();
  copy.catch(() => {}); // awaited below, after the check
  const source = await packetCheck(src);
  const damage = damageReason(source, expectedS);
  if (damage) {
    await Promise.allSettled([copy]);
    return { damage };
  }
  await copy;
  return { decodedS: source.decodedS };
}

/**
 * Every picture of a file that was not transcoded, decoded after it became ready (a job of its
 * own, DECODE_QUEUE, one file at a time beside the processing jobs, so the next upload's job
 * does not wait for it): a file whose packets are all there but whose pictures do not decode is
 * then marked damaged with the reason.
 */
export async function checkDecodeAfterReady(id: string, expectedS: number): Promise<"ok" | "damaged" | "skipped"> {
  const [rec] = await db().select({ state: recordings.state }).from(recordings).where(eq(recordings.id, id));
  // The job is sent a moment before "Ready" is written; one that starts in that moment is retried.
  if (rec?.state === "processing") throw new Error("not ready yet");
  if (rec?.state !== "ready") return "skipped";
  // A copy of its own (in object storage): the processing job removes its scratch copy as it ends.
  const checked = await withOriginalFile(id, async (file) => ({ damage: damageReason(await decodeCheck(file), expectedS) }));
  if (!checked) return "skipped";
  const { damage } = checked;
  if (!damage) return "ok";
  await db()
    .update(recordings)
    .set({ state: "damaged", stateReason: damage, updatedAt: new Date() })
    .where(and(eq(recordings.id, id), eq(recordings.state, "ready")));
  return "damaged";
}

/**
 * A file that needs transcoding is decoded once, by the transcode itself, which stops at the
 * first decoding error (-xerror) like the damage check. Only when that run fails or comes out
 * short is the source checked on its own: damaged, or not (a source whose picture decodes
 * cleanly is transcoded once more without the error stop, as it always was).
 */
async function transcodeChecked(id: string, src: string, expectedS: number, out: string): Promise<Made> {
  let reached = 0;
  const progress = throttled(id, (sec) => 0.08 + 0.9 * Math.min(1, sec / expectedS));
  const failed = await ffmpeg(["-xerror", ...renditionArgs("transcode", src, out)], (sec) => {
    reached = sec;
    progress(sec);
  }).then(
    () => false,
    () => true,
  );
  if (!failed && reached >= expectedS - durationTolerance(expectedS)) return { decodedS: expectedS };
  const source = await decodeCheck(src);
  const damage = damageReason(source, expectedS);
  if (damage) return { damage };
  if (!failed) return { decodedS: source.decodedS };
  await ffmpeg(renditionArgs("transcode", src, out), progress);
  return { decodedS: source.decodedS };
}

/** Progress as seconds of media done, mapped to 0..1 and written at most once a second. */
function throttled(id: string, toProgress: (sec: number) => number): (sec: number) => void {
  let last = 0;
  return (sec) => {
    const now = Date.now();
    if (now - last < 1000) return;
    last = now;
    void setProgress(id, toProgress(sec));
  };
}

/** How long a recording may be in "processing" with no job before the worker gives it one, and how often it looks. */
const UNQUEUED_AFTER_S = 60;
const UNQUEUED_EVERY_MS = 30_000;
/** The advisory lock under which one worker at a time looks ("unq" in ASCII, apart from the others' classes). */
const UNQUEUED_LOCK = 0x756e71;

/**
 * Gives a fresh job to each recording in "processing" that has no job waiting or running and
 * has not changed for `olderThanS` seconds: the app committed the finished upload but could not
 * send its job (the database refused it, or the app stopped in between), or it was enqueued
 * while the queue was down. One worker looks at a time (an advisory lock held while it sends),
 * so two never send a job for the same recording. Returns the ids it sent jobs for.
 */
export async function enqueueUnqueued(olderThanS: number): Promise<string[]> {
  return db().transaction(async (tx) => {
    const { rows: lock } = await tx.execute<{ ok: boolean }>(sql`select pg_try_advisory_xact_lock(${UNQUEUED_LOCK}) as ok`);
    if (!lock[0]?.ok) return [];
    const { rows } = await tx.execute<{ id: string }>(sql`
      select r.id from recordings r
      where r.state = 'processing'
        and r.updated_at <= now() - make_interval(secs => ${olderThanS})
        and not exists (select 1 from pgboss.job j where j.name = ${PROCESS_QUEUE} and j.data->>'recordingId' = r.id::text and j.state in ('created','retry','active'))`);
    for (const r of rows) await enqueueProcessing(r.id);
    if (rows.length && olderThanS > 0)
      console.warn(`[recordings] sent the jobs missing for ${rows.length} recording(s): ${rows.map((r) => r.id).join(", ")}`);
    return rows.map((r) => r.id);
  });
}

/** The worker side: work the queue; a throw is retried by pg-boss, the last failure is shown. */
export async function startRecordingJobs(): Promise<{ stop: () => Promise<void> }> {
  const b = await boss({ worker: true });
  const workerId = await b.work<{ recordingId: string }>(
    PROCESS_QUEUE,
    { batchSize: 1, pollingIntervalSeconds: 1, includeMetadata: true },
    async ([job]: PgBoss.JobWithMetadata<{ recordingId: string }>[]) => {
      const id = job.data.recordingId;
      try {
        const outcome = await holdingJobLock(job.id, () => processRecording(id));
        console.log(`[recordings] ${id}: ${outcome}`);
      } catch (err) {
        const message = (err as Error).message;
        const final = job.retryCount >= job.retryLimit;
        console.error(`[recordings] ${id} attempt ${job.retryCount + 1} failed: ${message}`);
        await db()
          .update(recordings)
          .set(
            final
              ? { state: "failed", stateReason: `Processing failed: ${message}`, updatedAt: new Date() }
              : { stateReason: `Attempt ${job.retryCount + 1} failed; retrying shortly. (${message})`, updatedAt: new Date() },
          )
          .where(eq(recordings.id, id));
        throw err;
      }
    },
  );
  // At start-up, every recording left in "processing" with no waiting job gets a fresh one
  // (processing is idempotent and skips a recording that is already ready); afterwards, every
  // half minute, those that have waited so for a while (see enqueueUnqueued).
  await enqueueUnqueued(0);
  // A job still active whose worker died (no live worker holds its lock, with several workers
  // on one database too) is failed into pg-boss's retry now instead of at its expiry, and
  // another worker takes it over (job-liveness.server.ts).
  const orphans = watchForOrphans(b, [PROCESS_QUEUE, DECODE_QUEUE]);
  await b.work<{ recordingId: string; expectedS: number }>(DECODE_QUEUE, { batchSize: 1, pollingIntervalSeconds: 1 }, async ([job]) => {
    const outcome = await holdingJobLock(job.id, () => checkDecodeAfterReady(job.data.recordingId, job.data.expectedS));
    if (outcome === "damaged") console.log(`[recordings] ${job.data.recordingId}: damaged (found after ready)`);
  });
  await scheduleUploadSweep(b);
  const listener = listenForJobs(() => b.notifyWorker(workerId));
  const unqueued = setInterval(
    () => void enqueueUnqueued(UNQUEUED_AFTER_S).catch((err) => console.error("[recordings] unqueued check:", (err as Error).message)),
    UNQUEUED_EVERY_MS,
  );
  unqueued.unref();
  return {
    async stop() {
      orphans.stop();
      clearInterval(unqueued);
      await listener.stop();
      await b.offWork(PROCESS_QUEUE);
      await b.offWork(DECODE_QUEUE);
      await b.offWork(UPLOAD_SWEEP_QUEUE);
      await stopBoss();
    },
  };
}

/** Editors' "retry" of a failed recording. */
export async function retryRecording(id: string): Promise<void> {
  await db()
    .update(recordings)
    .set({ state: "processing", stateReason: null, progress: 0, updatedAt: new Date() })
    .where(eq(recordings.id, id));
  await enqueueProcessing(id);
}

let started: Promise<unknown> | null = null;
/** The worker's periodic task: starts the queue worker once, and again after a failure. */
export async function ensureRecordingJobs(): Promise<void> {
  started ??= startRecordingJobs().catch((err) => {
    started = null;
    throw err;
  });
  await started;
}
