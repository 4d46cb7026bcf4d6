// Recordings, faults: a damaged video (its index promises more than its data holds, or its
// pictures do not decode: found after Ready) is marked damaged with the reason; and a worker
// killed with SIGKILL in the middle of a transcode takes its ffmpeg with it, and the retried job publishes a rendition that decodes
// in full; a worker killed during the decode after Ready leaves that decode to the next worker.
// The worker is killed and started again through the test run's control server
// (scripts/test.mjs, WORKER_CONTROL_URL).
import { execFile, spawn } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { promisify } from "node:util";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { recordings } from "~/db/schema";
import { db } from "~/lib/db.server";
import { killLeftovers } from "~/lib/recordings/processing.server";
import { recordingDir } from "~/lib/recordings/storage.server";
import { createUser, http, waitFor, type TestUser } from "../support/app";

const work = path.join(process.env.BENCHREEL_RUN_DIR ?? fs.mkdtempSync("/tmp/br-rec-"), "recordings-faults");
fs.mkdirSync(work, { recursive: true });
const TUS = { "Tus-Resumable": "1.0.0" };
const b64 = (s: string) => Buffer.from(s).toString("base64");

let builder: TestUser;

// ffmpeg runs without blocking the event loop: a test that blocked it for seconds would send its
// next request on a kept-alive connection the server had closed meanwhile ("other side closed").
const run = promisify(execFile);

async function ffmpeg(args: string[]) {
  await run("/usr/bin/ffmpeg", ["-hide_banner", "-loglevel", "error", "-y", ...args]);
}

/** An H.264 clip (3 s unless told) with its index first (faststart), as a phone's upload; its path. */
async function faststartClip(name: string, lavfi = "testsrc=duration=3:size=320x240:rate=25", encoder: string[] = []): Promise<string> {
  const file = path.join(work, name);
  await ffmpeg(["-f", "lavfi", "-i", lavfi, ...encoder, "-pix_fmt", "yuv420p", "-c:v", "libx264", "-movflags", "+faststart", file]);
  return file;
}

/**
 * The bytes of an MP4 with a run of the middle of its media data (mdat) overwritten: the boxes,
 * the index and every packet's size stay as they were, so every packet reads, but the pictures
 * there do not decode.
 */
function garbledMediaData(file: string, at = 0.5): Buffer {
  const bytes = Buffer.from(fs.readFileSync(file));
  for (let pos = 0; pos + 8 <= bytes.length; ) {
    const size = bytes.readUInt32BE(pos);
    if (bytes.toString("latin1", pos + 4, pos + 8) === "mdat") {
      const start = pos + 8 + Math.floor((size - 8) * at);
      for (let i = 0; i < 2000; i++) bytes[start + i] = (i * 73 + 17) & 0xff;
      return bytes;
    }
    if (size < 8) break;
    pos += size;
  }
  throw new Error(`${file} has no mdat box`);
}

/** Uploads bytes in one PATCH; the recording's id. */
async function uploadBytes(bytes: Buffer, name: string): Promise<string> {
  const created = await http("/api/uploads", {
    method: "POST",
    cookie: builder.cookie,
    headers: { ...TUS, "Upload-Length": String(bytes.length), "Upload-Metadata": `filename ${b64(name)}` },
  });
  const id = path.basename(created.headers.get("location")!);
  const done = await http(`/api/uploads/${id}`, {
    method: "PATCH",
    cookie: builder.cookie,
    headers: { ...TUS, "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream" },
    body: new Uint8Array(bytes),
  });
  expect(done.status).toBe(204);
  return done.headers.get("benchreel-recording")!;
}

type Rec = { id: string; state: string; stateReason: string | null; progress: number; durationS: number; hasRendition: boolean };
const recording = async (id: string) =>
  ((await (await http(`/api/recordings/${id}`, { cookie: builder.cookie })).json()) as { recording: Rec }).recording;
