// Recordings: tus uploads from Node against the running app (chunks, abort, resume, sha256),
// permissions on every tus request, size / name / content refusals, the processing job with
// ffprobe/ffmpeg, media with Range, and the marks and readings JSON APIs.
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import net from "node:net";
import { createHash } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import * as tus from "tus-js-client";

// The Node build exports FileUrlStorage; the package's type definitions describe the browser build only.
const { FileUrlStorage } = tus as unknown as { FileUrlStorage: new (path: string) => tus.UrlStorage };
import { beforeAll, describe, expect, it } from "vitest";
import { and, eq, inArray, sql } from "drizzle-orm";
import { auditLog, marks, recordings, uploads } from "~/db/schema";
import { enqueueUnqueued } from "~/lib/recordings/processing.server";
import { stopBoss } from "~/lib/recordings/queue.server";
import { cleanUpExpiredUploads, receivedBytes } from "~/lib/recordings/tus.server";
import { recordingDir, tusFilePath } from "~/lib/recordings/storage.server";
import { db } from "~/lib/db.server";
import { BASE_URL, createUser, http, waitFor, type TestUser } from "../support/app";

const runDir = process.env.BENCHREEL_RUN_DIR ?? fs.mkdtempSync("/tmp/br-rec-");
const work = path.join(runDir, "recordings-test");
fs.mkdirSync(work, { recursive: true });

function ffmpeg(args: string[]) {
  execFileSync("/usr/bin/ffmpeg", ["-hide_banner", "-loglevel", "error", "-y", ...args]);
}
const sha = (b: Buffer) => createHash("sha256").update(b).digest("hex");

type UploadResult = { url: string; recordingId: string | null };

/** One tus upload from Node; resolves when done. */
function upload(
  data: Buffer,
  user: TestUser,
  opts: {
    name: string;
    title?: string;
    chunkSize?: number;
    fingerprint?: string;
    storage?: tus.UrlStorage;
    onProgress?: (sent: number, u: tus.Upload) => void;
    tags?: string;
  } = { name: "clip.mp4" },
): { promise: Promise<UploadResult>; upload: tus.Upload } {
  let recordingId: string | null = null;
  let resolve!: (v: UploadResult) => void;
  let reject!: (e: unknown) => void;
  const promise = new Promise<UploadResult>((res, rej) => {
    resolve = res;
    reject = rej;
  });
  const u: tus.Upload = new tus.Upload(data, {
    endpoint: `${BASE_URL}/api/uploads`,
    chunkSize: opts.chunkSize ?? 512 * 1024,
    retryDelays: [],
    headers: { Origin: BASE_URL, Cookie: user.cookie },
    metadata: { filename: opts.name, filetype: "video/mp4", title: opts.title ?? opts.name, tags: opts.tags ?? "" },
    ...(opts.fingerprint ? { fingerprint: async () => opts.fingerprint! } : {}),
    ...(opts.storage ? { urlStorage: opts.storage } : {}),
    storeFingerprintForResuming: Boolean(opts.storage),
    removeFingerprintOnSuccess: true,
    onProgress: (sent) => opts.onProgress?.(sent, u),
    onAfterResponse: (_req, res) => {
      recordingId = res.getHeader("Benchreel-Recording") ?? recordingId;
    },
    onSuccess: () => resolve({ url: u.url!, recordingId }),
    onError: reject,
  });
  return { promise, upload: u };
}

async function waitState(id: string, cookie: string, timeoutMs = 45_000) {
  return waitFor(
    async () => {
      const res = await http(`/api/recordings/${id}`, { cookie });
      const { recording } = (await res.json()) as { recording: Record<string, unknown> & { state: string } };
      return recording.state !== "processing" ? recording : null;
    },
    timeoutMs,
    300,
  );
}

let builder: TestUser;
let builder2: TestUser;
let editor: TestUser;
let apprentice: TestUser;
let clip: Buffer;
let readyId: string;

beforeAll(async () => {
  [builder, builder2, editor, apprentice] = await Promise.all([
    createUser("builder"),
    createUser("builder"),
    createUser("editor"),
    createUser("apprentice"),
  ]);
  const clipPath = path.join(work, "clip.mp4");
  ffmpeg([
    "-f",
    "lavfi",
    "-i",
    "testsrc=duration=10:size=320x240:rate=25",
    "-pix_fmt",
    "yuv420p",
    "-c:v",
    "libx264",
    "-movflags",
    "+faststart",
    clipPath,
  ]);
  clip = fs.readFileSync(clipPath);
});

