// Recordings, protocols as their specifications say: tus 1.0.0 (version, OPTIONS, content
// type, extensions offered, expiration, overrun, a finished upload resumed from its stored
// URL), continuing an unfinished upload found by the file's name, size and fingerprint, and Range
// (RFC 9110 §14) on the media routes.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import * as tus from "tus-js-client";
import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { recordings, uploads } from "~/db/schema";
import { db } from "~/lib/db.server";
import { tusFilePath } from "~/lib/recordings/storage.server";
import { receivedBytes, uploadExpiryDays } from "~/lib/recordings/tus.server";
import { fileFingerprint, fingerprintMetadata, type FileFingerprint } from "~/lib/recordings/file-fingerprint";
import { BASE_URL, createUser, http, waitFor, type TestUser } from "../support/app";

const work = path.join(process.env.BENCHREEL_RUN_DIR ?? fs.mkdtempSync("/tmp/br-rec-"), "recordings-protocols");
fs.mkdirSync(work, { recursive: true });

const TUS = { "Tus-Resumable": "1.0.0" };
const DAY = 24 * 3600 * 1000;
const b64 = (s: string) => Buffer.from(s).toString("base64");

let builder: TestUser;
let builder2: TestUser;
let clip: Buffer;

/** POST a new upload of `size` bytes; its id. */
async function create(
  user: TestUser,
  name: string,
  size: number,
  title = name,
  meta: Record<string, string> = {},
): Promise<{ id: string; res: Response }> {
  const metadata = Object.entries({ filename: name, title, ...meta })
    .map(([k, v]) => `${k} ${b64(v)}`)
    .join(",");
  const res = await http("/api/uploads", {
    method: "POST",
    cookie: user.cookie,
    headers: { ...TUS, "Upload-Length": String(size), "Upload-Metadata": metadata },
  });
  expect(res.status).toBe(201);
  return { id: path.basename(res.headers.get("location")!), res };
}

function patch(user: TestUser, id: string, offset: number, body: BodyInit, headers: Record<string, string> = {}) {
  return http(`/api/uploads/${id}`, {
    method: "PATCH",
    cookie: user.cookie,
    headers: { ...TUS, "Upload-Offset": String(offset), "Content-Type": "application/offset+octet-stream", ...headers },
    body,
  });
}

const head = (user: TestUser | null, id: string, headers: Record<string, string> = TUS) =>
  http(`/api/uploads/${id}`, { method: "HEAD", cookie: user?.cookie, headers });

async function waitReady(id: string, cookie: string) {
  return waitFor(
    async () => {
      const { recording } = (await (await http(`/api/recordings/${id}`, { cookie })).json()) as { recording: { state: string } };
      return recording.state !== "processing" ? recording : null;
    },
    45_000,
    300,
  );
}

beforeAll(async () => {
  [builder, builder2] = await Promise.all([createUser("builder"), createUser("builder")]);
  const p = path.join(work, "clip.mp4");
  execFileSync("/usr/bin/ffmpeg", [
    "-hide_banner",
    "-loglevel",
    "error",
    "-y",
    "-f",
    "lavfi",
    "-i",
    "testsrc=duration=3:size=320x240:rate=25",
    "-pix_fmt",
    "yuv420p",
    "-c:v",
    "libx264",
    "-movflags",
    "+faststart",
    p,
  ]);
  clip = fs.readFileSync(p);
});