const settled = (id: string, timeoutMs = 60_000) =>
  waitFor(async () => ((r) => (r.state !== "processing" ? r : null))(await recording(id)), timeoutMs, 300);

/** Frames and seconds that decode from a file, and whether ffmpeg's error check passes. */
async function decode(file: string): Promise<{ frames: number; seconds: number; clean: boolean }> {
  let clean = true;
  let out = "";
  try {
    out = (
      await run("/usr/bin/ffmpeg", [
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
        "-f",
        "null",
        "-",
      ])
    ).stdout;
  } catch (err) {
    clean = false;
    out = String((err as { stdout?: Buffer }).stdout ?? "");
  }
  const last = (key: string) => Number([...out.matchAll(new RegExp(`^${key}=(\\d+)`, "gm"))].pop()?.[1] ?? 0);
  return { frames: last("frame"), seconds: last("out_time_us") / 1e6, clean };
}

/** ffmpeg/ffprobe processes whose command line names this recording's folder. */
function ffmpegFor(recordingId: string): number[] {
  const dir = recordingDir(recordingId) + path.sep;
  return fs
    .readdirSync("/proc")
    .filter((p) => /^\d+$/.test(p))
    .filter((pid) => {
      try {
        const argv = fs.readFileSync(`/proc/${pid}/cmdline`, "latin1").split("\0");
        return /ff(mpeg|probe)$/.test(argv[0]) && argv.some((a) => a.startsWith(dir));
      } catch {
        return false;
      }
    })
    .map(Number);
}

const control = (what: "kill" | "start") => fetch(`${process.env.WORKER_CONTROL_URL}/worker/${what}`, { method: "POST" });

beforeAll(async () => {
  builder = await createUser("builder");
});