describe("tus upload", () => {
  it("uploads in chunks, survives an abort half-way, resumes from the stored URL, and keeps the bytes identical", async () => {
    const bigPath = path.join(work, "big.mp4");
    ffmpeg([
      "-f",
      "lavfi",
      "-i",
      "testsrc2=duration=1:size=480x270:rate=25",
      "-vf",
      "noise=alls=80:allf=t",
      "-c:v",
      "libx264",
      "-preset",
      "ultrafast",
      "-qp",
      "0",
      "-pix_fmt",
      "yuv420p",
      bigPath,
    ]);
    const big = fs.readFileSync(bigPath);
    expect(big.length).toBeGreaterThan(2 * 1024 * 1024);
    const storage = new FileUrlStorage(path.join(work, `tus-urls-${Date.now()}.json`));
    const fingerprint = `big-${sha(big)}`;

    // First attempt: abort once half the bytes are out.
    const first = upload(big, builder, {
      name: "big.mp4",
      chunkSize: 256 * 1024,
      fingerprint,
      storage,
      onProgress: (sent, u) => {
        if (sent >= big.length / 2) void u.abort();
      },
    });
    first.upload.start();
    await waitFor(async () => first.upload.url && (await storage.findUploadsByFingerprint(fingerprint)).length > 0);
    await waitFor(async () => {
      const res = await http(first.upload.url!.replace(BASE_URL, ""), { cookie: builder.cookie });
      const body = (await res.json()) as { upload: { received: number } };
      return body.upload.received >= big.length / 2 - 256 * 1024 ? body.upload : null;
    });
    const uploadId = path.basename(first.upload.url!);
    const half = ((await (await http(`/api/uploads/${uploadId}`, { cookie: builder.cookie })).json()) as { upload: { received: number } })
      .upload.received;
    expect(half).toBeGreaterThan(0);
    expect(half).toBeLessThan(big.length);

    // The builder's unfinished uploads list it.
    const list = (await (await http("/api/uploads", { cookie: builder.cookie })).json()) as { unfinished: { id: string }[] };
    expect(list.unfinished.map((u) => u.id)).toContain(uploadId);

    // Second attempt: a new client finds the stored URL and continues from the server's offset.
    const offsets: string[] = [];
    const second = upload(big, builder, { name: "big.mp4", chunkSize: 1024 * 1024, fingerprint, storage });
    second.upload.options.onBeforeRequest = (req) => {
      if (req.getMethod() === "PATCH") offsets.push(req.getHeader("Upload-Offset") ?? "");
    };
    const previous = await second.upload.findPreviousUploads();
    expect(previous).toHaveLength(1);
    second.upload.resumeFromPreviousUpload(previous[0]);
    second.upload.start();
    const done = await second.promise;
    expect(path.basename(done.url)).toBe(uploadId);
    expect(Number(offsets[0])).toBeGreaterThanOrEqual(half);
    expect(done.recordingId).toBeTruthy();

    const rec = await waitState(done.recordingId!, builder.cookie);
    expect(rec.state).toBe("ready");
    const original = await http(`/api/recordings/${done.recordingId}/original`, { cookie: builder.cookie });
    expect(original.status).toBe(200);
    expect(original.headers.get("content-disposition")).toContain("big.mp4");
    expect(sha(Buffer.from(await original.arrayBuffer()))).toBe(sha(big));
  });

  it("resumes after the server is killed mid-upload and started again, byte-identical", async () => {
    // A second app process on the same database and upload folder, which this test may kill.
    const build = process.env.BENCHREEL_BUILD_DIR;
    expect(build, "BENCHREEL_BUILD_DIR is set by npm test").toBeTruthy();
    const port = await new Promise<number>((resolve) => {
      const srv = net.createServer().listen(0, "127.0.0.1", () => {
        const p = (srv.address() as net.AddressInfo).port;
        srv.close(() => resolve(p));
      });
    });
    const base = `http://127.0.0.1:${port}`;
    const start = async (): Promise<ChildProcess> => {
      const child = spawn(process.execPath, ["server.js", path.join(build!, "server/index.js")], {
        env: { ...process.env, PORT: String(port), HOST: "127.0.0.1" },
        stdio: "ignore",
      });
      await waitFor(async () => (await fetch(`${base}/healthz`).catch(() => null))?.ok, 20_000, 100);
      return child;
    };
    const bigPath = path.join(work, "killed.mp4");
    ffmpeg([
      "-f",
      "lavfi",
      "-i",
      "testsrc2=duration=1:size=480x270:rate=25",
      "-vf",
      "noise=alls=60:allf=t",
      "-c:v",
      "libx264",
      "-preset",
      "ultrafast",
      "-qp",
      "0",
      "-pix_fmt",
      "yuv420p",
      bigPath,
    ]);
    const big = fs.readFileSync(bigPath);
    let server = await start();
    let killedAt = 0;
    let recordingId: string | null = null;
    try {
      const done = new Promise<void>((resolve, reject) => {
        const u = new tus.Upload(big, {
          endpoint: `${base}/api/uploads`,
          chunkSize: 256 * 1024,
          retryDelays: [300, 600, 1000, 1000, 1500, 2000, 2000, 3000, 3000, 3000],
          headers: { Origin: base, Cookie: builder.cookie },
          metadata: { filename: "killed.mp4", filetype: "video/mp4", title: "Survives a server restart" },
          onProgress: (sent) => {
            if (!killedAt && sent > big.length * 0.4) {
              killedAt = sent;
              server.kill("SIGKILL");
              setTimeout(() => void start().then((s) => (server = s)), 800);
            }
          },
          onAfterResponse: (_req, res) => {
            recordingId = res.getHeader("Benchreel-Recording") ?? recordingId;
          },
          onSuccess: () => resolve(),
          onError: reject,
        });
        u.start();
      });
      await done;
    } finally {
      server.kill("SIGTERM");
    }
    expect(killedAt).toBeGreaterThan(0);
    expect(recordingId).toBeTruthy();
    const rec = await waitState(recordingId!, builder.cookie);
    expect(rec.state).toBe("ready");
    const original = await http(`/api/recordings/${recordingId}/original`, { cookie: builder.cookie });
    expect(sha(Buffer.from(await original.arrayBuffer()))).toBe(sha(big));
  });

  it("refuses an apprentice, a signed-out caller, and someone else continuing an upload", async () => {
    const tusHeaders = {
      "Tus-Resumable": "1.0.0",
      "Upload-Length": "10",
      "Upload-Metadata": `filename ${Buffer.from("x.mp4").toString("base64")}`,
    };
    const anon = await http("/api/uploads", { method: "POST", headers: tusHeaders });
    expect(anon.status).toBe(401);
    const appr = await http("/api/uploads", { method: "POST", headers: tusHeaders, cookie: apprentice.cookie });
    expect(appr.status).toBe(403);
    expect(((await appr.json()) as { error: string }).error).toBe("forbidden");

    const created = await http("/api/uploads", { method: "POST", headers: tusHeaders, cookie: builder.cookie });
    expect(created.status).toBe(201);
    const location = created.headers.get("location")!;
    const id = path.basename(location);
    const head = (cookie: string) => http(`/api/uploads/${id}`, { method: "HEAD", headers: { "Tus-Resumable": "1.0.0" }, cookie });
    expect((await head(builder.cookie)).status).toBe(200);
    expect((await head(builder2.cookie)).status).toBe(403);
    expect((await head(apprentice.cookie)).status).toBe(403);
    const patch = await http(`/api/uploads/${id}`, {
      method: "PATCH",
      headers: { "Tus-Resumable": "1.0.0", "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream" },
      body: "0123456789",
      cookie: builder2.cookie,
    });
    expect(patch.status).toBe(403);
    // Cancel: the owner terminates it and it is gone.
    const del = await http(`/api/uploads/${id}`, { method: "DELETE", headers: { "Tus-Resumable": "1.0.0" }, cookie: builder.cookie });
    expect(del.status).toBe(204);
    expect((await http(`/api/uploads/${id}`, { cookie: builder.cookie })).status).toBe(404);
  });

  it("lets its starter or an admin (nobody else) discard an unfinished upload from the upload page; another's gets the reason and the upload stays", async () => {
    const admin = await createUser("admin");
    const tusHeaders = {
      "Tus-Resumable": "1.0.0",
      "Upload-Length": "100",
      "Upload-Metadata": `filename ${Buffer.from("half-sent.mp4").toString("base64")}`,
    };
    const start = async () =>
      path.basename((await http("/api/uploads", { method: "POST", headers: tusHeaders, cookie: builder.cookie })).headers.get("location")!);
    const discard = (cookie: string, uploadId: string) => http("/recordings/upload", { cookie, form: { intent: "discard", uploadId } });
    const status = (cookie: string, id: string) => http(`/api/uploads/${id}`, { cookie });

    const mine = await start();
    const refused = await discard(builder2.cookie, mine);
    expect(refused.status).toBe(404);
    expect(await refused.text()).toContain("That unfinished upload is gone or not yours.");
    expect((await status(builder.cookie, mine)).status).toBe(200);
    // An admin may ask after anyone's upload, and discard it.
    expect((await status(admin.cookie, mine)).status).toBe(200);
    expect((await status(builder2.cookie, mine)).status).toBe(403);
    expect((await discard(admin.cookie, mine)).status).toBe(302);
    expect((await status(builder.cookie, mine)).status).toBe(404);

    const own = await start();
    expect((await discard(builder.cookie, own)).status).toBe(302);
    expect((await status(builder.cookie, own)).status).toBe(404);
    // Already gone: the same answer; and a form that asks for something else is a 400.
    expect((await discard(builder.cookie, own)).status).toBe(404);
    expect((await http("/recordings/upload", { cookie: builder.cookie, form: { intent: "rename", uploadId: own } })).status).toBe(400);
  });

  it("discards unfinished uploads that received no bytes for two weeks, bytes and row, and keeps one still receiving", async () => {
    const tusHeaders = {
      "Tus-Resumable": "1.0.0",
      "Upload-Length": "100",
      "Upload-Metadata": `filename ${Buffer.from("old.mp4").toString("base64")}`,
    };
    const start = async () => {
      const created = await http("/api/uploads", { method: "POST", headers: tusHeaders, cookie: builder.cookie });
      const id = path.basename(created.headers.get("location")!);
      await http(`/api/uploads/${id}`, {
        method: "PATCH",
        cookie: builder.cookie,
        headers: { "Tus-Resumable": "1.0.0", "Upload-Offset": "0", "Content-Type": "application/offset+octet-stream" },
        body: "x".repeat(40),
      });
      expect(await receivedBytes(id)).toBe(40);
      await db()
        .update(uploads)
        .set({ createdAt: new Date(Date.now() - 15 * 24 * 3600 * 1000) })
        .where(eq(uploads.id, id));
      return id;
    };
    const abandoned = await start();
    const stillGoing = await start(); // begun 15 days ago, but its last bytes came just now
    const longAgo = new Date(Date.now() - 15 * 24 * 3600 * 1000);
    fs.utimesSync(tusFilePath(abandoned), longAgo, longAgo);
    expect(await cleanUpExpiredUploads()).toBeGreaterThanOrEqual(1);
    expect(await receivedBytes(abandoned)).toBe(0);
    expect((await http(`/api/uploads/${abandoned}`, { cookie: builder.cookie })).status).toBe(404);
    expect(await receivedBytes(stillGoing)).toBe(40);
    expect((await http(`/api/uploads/${stillGoing}`, { cookie: builder.cookie })).status).toBe(200);
  });

  it("refuses a file over the size limit before a byte is sent, an empty file, and bad file names", async () => {
    const post = (length: string, name: string) =>
      http("/api/uploads", {
        method: "POST",
        cookie: builder.cookie,
        headers: {
          "Tus-Resumable": "1.0.0",
          "Upload-Length": length,
          "Upload-Metadata": `filename ${Buffer.from(name).toString("base64")}`,
        },
      });
    const huge = await post(String(21 * 1024 ** 3), "whole-day.mov");
    expect(huge.status).toBe(413);
    expect(await huge.text()).toMatch(/larger than the shop's limit of 20 GB/);
    const empty = await post("0", "empty.mp4");
    expect(empty.status).toBe(400);
    expect(await empty.text()).toMatch(/empty/);
    const traversal = await post("100", "../../etc/passwd.mp4");
    expect(traversal.status).toBe(400);
    expect(await traversal.text()).toMatch(/path separator/);
    const control = await post("100", "clip\u0007.mp4");
    expect(control.status).toBe(400);
    expect(await control.text()).toMatch(/control characters/);
  });
});

describe("processing", () => {
  it("probes a small video, grabs a poster and marks it ready", async () => {
    const { promise, upload: u } = upload(clip, builder, {
      name: "stud test 4.mp4",
      title: "Stud 4 clamp-load test",
      tags: "head studs, Clamp load",
    });
    u.start();
    const done = await promise;
    readyId = done.recordingId!;
    const rec = await waitState(readyId, builder.cookie);
    expect(rec).toMatchObject({
      state: "ready",
      width: 320,
      height: 240,
      videoCodec: "h264",
      hasPoster: true,
      hasRendition: false,
      title: "Stud 4 clamp-load test",
    });
    expect(rec.durationS as number).toBeCloseTo(10, 0);
    expect(rec.frameRate as number).toBeCloseTo(25, 3);
    const poster = await http(`/api/recordings/${readyId}/poster`, { cookie: apprentice.cookie });
    expect(poster.status).toBe(200);
    expect(poster.headers.get("content-type")).toBe("image/jpeg");
    const jpeg = Buffer.from(await poster.arrayBuffer());
    expect(jpeg.subarray(0, 2).toString("hex")).toBe("ffd8");
    // It is in the library with its tags (lower-cased) and uploader filter.
    const lib = (await (await http(`/api/recordings?uploader=${builder.id}&tag=clamp%20load`, { cookie: apprentice.cookie })).json()) as {
      recordings: { id: string }[];
    };
    expect(lib.recordings.map((r) => r.id)).toContain(readyId);
  });

  it("gives a job to a recording left in processing without one (the app could not send it), which is then processed", async () => {
    // One just finished, whose job may still be on its way from the app: it is left alone.
    const { promise, upload: u } = upload(clip, builder, { name: "just finished.mp4", title: "Just finished" });
    u.start();
    const recent = (await promise).recordingId!;
    await waitState(recent, builder.cookie);
    const jobsSince = async (since: Date) =>
      (
        await db().execute<{ n: number }>(
          sql`select count(*)::int as n from pgboss.job where name = 'recording-process' and data->>'recordingId' = ${readyId} and created_on >= ${since.toISOString()}::timestamptz`,
        )
      ).rows[0].n;
    const [{ now: since }] = (await db().execute<{ now: Date }>(sql`select now() as now`)).rows;
    try {
      await db().update(recordings).set({ state: "processing", updatedAt: new Date() }).where(eq(recordings.id, recent));
      // The other was left so two minutes ago: its upload finished, its job was never sent.
      await db()
        .update(recordings)
        .set({ state: "processing", updatedAt: new Date(Date.now() - 2 * 60_000) })
        .where(eq(recordings.id, readyId));
      const sent = await enqueueUnqueued(60);
      expect(sent).not.toContain(recent);
      // Exactly one job for it, whether this look sent it or the worker's own (they take turns).
      await waitFor(async () => (await jobsSince(new Date(since))) >= 1, 40_000, 200);
      expect(await enqueueUnqueued(60)).not.toContain(readyId);
      expect(await jobsSince(new Date(since))).toBe(1);
      // The worker processes it again from its original: ready, with its poster.
      expect(await waitState(readyId, builder.cookie)).toMatchObject({ state: "ready", hasPoster: true });
    } finally {
      await db()
        .update(recordings)
        .set({ state: "ready" })
        .where(inArray(recordings.id, [recent, readyId]));
      await stopBoss();
    }
  }, 60_000);

  it("makes a browser-safe H.264 MP4 rendition of an HEVC QuickTime file and keeps the original", async () => {
    const movPath = path.join(work, "hevc.mov");
    ffmpeg([
      "-f",
      "lavfi",
      "-i",
      "testsrc=duration=2:size=320x240:rate=25",
      "-c:v",
      "libx265",
      "-preset",
      "ultrafast",
      "-x265-params",
      "log-level=error",
      "-tag:v",
      "hvc1",
      "-pix_fmt",
      "yuv420p",
      movPath,
    ]);
    const mov = fs.readFileSync(movPath);
    const { promise, upload: u } = upload(mov, builder, { name: "IMG_2231.MOV" });
    u.start();
    const rec = await waitState((await promise).recordingId!, builder.cookie, 60_000);
    expect(rec).toMatchObject({ state: "ready", videoCodec: "hevc", hasRendition: true });
    const media = await http(`/api/recordings/${rec.id}/media`, { cookie: builder.cookie });
    const bytes = Buffer.from(await media.arrayBuffer());
    const out = path.join(work, "rendition.mp4");
    fs.writeFileSync(out, bytes);
    const probe = JSON.parse(
      execFileSync("/usr/bin/ffprobe", ["-v", "error", "-print_format", "json", "-show_streams", "-show_format", out]).toString(),
    );
    expect(probe.streams[0].codec_name).toBe("h264");
    expect(probe.format.format_name).toContain("mp4");
    // moov before mdat (faststart)
    expect(bytes.indexOf("moov")).toBeLessThan(bytes.indexOf("mdat"));
    const original = await http(`/api/recordings/${rec.id}/original`, { cookie: builder.cookie });
    expect(sha(Buffer.from(await original.arrayBuffer()))).toBe(sha(mov));
  });

  it("lets an editor (not a builder) retry a failed recording, which processes again", async () => {
    const { promise, upload: u } = upload(clip, builder, { name: "retry-me.mp4" });
    u.start();
    const id = (await promise).recordingId!;
    await waitState(id, builder.cookie);
    // As if the last attempt had failed.
    await db()
      .update(recordings)
      .set({ state: "failed", stateReason: "Processing failed: ffmpeg failed: test", hasPoster: false })
      .where(eq(recordings.id, id));
    const page = await http(`/recordings/${id}`, { cookie: editor.cookie });
    expect(await page.text()).toContain("Retry processing");
    expect((await http(`/recordings/${id}`, { cookie: builder.cookie, form: { intent: "retry" } })).status).toBe(403);
    const retried = await http(`/recordings/${id}`, { cookie: editor.cookie, form: { intent: "retry" } });
    expect(retried.status).toBe(302);
    const rec = await waitState(id, editor.cookie);
    expect(rec).toMatchObject({ state: "ready", hasPoster: true, stateReason: null });
  });

  it("rejects a renamed text file by its content and removes its bytes", async () => {
    const text = Buffer.from("Torque sequence notes\nstud 1: 110 N.m\nstud 2: 110 N.m\n".repeat(200));
    const { promise, upload: u } = upload(text, builder, { name: "notes.mp4" });
    u.start();
    const rec = await waitState((await promise).recordingId!, builder.cookie);
    expect(rec.state).toBe("rejected");
    expect(rec.stateReason).toMatch(/not a video/);
    expect((await http(`/api/recordings/${rec.id}/original`, { cookie: builder.cookie })).status).toBe(404);
    expect((await http(`/api/recordings/${rec.id}/media`, { cookie: builder.cookie })).status).toBe(409);
    // Nothing is left to process again: the page says so (409) instead of starting a job.
    const retry = await http(`/recordings/${rec.id}`, { cookie: editor.cookie, form: { intent: "retry" } });
    expect(retry.status).toBe(409);
    expect(await retry.text()).toContain("A rejected recording has no file left to process; upload it again.");
  });

  it("rejects a truncated video (its index never arrived)", async () => {
    const p = path.join(work, "no-faststart.mp4");
    ffmpeg(["-f", "lavfi", "-i", "testsrc=duration=4:size=320x240:rate=25", "-pix_fmt", "yuv420p", "-c:v", "libx264", p]);
    const whole = fs.readFileSync(p);
    const { promise, upload: u } = upload(whole.subarray(0, Math.floor(whole.length / 2)), builder, { name: "cut-off.mp4" });
    u.start();
    const rec = await waitState((await promise).recordingId!, builder.cookie);
    expect(rec.state).toBe("rejected");
    expect(rec.stateReason).toMatch(/truncated/);
  });
});

describe("the recording's page", () => {
  it("lets its uploader change the details (tags kept as the shop's tags) and delete it with its marks, files and an audit entry; others may not", async () => {
    const { promise, upload: u } = upload(clip, builder, { name: "details-then-delete.mp4" });
    u.start();
    const id = (await promise).recordingId!;
    await waitState(id, builder.cookie);
    const post = (cookie: string, form: Record<string, string>) => http(`/recordings/${id}`, { cookie, form });

    const blank = await post(builder.cookie, { intent: "details", title: "  ", tags: "" });
    expect(blank.status).toBe(400);
    expect(await blank.text()).toContain("Give the recording a title.");
    expect((await post(builder2.cookie, { intent: "details", title: "Not mine" })).status).toBe(403);
    const saved = await post(builder.cookie, {
      intent: "details",
      title: "Head stud stretch, pass 2",
      description: "Moly on the threads.",
      tags: "Head studs, head studs , moly,,",
    });
    expect(saved.status).toBe(302);
    const [rec] = await db().select().from(recordings).where(eq(recordings.id, id));
    expect(rec).toMatchObject({ title: "Head stud stretch, pass 2", description: "Moly on the threads.", tags: ["Head studs", "moly"] });
    expect((await post(builder.cookie, { intent: "rename" })).status).toBe(400);

    expect((await http(`/api/recordings/${id}/marks`, { cookie: builder.cookie, json: { tStart: 1, text: "First stud" } })).status).toBe(
      201,
    );
    expect(fs.existsSync(recordingDir(id))).toBe(true);
    expect((await post(builder2.cookie, { intent: "delete" })).status).toBe(403);
    const deleted = await post(builder.cookie, { intent: "delete" });
    expect(deleted.status).toBe(302);
    expect(deleted.headers.get("location")).toBe("/recordings");
    expect((await http(`/api/recordings/${id}`, { cookie: builder.cookie })).status).toBe(404);
    expect(await db().select().from(marks).where(eq(marks.recordingId, id))).toHaveLength(0);
    expect(fs.existsSync(recordingDir(id))).toBe(false);
    const entries = await db()
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, "recording"), eq(auditLog.entityId, id)));
    expect(entries.map((e) => e.action).sort()).toEqual(["recording.delete", "recording.edit"]);
  });
});