describe("tus 1.0.0", () => {
  it("answers OPTIONS without a session, offering only the extensions it implements", async () => {
    const res = await http("/api/uploads", { method: "OPTIONS" });
    expect(res.status).toBe(204);
    expect(res.headers.get("tus-version")).toBe("1.0.0");
    const extensions = res.headers.get("tus-extension")!.split(",");
    expect(extensions.sort()).toEqual(["creation", "creation-with-upload", "expiration", "termination"]);
    expect(Number(res.headers.get("tus-max-size"))).toBeGreaterThan(0);
    // Nothing else is open: the same URL's other verbs still want a session.
    expect((await http("/api/uploads", { method: "POST", headers: { ...TUS, "Upload-Length": "10" } })).status).toBe(401);
  });

  it("answers an unsupported or missing Tus-Resumable with 412 and Tus-Version, and processes nothing", async () => {
    for (const headers of [{ "Tus-Resumable": "0.2.2" }, {}] as Record<string, string>[]) {
      const res = await http("/api/uploads", {
        method: "POST",
        cookie: builder.cookie,
        headers: { ...headers, "Upload-Length": "10", "Upload-Metadata": `filename ${b64("v.mp4")}` },
      });
      expect(res.status).toBe(412);
      expect(res.headers.get("tus-version")).toBe("1.0.0");
      expect(await res.text()).toMatch(/1\.0\.0/);
    }
    const { id } = await create(builder, "version.mp4", 10);
    const res = await patch(builder, id, 0, "0123456789", { "Tus-Resumable": "2.0.0" });
    expect(res.status).toBe(412);
    expect(res.headers.get("tus-version")).toBe("1.0.0");
    expect(await receivedBytes(id)).toBe(0);
  });

  it("answers a PATCH with the wrong content type 415, and refuses a deferred length with a reason instead of advertising it", async () => {
    const { id } = await create(builder, "ctype.mp4", 10);
    for (const type of ["application/octet-stream", "text/plain"]) {
      const res = await patch(builder, id, 0, "0123456789", { "Content-Type": type });
      expect(res.status).toBe(415);
      expect(await res.text()).toMatch(/application\/offset\+octet-stream/);
    }
    const bare = await http(`/api/uploads/${id}`, {
      method: "PATCH",
      cookie: builder.cookie,
      headers: { ...TUS, "Upload-Offset": "0" },
      body: "0123456789",
    });
    expect(bare.status).toBe(415);
    expect(await receivedBytes(id)).toBe(0);

    const deferred = await http("/api/uploads", {
      method: "POST",
      cookie: builder.cookie,
      headers: { ...TUS, "Upload-Defer-Length": "1", "Upload-Metadata": `filename ${b64("d.mp4")}` },
    });
    expect(deferred.status).toBe(400);
    expect(await deferred.text()).toMatch(/size/);
  });

  it("says when a PATCH overruns the length the upload declared (not the shop's limit), and stores nothing past it", async () => {
    const { id } = await create(builder, "overrun.mp4", 10);
    const res = await patch(builder, id, 0, "0123456789ABCDEF");
    expect(res.status).toBe(413);
    const text = await res.text();
    expect(text).toMatch(/more bytes than the upload declared \(Upload-Length 10\): 16 bytes at offset 0, where 10 remain/);
    expect(text).not.toMatch(/shop's limit/);
    // A body with no length (chunked) is cut at the declared length too.
    const chunked = new ReadableStream<Uint8Array>({
      start(c) {
        c.enqueue(Buffer.from("0123456789"));
        c.enqueue(Buffer.from("ABCDEF"));
        c.close();
      },
    });
    const res2 = await fetch(new URL(`/api/uploads/${id}`, BASE_URL), {
      method: "PATCH",
      headers: {
        ...TUS,
        Cookie: builder.cookie,
        Origin: BASE_URL,
        "Upload-Offset": "0",
        "Content-Type": "application/offset+octet-stream",
      },
      body: chunked,
      duplex: "half",
    } as RequestInit);
    expect(res2.status).toBe(413);
    expect(await res2.text()).toMatch(/more bytes than the upload declared/);
    expect(await receivedBytes(id)).toBeLessThanOrEqual(10);
  });

  it("sends Upload-Expires (the last byte plus the stated time) on creation, PATCH and HEAD; an expired upload is gone (410)", async () => {
    const { id, res } = await create(builder, "expiry.mp4", 20);
    const expires = (r: Response) => Date.parse(r.headers.get("upload-expires") ?? "");
    expect(expires(res)).toBeGreaterThan(Date.now() + (uploadExpiryDays() - 1) * DAY);
    const p = await patch(builder, id, 0, "0123456789");
    expect(p.status).toBe(204);
    const mtime = fs.statSync(tusFilePath(id)).mtimeMs;
    expect(Math.abs(expires(p) - (mtime + uploadExpiryDays() * DAY))).toBeLessThan(1000);
    const h = await head(builder, id);
    expect(h.headers.get("upload-offset")).toBe("10");
    expect(expires(h)).toBe(expires(p));

    // No bytes for longer than the stated time: HEAD says 410 Gone and the bytes are removed.
    const old = new Date(Date.now() - (uploadExpiryDays() + 1) * DAY);
    await db().update(uploads).set({ createdAt: old }).where(eq(uploads.id, id));
    fs.utimesSync(tusFilePath(id), old, old);
    const gone = await head(builder, id);
    expect(gone.status).toBe(410);
    expect(fs.existsSync(tusFilePath(id))).toBe(false);
    expect((await http(`/api/uploads/${id}`, { cookie: builder.cookie })).status).toBe(404);
  });

  it("takes bytes with the creation request as it advertises (creation-with-upload), a part or the whole file", async () => {
    const post = (name: string, body: BodyInit) =>
      http("/api/uploads", {
        method: "POST",
        cookie: builder.cookie,
        headers: {
          ...TUS,
          "Upload-Length": String(clip.length),
          "Upload-Metadata": `filename ${b64(name)}`,
          "Content-Type": "application/offset+octet-stream",
        },
        body,
      });
    const part = await post("part.mp4", new Uint8Array(clip.subarray(0, 1000)));
    expect(part.status).toBe(201);
    expect(part.headers.get("upload-offset")).toBe("1000");
    expect(part.headers.get("upload-expires")).toBeTruthy();
    expect(await receivedBytes(path.basename(part.headers.get("location")!))).toBe(1000);
    const whole = await post("whole.mp4", new Uint8Array(clip));
    expect(whole.status).toBe(201);
    expect(whole.headers.get("upload-offset")).toBe(String(clip.length));
    expect(whole.headers.get("benchreel-recording")).toBeTruthy();
    expect(whole.headers.get("upload-expires")).toBeNull();
  });

  it("answers HEAD on a finished upload with Upload-Offset = Upload-Length, so a client resuming it from its stored URL finishes instead of uploading again", async () => {
    const { id } = await create(builder, "finished.mp4", clip.length);
    const done = await patch(builder, id, 0, new Uint8Array(clip));
    expect(done.status).toBe(204);
    const recordingId = done.headers.get("benchreel-recording")!;
    expect(recordingId).toBeTruthy();

    const h = await head(builder, id);
    expect(h.status).toBe(200);
    expect(h.headers.get("upload-offset")).toBe(String(clip.length));
    expect(h.headers.get("upload-length")).toBe(String(clip.length));
    expect(h.headers.get("benchreel-recording")).toBe(recordingId);
    expect(h.headers.get("upload-expires")).toBeNull();
    // Still only its starter may ask.
    expect((await head(builder2, id)).status).toBe(403);

    // A tus client with the URL stored: it succeeds without sending a byte or creating anything.
    const methods: string[] = [];
    let seen: string | null = null;
    await new Promise<void>((resolve, reject) => {
      const u = new tus.Upload(clip, {
        endpoint: `${BASE_URL}/api/uploads`,
        uploadUrl: `${BASE_URL}/api/uploads/${id}`,
        retryDelays: [],
        headers: { Origin: BASE_URL, Cookie: builder.cookie },
        metadata: { filename: "finished.mp4" },
        onBeforeRequest: (req) => void methods.push(req.getMethod()),
        onAfterResponse: (_req, res) => {
          seen = res.getHeader("Benchreel-Recording") ?? seen;
        },
        onSuccess: () => resolve(),
        onError: reject,
      });
      u.start();
    });
    expect(methods).toEqual(["HEAD"]);
    expect(seen).toBe(recordingId);
    const made = await db().select({ id: recordings.id }).from(recordings).where(eq(recordings.uploadId, id));
    expect(made).toHaveLength(1);
    // A PATCH at the end with no bytes is acknowledged; one with bytes says the upload is complete.
    expect((await patch(builder, id, clip.length, "")).status).toBe(204);
    const more = await patch(builder, id, clip.length, "xyz");
    expect(more.status).toBe(413);
    expect(await more.text()).toMatch(/complete/);
    expect((await patch(builder, id, 0, "xyz")).status).toBe(409);
  });
});

/** The question the upload page asks: an unfinished upload of this file, with what tells it apart. */
function fileQueryOf(file: File, fp: FileFingerprint, only: "both" | "lastModified" | "neither" = "both"): string {
  const q: Record<string, string> = { fileName: file.name, size: String(file.size) };
  if (only !== "neither") q.lastModified = fp.lastModified;
  if (only === "both" && fp.sample) q.sample = fp.sample;
  return new URLSearchParams(q).toString();
}

describe("continuing an upload from another browser", () => {
  const find = (user: TestUser, q: string) => http(`/api/uploads?${q}`, { cookie: user.cookie });
  const found = async (user: TestUser, q: string) =>
    ((await (await find(user, q)).json()) as { unfinished: { id: string; received: number; title: string; expiresAt: string }[] })
      .unfinished;

  it("finds the person's unfinished upload by file name, size and fingerprint (with the details given when it began), and nobody else's", async () => {
    const name = `long-take-${Date.now()}.mp4`;
    const file = new File([Buffer.alloc(1000, "x")], name, { lastModified: Date.parse("2026-11-30T08:15:00Z") });
    const fp = await fileFingerprint(file);
    expect(fp.sample).toMatch(/^[0-9a-f]{64}$/);
    const { id } = await create(builder, name, 1000, "Head gasket retorque, pass 2", fingerprintMetadata(fp));
    await patch(builder, id, 0, "x".repeat(400));
    const mine = await found(builder, fileQueryOf(file, fp));
    expect(mine).toHaveLength(1);
    expect(mine[0]).toMatchObject({ id, received: 400, title: "Head gasket retorque, pass 2" });
    expect(Date.parse(mine[0].expiresAt)).toBeGreaterThan(Date.now() + (uploadExpiryDays() - 1) * DAY);
    // The same file copied to another machine keeps its bytes but may get a new time: the sample decides.
    expect(
      await found(builder, fileQueryOf(new File([file], name, { lastModified: Date.now() }), { ...fp, lastModified: String(Date.now()) })),
    ).toHaveLength(1);
    expect(
      await found(
        builder,
        new URLSearchParams({ fileName: name, size: "999", lastModified: fp.lastModified, sample: fp.sample! }).toString(),
      ),
    ).toHaveLength(0);
    expect(await found(builder2, fileQueryOf(file, fp))).toHaveLength(0);
    const bad = await find(builder, "fileName=x&size=-4");
    expect(bad.status).toBe(422);
    expect(((await bad.json()) as { issues: { path: string }[] }).issues[0].path).toBe("size");
    const badSample = await find(builder, `fileName=x&size=4&sample=${"z".repeat(64)}`);
    expect(badSample.status).toBe(422);
    expect(((await badSample.json()) as { issues: { path: string }[] }).issues[0].path).toBe("sample");

    // A client that only knows the URL the server gave continues from the server's offset.
    const offsets: string[] = [];
    await new Promise<void>((resolve, reject) => {
      const u = new tus.Upload(Buffer.alloc(1000, "x"), {
        endpoint: `${BASE_URL}/api/uploads`,
        uploadUrl: `${BASE_URL}/api/uploads/${mine[0].id}`,
        retryDelays: [],
        headers: { Origin: BASE_URL, Cookie: builder.cookie },
        onBeforeRequest: (req) => void (req.getMethod() === "PATCH" && offsets.push(req.getHeader("Upload-Offset") ?? "")),
        onSuccess: () => resolve(),
        onError: reject,
      });
      u.start();
    });
    expect(offsets).toEqual(["400"]);
    const [row] = await db().select().from(uploads).where(eq(uploads.id, id));
    expect(row.recordingId).toBeTruthy();
    const [rec] = await db().select({ title: recordings.title }).from(recordings).where(eq(recordings.id, row.recordingId!));
    expect(rec.title).toBe("Head gasket retorque, pass 2");
  });

  it("never joins two different files that share name, size and owner: the fingerprint tells them apart", async () => {
    const name = `bench-take-${Date.now()}.mp4`;
    const at = Date.parse("2026-12-01T07:00:00Z");
    // Same name, size, owner and even the same time; different bytes.
    const first = new File([Buffer.alloc(3 * 1024 * 1024, "a")], name, { lastModified: at });
    const second = new File([Buffer.alloc(3 * 1024 * 1024, "b")], name, { lastModified: at });
    const [fpFirst, fpSecond] = [await fileFingerprint(first), await fileFingerprint(second)];
    const { id } = await create(builder, name, first.size, "First take", fingerprintMetadata(fpFirst));
    await patch(builder, id, 0, "a".repeat(1000));
    expect(await found(builder, fileQueryOf(second, fpSecond))).toEqual([]);
    expect((await found(builder, fileQueryOf(first, fpFirst))).map((u) => u.id)).toEqual([id]);
    // Name and size alone say nothing about the bytes: no join.
    expect(await found(builder, fileQueryOf(first, fpFirst, "neither"))).toEqual([]);

    // A browser without Web Crypto (plain http on the shop's network) sends the time alone.
    const older = new File([Buffer.alloc(2000, "c")], `no-crypto-${name}`, { lastModified: at });
    const newer = new File([Buffer.alloc(2000, "d")], older.name, { lastModified: at + 60_000 });
    const plain = (f: File): FileFingerprint => ({ lastModified: String(f.lastModified), sample: null });
    const { id: olderId } = await create(builder, older.name, older.size, "Older take", fingerprintMetadata(plain(older)));
    expect(await found(builder, fileQueryOf(newer, plain(newer), "lastModified"))).toEqual([]);
    expect((await found(builder, fileQueryOf(older, plain(older), "lastModified"))).map((u) => u.id)).toEqual([olderId]);
  });
});

describe("Range (RFC 9110 §14) on media", () => {
  let recId: string;
  beforeAll(async () => {
    const { id } = await create(builder, "range.mp4", clip.length);
    recId = (await patch(builder, id, 0, new Uint8Array(clip))).headers.get("benchreel-recording")!;
    expect((await waitReady(recId, builder.cookie)).state).toBe("ready");
  });

  it("ignores a range unit it does not know: 200 with the whole file", async () => {
    const res = await http(`/api/recordings/${recId}/media`, { cookie: builder.cookie, headers: { Range: "items=0-5" } });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-range")).toBeNull();
    expect(Buffer.from(await res.arrayBuffer()).equals(clip)).toBe(true);
    const poster = await http(`/api/recordings/${recId}/poster`, { cookie: builder.cookie, headers: { Range: "items=0-5" } });
    expect(poster.status).toBe(200);
    await poster.body?.cancel();
  });

  it("ignores Range on HEAD: the whole file's headers, no Content-Range", async () => {
    for (const route of ["media", "original"]) {
      const res = await http(`/api/recordings/${recId}/${route}`, {
        method: "HEAD",
        cookie: builder.cookie,
        headers: { Range: "bytes=0-99" },
      });
      expect(res.status).toBe(200);
      expect(res.headers.get("content-length")).toBe(String(clip.length));
      expect(res.headers.get("content-range")).toBeNull();
      expect(res.headers.get("accept-ranges")).toBe("bytes");
    }
    // GET still honours it.
    const ranged = await http(`/api/recordings/${recId}/media`, { cookie: builder.cookie, headers: { Range: "bytes=0-99" } });
    expect(ranged.status).toBe(206);
    expect((await ranged.arrayBuffer()).byteLength).toBe(100);
  });
});