describe("damaged video", () => {
  it("marks the first 6,000 bytes of a faststart MP4 damaged with the reason, not ready; the original is kept", async () => {
    const whole = await faststartClip("faststart.mp4");
    const head = fs.readFileSync(whole).subarray(0, 6000);
    const id = await uploadBytes(head, "cut-short.mp4");
    const rec = await settled(id);
    expect(rec.state).toBe("damaged");
    expect(rec.stateReason).toMatch(/^The video is damaged: /);
    expect(rec.stateReason).toMatch(/of 0:03\.0/);
    expect((await http(`/api/recordings/${id}/media`, { cookie: builder.cookie })).status).toBe(409);
    const original = await http(`/api/recordings/${id}/original`, { cookie: builder.cookie });
    expect(Buffer.from(await original.arrayBuffer()).equals(head)).toBe(true);
    // The page says it in words.
    const page = await (await http(`/recordings/${id}`, { cookie: builder.cookie })).text();
    expect(page).toContain("The video is damaged");
  });

  it("is not offered to Save as readings, and refuses readings with the reason (409, nothing stored); a ready one takes them", async () => {
    const whole = await faststartClip("faststart-for-readings.mp4");
    const damaged = await uploadBytes(fs.readFileSync(whole).subarray(0, 6000), "cut-short-readings.mp4");
    const ready = await uploadBytes(fs.readFileSync(whole), "whole-readings.mp4");
    expect((await settled(damaged)).state).toBe("damaged");
    expect((await settled(ready)).state).toBe("ready");

    type Listed = { recordings: { id: string; state: string }[] };
    const listed = async (q: string) =>
      ((await (await http(`/api/recordings?${q}`, { cookie: builder.cookie })).json()) as Listed).recordings.map((r) => r.id);
    // The library lists both; the list the calculators' "Save as readings" asks for has only the ready one.
    expect(await listed("sort=newest")).toEqual(expect.arrayContaining([damaged, ready]));
    const targets = await listed("sort=newest&for=readings");
    expect(targets).toContain(ready);
    expect(targets).not.toContain(damaged);
    expect((await http("/api/recordings?for=marks", { cookie: builder.cookie })).status).toBe(422);

    const bench = {
      readings: [
        { quantity: "torque", value: 110, unit: "N.m", label: "bench point 1" },
        { quantity: "clamp-load", value: 51, unit: "kN", label: "bench point 1" },
      ],
    };
    const post = (id: string) => http(`/api/recordings/${id}/readings`, { method: "POST", cookie: builder.cookie, json: bench });
    const refused = await post(damaged);
    expect(refused.status).toBe(409);
    expect(await refused.json()).toMatchObject({ error: "conflict", reason: expect.stringMatching(/video is damaged/), state: "damaged" });
    const stored = (await (await http(`/api/recordings/${damaged}/readings`, { cookie: builder.cookie })).json()) as {
      readings: unknown[];
    };
    expect(stored.readings).toHaveLength(0);
    expect((await post(ready)).status).toBe(201);
  });

  it("marks an H.264 file whose packets all read but whose pictures do not decode damaged after it was Ready; readings are then refused", async () => {
    const whole = await faststartClip("faststart-garbled.mp4");
    const garbled = garbledMediaData(whole);
    expect(garbled.length).toBe(fs.statSync(whole).size);
    const id = await uploadBytes(garbled, "garbled.mp4");
    // Every packet reads, so the job makes it ready; the decode after Ready finds the damage.
    const rec = await waitFor(async () => ((r) => (r.state === "damaged" ? r : null))(await recording(id)), 20_000, 300);
    expect(rec.stateReason).toMatch(/^The video is damaged: playback breaks off at /);
    expect(rec.stateReason).toMatch(/of 0:03\.0/);
    // It was Ready first (the job's own damage verdict never sets readyAt).
    const [row] = await db().select({ readyAt: recordings.readyAt }).from(recordings).where(eq(recordings.id, id));
    expect(row.readyAt).toBeInstanceOf(Date);
    expect((await http(`/api/recordings/${id}/media`, { cookie: builder.cookie })).status).toBe(409);
    const page = await (await http(`/recordings/${id}`, { cookie: builder.cookie })).text();
    expect(page).toContain("The video is damaged");
    const refused = await http(`/api/recordings/${id}/readings`, {
      method: "POST",
      cookie: builder.cookie,
      json: { readings: [{ quantity: "torque", value: 110, unit: "N.m", label: "bench point 1" }] },
    });
    expect(refused.status).toBe(409);
    expect(await refused.json()).toMatchObject({ error: "conflict", reason: expect.stringMatching(/video is damaged/), state: "damaged" });
  });

  it("still makes a whole video ready", async () => {
    const whole = await faststartClip("whole.mp4");
    const rec = await settled(await uploadBytes(fs.readFileSync(whole), "whole.mp4"));
    expect(rec).toMatchObject({ state: "ready", stateReason: null });
  });
});