describe("media with Range", () => {
  const url = () => `/api/recordings/${readyId}/media`;
  it("answers first bytes, a middle slice and a suffix with 206 and the right bytes", async () => {
    const full = await http(url(), { cookie: apprentice.cookie });
    expect(full.status).toBe(200);
    expect(full.headers.get("accept-ranges")).toBe("bytes");
    expect(full.headers.get("content-type")).toBe("video/mp4");
    expect(full.headers.get("cache-control")).toMatch(/^private/);
    const etag = full.headers.get("etag");
    expect(etag).toMatch(/^"[0-9a-f]+-[0-9a-f]+"$/);
    const body = Buffer.from(await full.arrayBuffer());
    expect(sha(body)).toBe(sha(clip));
    const size = clip.length;

    const first = await http(url(), { cookie: apprentice.cookie, headers: { Range: "bytes=0-99" } });
    expect(first.status).toBe(206);
    expect(first.headers.get("content-range")).toBe(`bytes 0-99/${size}`);
    expect(first.headers.get("content-length")).toBe("100");
    expect(Buffer.from(await first.arrayBuffer()).equals(clip.subarray(0, 100))).toBe(true);

    const mid = Math.floor(size / 2);
    const middle = await http(url(), { cookie: apprentice.cookie, headers: { Range: `bytes=${mid}-${mid + 4095}` } });
    expect(middle.status).toBe(206);
    expect(Buffer.from(await middle.arrayBuffer()).equals(clip.subarray(mid, mid + 4096))).toBe(true);

    const suffix = await http(url(), { cookie: apprentice.cookie, headers: { Range: "bytes=-500" } });
    expect(suffix.status).toBe(206);
    expect(suffix.headers.get("content-range")).toBe(`bytes ${size - 500}-${size - 1}/${size}`);
    expect(Buffer.from(await suffix.arrayBuffer()).equals(clip.subarray(size - 500))).toBe(true);

    const open = await http(url(), { cookie: apprentice.cookie, headers: { Range: `bytes=${size - 10}-` } });
    expect(open.status).toBe(206);
    expect((await open.arrayBuffer()).byteLength).toBe(10);

    const bad = await http(url(), { cookie: apprentice.cookie, headers: { Range: `bytes=${size}-${size + 10}` } });
    expect(bad.status).toBe(416);
    expect(bad.headers.get("content-range")).toBe(`bytes */${size}`);
    await bad.body?.cancel();
    const garbage = await http(url(), { cookie: apprentice.cookie, headers: { Range: "bytes=abc" } });
    expect(garbage.status).toBe(416);
    await garbage.body?.cancel();

    const stale = await http(url(), { cookie: apprentice.cookie, headers: { Range: "bytes=0-9", "If-Range": '"not-the-etag"' } });
    expect(stale.status).toBe(200);
    await stale.body?.cancel();
    const cached = await http(url(), { cookie: apprentice.cookie, headers: { "If-None-Match": etag! } });
    expect(cached.status).toBe(304);
  });

  it("checks the session on every request", async () => {
    const res = await http(url(), { headers: { Range: "bytes=0-99" } });
    expect(res.status).toBe(401);
    expect((await http(`/api/recordings/${readyId}/original`, { cookie: apprentice.cookie })).status).toBe(403);
  });
});

