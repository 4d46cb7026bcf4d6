// The storage suite, once against the local folder and once against the S3 stand-in (the
// same cases): the store's own contract (keys, Range reads, copies, removal), then a recording
// end to end through the app: a resumed tus upload, processing (the original read from the
// store, the browser copy and poster written to it), Range and the download from the store,
// and deletion leaving no object behind.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { storeConfigFrom } from "~/lib/storage/config";
import { folderStore, type ObjectStore, s3Store, sha256Of } from "~/lib/storage/store.server";
import { BASE_URL, createUser } from "../support/app";
import { addPerson, fakeStoreUrl, type Stack, startStack } from "../support/stacks";
import { call, createUpload, offsetOf, patch, sha256, signIn, type Target, waitReady } from "../support/tus-raw";

const runDir = process.env.BENCHREEL_RUN_DIR ?? fs.mkdtempSync("/tmp/br-storage-");
const work = path.join(runDir, "storage-test");
fs.mkdirSync(work, { recursive: true });

/** A 2 s H.264 clip of about 11 MB with its index at the end, so processing remuxes it (a browser copy is written). */
const clipPath = path.join(work, "bench-clip.mp4");
beforeAll(() => {
  if (fs.existsSync(clipPath)) return;
  execFileSync("/usr/bin/ffmpeg", [
    ...["-hide_banner", "-loglevel", "error", "-y", "-f", "lavfi", "-i", "testsrc2=duration=2:size=640x360:rate=25,noise=alls=40:allf=t"],
    ...["-pix_fmt", "yuv420p", "-c:v", "libx264", "-preset", "ultrafast", "-crf", "10", clipPath],
  ]);
});

function s3Config() {
  const c = storeConfigFrom({ STORAGE_URL: fakeStoreUrl() });
  if (typeof c === "string" || c.kind !== "s3") throw new Error(String(c));
  return c;
}

type Backend = { name: "folder" | "s3"; store: () => ObjectStore };
const backends: Backend[] = [
  { name: "folder", store: () => folderStore(fs.mkdtempSync(path.join(work, "folder-"))) },
  { name: "s3", store: () => s3Store(s3Config()) },
];

describe.each(backends)("the $name store", ({ store: make }) => {
  let store: ObjectStore;
  const prefix = `recordings/contract-${Date.now().toString(36)}/`;
  beforeAll(() => {
    store = make();
  });

  it("keeps a file under a key: head, a byte range, a copy back, a listing", async () => {
    const file = path.join(work, "contract.bin");
    const bytes = Buffer.from(Array.from({ length: 300_000 }, (_, i) => (i * 7) % 251));
    fs.writeFileSync(file, bytes);
    await store.putFile(`${prefix}original`, file);
    const head = await store.head(`${prefix}original`);
    expect(head?.size).toBe(bytes.length);
    expect(head?.etag).toMatch(/^".+"$/);
    const part = await sha256Of(await store.read(`${prefix}original`, { start: 1000, end: 1999 }));
    expect(part).toBe(sha256(bytes.subarray(1000, 2000)));
    const back = path.join(work, "contract-back.bin");
    await store.getFile(`${prefix}original`, back);
    expect(sha256(fs.readFileSync(back))).toBe(sha256(bytes));
    expect(await store.list(prefix)).toEqual([`${prefix}original`]);
  });

  it("answers head with null for a key that holds nothing, and removes a recording's keys together", async () => {
    expect(await store.head(`${prefix}nothing-here`)).toBeNull();
    await store.removePrefix(prefix);
    expect(await store.list(prefix)).toEqual([]);
    expect(await store.head(`${prefix}original`)).toBeNull();
  });

  it("refuses keys that climb out of the store", async () => {
    await expect(store.head("recordings/../../etc/passwd")).rejects.toThrow(/bad storage key/);
    await expect(store.head("/etc/passwd")).rejects.toThrow(/bad storage key/);
  });
});

describe.each(backends)("a recording kept in the $name store, through the app", ({ name }) => {
  let stack: Stack | null = null;
  let target: Target;
  beforeAll(async () => {
    if (name === "folder") {
      const builder = await createUser("builder");
      target = { url: BASE_URL, origin: BASE_URL, cookie: builder.cookie };
      return;
    }
    stack = await startStack({ name: "storage", apps: 1, workers: 1, storageUrl: fakeStoreUrl() });
    const person = await addPerson(stack, "builder");
    target = {
      url: stack.apps[0],
      origin: stack.publicUrl,
      cookie: await signIn(stack.apps[0], stack.publicUrl, person.email, person.password),
    };
  }, 120_000);
  afterAll(async () => {
    await stack?.stop();
  });

  it("uploads in two pieces (resumed), processes from the store, and plays with Range from it", async () => {
    const clip = fs.readFileSync(clipPath);
    const upload = await createUpload(target, clip.length, `storage-${name}.mp4`);
    const half = 5 * 1024 * 1024 + 12345;
    expect((await patch(target, upload, 0, clip.subarray(0, half))).status).toBe(204);
    expect(await offsetOf(target, upload)).toBe(half);
    const done = await patch(target, upload, half, clip.subarray(half));
    expect(done.status).toBe(204);
    const id = done.headers.get("benchreel-recording") ?? "";
    expect(id).toMatch(/^[0-9a-f-]{36}$/);

    const recording = await waitReady(target, id);
    expect(recording.state).toBe("ready");

    const original = await call(target, `/api/recordings/${id}/original`);
    expect(original.status).toBe(200);
    expect(sha256(new Uint8Array(await original.arrayBuffer()))).toBe(sha256(clip));

    const whole = await call(target, `/api/recordings/${id}/media`);
    expect(whole.status).toBe(200);
    const media = Buffer.from(await whole.arrayBuffer());
    const etag = whole.headers.get("etag") ?? "";
    const ranged = await call(target, `/api/recordings/${id}/media`, { headers: { Range: "bytes=1000-1999" } });
    expect(ranged.status).toBe(206);
    expect(ranged.headers.get("content-range")).toBe(`bytes 1000-1999/${media.length}`);
    expect(sha256(new Uint8Array(await ranged.arrayBuffer()))).toBe(sha256(media.subarray(1000, 2000)));
    const stale = await call(target, `/api/recordings/${id}/media`, { headers: { Range: "bytes=0-9", "If-Range": '"other"' } });
    expect(stale.status).toBe(200);
    await stale.body?.cancel();
    const same = await call(target, `/api/recordings/${id}/media`, { headers: { "If-None-Match": etag } });
    expect(same.status).toBe(304);
    const beyond = await call(target, `/api/recordings/${id}/media`, { headers: { Range: `bytes=${media.length}-` } });
    expect(beyond.status).toBe(416);

    const poster = await call(target, `/api/recordings/${id}/poster`);
    expect(poster.status).toBe(200);
    expect(Buffer.from(await poster.arrayBuffer()).subarray(0, 2)).toEqual(Buffer.from([0xff, 0xd8]));

    if (name === "s3") {
      // The bytes are in the store, not on the instance's disk.
      const store = s3Store(s3Config());
      expect(await store.list(`recordings/${id}/`)).toEqual([`recordings/${id}/poster.jpg`, `recordings/${id}/web.mp4`]);
      const where = await stack!.sql.query("select backend, original_key from recording_storage where recording_id = $1", [id]);
      expect(where.rows[0].backend).toBe("s3");
      expect((await store.head(where.rows[0].original_key))?.size).toBe(clip.length);
    }
  }, 180_000);
});
