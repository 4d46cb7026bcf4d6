import { execFile } from "node:child_process";
import { mkdtemp, rm, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { extractSubtitleTrack, type RunFfmpeg } from "./embedded";
import { readCaptions } from "./format";

const exec = promisify(execFile);

/** ffmpeg as the worker starts it, without the parent-death wrapper. */
const runFfmpeg: RunFfmpeg = async (args) => {
  try {
    const { stdout, stderr } = await exec("ffmpeg", args, { maxBuffer: 4 * 1024 * 1024 });
    return { code: 0, stdout, stderr };
  } catch (err) {
    const e = err as { code?: number; stdout?: string; stderr?: string };
    return { code: e.code ?? 1, stdout: e.stdout ?? "", stderr: e.stderr ?? "" };
  }
};

let dir = "";
beforeAll(async () => {
  dir = await mkdtemp(path.join(tmpdir(), "captions-"));
  // An SRT in its common form, muxed as a phone does (mov_text in an MP4); a clip without one beside it.
  await writeFile(
    path.join(dir, "talk.srt"),
    "1\n00:00:00,500 --> 00:00:01,500\nMoly on the threads.\n\n2\n00:00:01,800 --> 00:00:02,900\nFirst pass to 30.\n",
  );
  const src = ["-v", "error", "-f", "lavfi", "-i", "testsrc=d=3:s=160x120"];
  await exec("ffmpeg", [...src, "-i", path.join(dir, "talk.srt"), "-c:v", "libx264", "-c:s", "mov_text", path.join(dir, "with.mp4")]);
  await exec("ffmpeg", [...src, "-c:v", "libx264", path.join(dir, "without.mp4")]);
}, 60_000);
afterAll(() => rm(dir, { recursive: true, force: true }));

describe("a subtitle track inside the video", () => {
  it("is read out of an MP4's mov_text track as WebVTT with its cues and times", async () => {
    const vtt = await extractSubtitleTrack(path.join(dir, "with.mp4"), runFfmpeg);
    expect(vtt?.startsWith("WEBVTT")).toBe(true);
    const read = readCaptions("track.vtt", vtt ?? "", 3);
    expect(read).toEqual({
      ok: true,
      format: "vtt",
      cues: [
        { start: 0.5, end: 1.5, text: "Moly on the threads." },
        { start: 1.8, end: 2.9, text: "First pass to 30." },
      ],
    });
  });

  it("is nothing for a video without one", async () => {
    expect(await extractSubtitleTrack(path.join(dir, "without.mp4"), runFfmpeg)).toBeNull();
  });
});