describe("marks API", () => {
  const marksUrl = () => `/api/recordings/${readyId}/marks`;
  const issues = async (res: Response) => ((await res.json()) as { issues: { path: string; message: string }[] }).issues;

  it("adds point and span marks, lists them by time, and refuses bad times with field messages", async () => {
    const a = await http(marksUrl(), { cookie: builder.cookie, json: { tStart: 7.5, text: "Final pass on stud 4", tags: ["Torque"] } });
    expect(a.status).toBe(201);
    const b = await http(marksUrl(), { cookie: builder.cookie, json: { tStart: 2, tEnd: 4.5, text: "Lube applied" } });
    expect(b.status).toBe(201);
    const list = (await (await http(marksUrl(), { cookie: apprentice.cookie })).json()) as {
      marks: { tStart: number; tEnd: number | null; tags: string[] }[];
    };
    const mine = list.marks.filter((m) => [7.5, 2].includes(m.tStart));
    expect(mine.map((m) => m.tStart)).toEqual([2, 7.5]);
    // A tag keeps its author's spelling (app/lib/tags.ts).
    expect(mine[1].tags).toEqual(["Torque"]);

    const negative = await http(marksUrl(), { cookie: builder.cookie, json: { tStart: -1, text: "x" } });
    expect(negative.status).toBe(422);
    expect(await issues(negative)).toEqual([{ path: "tStart", message: "A mark cannot be before the start of the video." }]);
    const beyond = await http(marksUrl(), { cookie: builder.cookie, json: { tStart: 60, text: "x" } });
    expect(beyond.status).toBe(422);
    expect((await issues(beyond))[0]).toMatchObject({ path: "tStart", message: expect.stringMatching(/only 0:10\.0 long/) });
    const backwards = await http(marksUrl(), { cookie: builder.cookie, json: { tStart: 5, tEnd: 3, text: "x" } });
    expect((await issues(backwards))[0].path).toBe("tEnd");
    const noText = await http(marksUrl(), { cookie: builder.cookie, json: { tStart: 1, text: "  " } });
    expect((await issues(noText))[0]).toEqual({ path: "text", message: "Write what happens at this moment." });
    const badProc = await http(marksUrl(), {
      cookie: builder.cookie,
      json: { tStart: 1, text: "x", procedureId: "00000000-0000-4000-8000-0000000000aa" },
    });
    expect((await issues(badProc))[0].path).toBe("procedureId");
    const notJson = await http(marksUrl(), {
      method: "POST",
      cookie: builder.cookie,
      headers: { "content-type": "application/json" },
      body: "{nope",
    });
    expect(notJson.status).toBe(422);
  });

  it("lets only the author (or an editor) change or delete a mark; apprentices add none", async () => {
    const res = await http(marksUrl(), { cookie: builder.cookie, json: { tStart: 3, text: "Wrench clicks" } });
    const { mark } = (await res.json()) as { mark: { id: string } };
    const one = `${marksUrl()}/${mark.id}`;
    expect((await http(marksUrl(), { cookie: apprentice.cookie, json: { tStart: 1, text: "x" } })).status).toBe(403);
    expect((await http(one, { method: "PATCH", cookie: builder2.cookie, json: { text: "mine now" } })).status).toBe(403);
    expect((await http(one, { method: "DELETE", cookie: builder2.cookie })).status).toBe(403);
    expect((await http(one, { method: "DELETE", cookie: apprentice.cookie })).status).toBe(403);
    const own = await http(one, { method: "PATCH", cookie: builder.cookie, json: { text: "Wrench clicks at 110 N·m", tEnd: 3.8 } });
    expect(own.status).toBe(200);
    expect(((await own.json()) as { mark: { text: string; tEnd: number } }).mark).toMatchObject({
      text: "Wrench clicks at 110 N·m",
      tEnd: 3.8,
    });
    const bad = await http(one, { method: "PATCH", cookie: builder.cookie, json: { tEnd: 1 } });
    expect(bad.status).toBe(422);
    expect((await http(one, { method: "PATCH", cookie: editor.cookie, json: { tags: ["checked"] } })).status).toBe(200);
    expect((await http(one, { method: "DELETE", cookie: builder.cookie })).status).toBe(204);
    expect((await http(one, { cookie: builder.cookie })).status).toBe(404);
  });
});