describe("worker killed during a transcode", () => {
  it("kills the worker's ffmpeg with it; the retried job publishes a rendition that decodes in full and lasts as long as the source", async () => {
    // MPEG-4 Part 2 in Matroska: not browser-safe, so it is transcoded to H.264 (long enough
    // to be killed in the middle on this machine).
    const src = path.join(work, "long-take.mkv");
    await ffmpeg(["-f", "lavfi", "-i", "testsrc2=duration=40:size=1280x720:rate=25", "-c:v", "mpeg4", "-q:v", "5", src]);
    const source = await decode(src);
    expect(source).toMatchObject({ frames: 1000, clean: true });

    const id = await uploadBytes(fs.readFileSync(src), "long-take.mkv");
    // Transcoding: the progress passes the poster (0.2) and ffmpeg is at work on the rendition.
    await waitFor(async () => (await recording(id)).progress > 0.3 && ffmpegFor(id).length > 0, 90_000, 200);
    const before = ffmpegFor(id);
    const killed = (await (await control("kill")).json()) as { killed: number[] };
    expect(killed.killed.length).toBe(1);
    // The kernel ends the orphaned ffmpeg with its parent (no new worker runs yet).
    const killedAt = Date.now();
    await waitFor(async () => ffmpegFor(id).length === 0, 5_000, 50);
    const goneAfterMs = Date.now() - killedAt;
    const progressAtKill = (await recording(id)).progress;
    const leftTemps = fs.readdirSync(recordingDir(id)).filter((f) => f.includes(".tmp"));

    expect((await control("start")).status).toBe(200);
    const rec = await settled(id, 180_000);
    expect(rec).toMatchObject({ state: "ready", hasRendition: true });
    expect(fs.readdirSync(recordingDir(id)).filter((f) => f.includes(".tmp"))).toEqual([]);

    const media = await http(`/api/recordings/${id}/media`, { cookie: builder.cookie });
    const out = path.join(work, "published.mp4");
    fs.writeFileSync(out, Buffer.from(await media.arrayBuffer()));
    const published = await decode(out);
    console.log(
      `[worker kill] ffmpeg at kill: ${before.join(",")} (progress ${Math.round(progressAtKill * 100)} %), gone ${goneAfterMs} ms after the worker; temp files left by the killed attempt: ${leftTemps.length}; ` +
        `source ${source.frames} frames / ${source.seconds.toFixed(2)} s; published rendition ${published.frames} frames / ${published.seconds.toFixed(2)} s, clean decode: ${published.clean}`,
    );
    expect(published.clean).toBe(true);
    expect(published.frames).toBe(source.frames);
    expect(Math.abs(published.seconds - source.seconds)).toBeLessThan(0.1);
  }, 300_000);

  it("kills, at the start of an attempt, an ffmpeg still writing that recording's files that the parent-death signal missed, and nothing else", async () => {
    const id = randomUUID();
    fs.mkdirSync(recordingDir(id), { recursive: true });
    const endless = ["-hide_banner", "-nostdin", "-v", "error", "-re", "-f", "lavfi", "-i", "testsrc=size=64x64:rate=5", "-f", "mp4"];
    const leftover = spawn("/usr/bin/ffmpeg", [...endless, path.join(recordingDir(id), "web.mp4.1-dead.tmp.mp4")], {
      stdio: "ignore",
      detached: true,
    });
    const unrelated = spawn("/usr/bin/ffmpeg", [...endless, path.join(work, "unrelated.tmp.mp4")], { stdio: "ignore", detached: true });
    try {
      await waitFor(async () => ffmpegFor(id).length === 1, 10_000, 100);
      expect(await killLeftovers(id)).toEqual([leftover.pid]);
      expect(ffmpegFor(id)).toEqual([]);
      expect(unrelated.exitCode).toBeNull();
    } finally {
      leftover.kill("SIGKILL");
      unrelated.kill("SIGKILL");
    }
  });
});

describe("worker killed during the decode after Ready", () => {
  it("hands the decode after Ready of a worker killed during it to the next worker, which marks the garbled file damaged", async () => {
    // H.264 with its index first, served as it is; garbled near the end, so the decode after
    // Ready runs long enough to be killed in the middle.
    const src = await faststartClip("long-garbled.mp4", "testsrc2=duration=60:size=1280x720:rate=25", ["-preset", "ultrafast"]);
    const id = await uploadBytes(garbledMediaData(src, 0.95), "long-garbled.mp4");
    // Ready, and the decode of its pictures at work.
    await waitFor(async () => (await recording(id)).state === "ready" && ffmpegFor(id).length > 0, 90_000, 50);
    expect((await (await control("kill")).json()) as { killed: number[] }).toMatchObject({ killed: [expect.any(Number)] });
    await waitFor(async () => ffmpegFor(id).length === 0, 5_000, 50);
    // Nobody checks it while no worker runs.
    expect(await recording(id)).toMatchObject({ state: "ready", stateReason: null });

    expect((await control("start")).status).toBe(200);
    const rec = await waitFor(async () => ((r) => (r.state === "damaged" ? r : null))(await recording(id)), 120_000, 300);
    expect(rec.stateReason).toMatch(/^The video is damaged: playback breaks off at .* of 1:00\.0/);
  }, 300_000);
});