describe("readings API", () => {
  const url = () => `/api/recordings/${readyId}/readings`;
  const issues = async (res: Response) => ((await res.json()) as { issues: { path: string; message: string }[] }).issues;

  it("stores SI with the unit entered, refuses a unit that does not fit, and saves a batch all or nothing", async () => {
    const one = await http(url(), {
      cookie: builder.cookie,
      json: { quantity: "torque", value: 81, unit: "ft.lbf", label: "stud 4", conditions: { pass: 3, lube: "moly" }, t: 7.5 },
    });
    expect(one.status).toBe(201);
    const { reading } = (await one.json()) as {
      reading: { valueSi: number; valueEntered: number; unitEntered: string; conditions: Record<string, string> };
    };
    expect(reading.valueSi).toBeCloseTo(81 * 1.3558179483314, 9);
    expect(reading).toMatchObject({ valueEntered: 81, unitEntered: "ft.lbf", conditions: { pass: "3", lube: "moly" } });

    const wrongUnit = await http(url(), { cookie: builder.cookie, json: { quantity: "torque", value: 110, unit: "mm" } });
    expect(wrongUnit.status).toBe(422);
    expect((await issues(wrongUnit))[0]).toEqual({ path: "unit", message: "mm is not a unit of torque; use N·m, ft·lbf, in·lbf." });
    const leak = await http(url(), { cookie: builder.cookie, json: { quantity: "leak-down", value: 140, unit: "%" } });
    expect((await issues(leak))[0].path).toBe("value");
    const late = await http(url(), { cookie: builder.cookie, json: { quantity: "clamp-load", value: 51, unit: "kN", t: 99 } });
    expect((await issues(late))[0].path).toBe("t");

    const before = ((await (await http(url(), { cookie: builder.cookie })).json()) as { readings: unknown[] }).readings.length;
    const batchBad = await http(url(), {
      cookie: builder.cookie,
      json: {
        readings: [
          { quantity: "clamp-load", value: 51, unit: "kN", label: "stud 4", conditions: { pass: "3" } },
          { quantity: "bore-diameter", value: "88.01", unit: "mm" },
        ],
      },
    });
    expect(batchBad.status).toBe(422);
    expect((await issues(batchBad))[0].path).toBe("readings.1.value");
    const after = ((await (await http(url(), { cookie: builder.cookie })).json()) as { readings: unknown[] }).readings.length;
    expect(after).toBe(before);

    const batch = await http(url(), {
      cookie: builder.cookie,
      json: {
        readings: [
          { quantity: "clamp-load", value: 51, unit: "kN", label: "stud 4", conditions: { pass: "3" }, t: 7.9 },
          { quantity: "bore-diameter", value: 88.012, unit: "mm", label: "cyl 2, 20 mm down, 90°" },
          { quantity: "leak-down", value: 6, unit: "%" },
        ],
      },
    });
    expect(batch.status).toBe(201);
    const rows = ((await batch.json()) as { readings: { valueSi: number }[] }).readings;
    expect(rows.map((r) => r.valueSi)).toEqual([51000, expect.closeTo(0.088012, 12), 0.06]);
  });

  it("exports CSV, and lets only the author or an editor change a reading", async () => {
    const csv = await http(`${url()}?format=csv`, { cookie: apprentice.cookie });
    expect(csv.status).toBe(200);
    expect(csv.headers.get("content-type")).toMatch(/^text\/csv/);
    expect(csv.headers.get("content-disposition")).toMatch(/attachment; filename="Stud-4-clamp-load-test-readings\.csv"/);
    const text = await csv.text();
    const lines = text.trim().split("\n");
    expect(lines[0]).toBe(
      "time_s,quantity,label,fastener,cylinder,journal,depth,depth_unit,angle_deg,value,unit,value_si,lube,tool,pass,note,entered_by,entered_at",
    );
    // Sent the old way, the place in the label: it is in the position columns (issue 14 §2).
    expect(text).toContain(",Bore diameter,,,2,,20,mm,90,88.012,mm,");
    expect(text).toMatch(/7\.5,Torque,,4,,,,,,81,ft\.lbf,/);

    const { readings } = (await (await http(url(), { cookie: builder.cookie })).json()) as { readings: { id: string; quantity: string }[] };
    const torque = readings.find((r) => r.quantity === "torque")!;
    const one = `${url()}/${torque.id}`;
    expect((await http(url(), { cookie: apprentice.cookie, json: { quantity: "torque", value: 1, unit: "N.m" } })).status).toBe(403);
    expect((await http(one, { method: "PATCH", cookie: builder2.cookie, json: { value: 1 } })).status).toBe(403);
    const unitChange = await http(one, { method: "PATCH", cookie: builder.cookie, json: { unit: "kN" } });
    expect(unitChange.status).toBe(422);
    expect((await issues(unitChange))[0].path).toBe("unit");
    const ok = await http(one, { method: "PATCH", cookie: editor.cookie, json: { value: 110, unit: "N.m" } });
    expect(ok.status).toBe(200);
    expect(((await ok.json()) as { reading: { valueSi: number; label: string } }).reading).toMatchObject({
      valueSi: 110,
      label: "",
      fastener: 4,
    });
    expect((await http(one, { method: "DELETE", cookie: builder2.cookie })).status).toBe(403);
    expect((await http(one, { method: "DELETE", cookie: builder.cookie })).status).toBe(204);
  });
});
