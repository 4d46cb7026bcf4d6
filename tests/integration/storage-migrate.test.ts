// `npm run storage:migrate`: a shop's recordings move from the folder into the object store,
// each object's checksum verified, the records switched over; interrupted (one object already
// copied) and run again, nothing is copied twice; a run photo goes the same way. Then an
// instance on the store plays them.
import { execFileSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import pg from "pg";
import { afterAll, beforeAll, expect, it } from "vitest";
import { storeConfigFrom } from "~/lib/storage/config";
import { s3Store, sha256Of } from "~/lib/storage/store.server";
import { addPerson, fakeStoreUrl, type Stack, startStack } from "../support/stacks";
import { call, createUpload, patch, sha256, signIn, type Target, waitReady } from "../support/tus-raw";

const ROOT = path.resolve(__dirname, "../..");
const runDir = process.env.BENCHREEL_RUN_DIR ?? fs.mkdtempSync("/tmp/br-migrate-");
const work = path.join(runDir, "storage-migrate-test");
fs.mkdirSync(work, { recursive: true });

let folderStack: (Stack & { uploadDir: string }) | null = null;
let storeStack: Stack | null = null;
let person: { email: string; password: string };
const ids: string[] = [];
const clips: Buffer[] = [];

type Summary = { recordings: number; switched: number; photos: number; copied: number; alreadyThere: number; failed: number };
function migrate(args: string[] = []): Summary {
  if (!folderStack) throw new Error("no stack");
  const out = execFileSync(path.join(ROOT, "node_modules/.bin/tsx"), ["scripts/storage-migrate.ts", ...args], {
    cwd: ROOT,
    env: { ...process.env, DATABASE_URL: folderStack.databaseUrl, UPLOAD_DIR: folderStack.uploadDir, STORAGE_URL: fakeStoreUrl() },
    encoding: "utf8",
  });
  return JSON.parse(out.trim().split("\n").pop() ?? "{}");
}

beforeAll(async () => {
  folderStack = await startStack({ name: "migrate", apps: 1, workers: 1 });
  person = await addPerson(folderStack, "editor");
  const t: Target = {
    url: folderStack.apps[0],
    origin: folderStack.publicUrl,
    cookie: await signIn(folderStack.apps[0], folderStack.publicUrl, person.email, person.password),
  };
  for (const n of [1, 2]) {
    const file = path.join(work, `migrate-${n}.mp4`);
    execFileSync("/usr/bin/ffmpeg", [
      ...["-hide_banner", "-loglevel", "error", "-y", "-f", "lavfi", "-i", `testsrc=duration=${n + 1}:size=320x240:rate=25`],
      ...["-pix_fmt", "yuv420p", "-c:v", "libx264", file],
    ]);
    const clip = fs.readFileSync(file);
    const upload = await createUpload(t, clip.length, `migrate-${n}.mp4`);
    const res = await patch(t, upload, 0, clip);
    if (res.status !== 204)
      throw new Error(
        `upload answered ${res.status}: ${await res.text()}; app log: ${fs.readFileSync(path.join(folderStack.uploadDir, "..", "app-0.log"), "utf8").slice(-2000)}`,
      );
    const id = res.headers.get("benchreel-recording") ?? "";
    expect((await waitReady(t, id)).state).toBe("ready");
    ids.push(id);
    clips.push(clip);
  }
  // Only the migration touches the files and rows from here on.
  await folderStack.stop();
}, 180_000);
afterAll(async () => {
  await folderStack?.stop().catch(() => {});
  await storeStack?.stop();
});

it("copies each recording into the store, verifies it, switches it over, and a second run copies nothing", async () => {
  if (!folderStack) throw new Error("no stack");
  const c = storeConfigFrom({ STORAGE_URL: fakeStoreUrl() });
  if (typeof c === "string" || c.kind !== "s3") throw new Error("no store");
  const store = s3Store(c);
  // An earlier run stopped after copying the second recording's original.
  const early = `recordings/${ids[1]}/original`;
  await store.putFile(early, path.join(folderStack.uploadDir, early));
  // A photo taken during a run, in the folder where the app kept photos before a store.
  const photo = `run-photos/${randomUUID()}/${randomUUID()}.png`;
  const photoBytes = execFileSync("/usr/bin/ffmpeg", [
    ...["-v", "error", "-f", "lavfi", "-i", "color=c=gray:s=8x6", "-frames:v", "1", "-f", "image2pipe", "-vcodec", "png", "-"],
  ]);
  fs.mkdirSync(path.dirname(path.join(folderStack.uploadDir, photo)), { recursive: true });
  fs.writeFileSync(path.join(folderStack.uploadDir, photo), photoBytes);

  const dry = migrate(["--dry-run"]);
  expect(dry).toMatchObject({ recordings: 2, switched: 0, photos: 1, copied: 0, failed: 0 });
  expect(await store.head(photo)).toBeNull();

  const first = migrate();
  const files = ids.flatMap((id) =>
    ["original", "web.mp4", "poster.jpg"].filter((f) => fs.existsSync(path.join(folderStack!.uploadDir, "recordings", id, f))),
  );
  expect(first).toEqual({ recordings: 2, switched: 2, photos: 1, copied: files.length - 1 + 1, alreadyThere: 1, failed: 0 });
  expect(await sha256Of(await store.read(photo))).toBe(sha256(photoBytes));
  for (const id of ids) {
    for (const f of ["original", "poster.jpg"]) {
      const local = sha256(fs.readFileSync(path.join(folderStack.uploadDir, "recordings", id, f)));
      expect(await sha256Of(await store.read(`recordings/${id}/${f}`))).toBe(local);
    }
  }
  const client = new pg.Client({ connectionString: folderStack.databaseUrl });
  await client.connect();
  const { rows } = await client.query("select recording_id, backend, moved_at from recording_storage");
  await client.end();
  expect(rows.map((r) => r.backend).sort()).toEqual(["s3", "s3"]);

  // Again: no recording left to move, and the photo, already there with its checksum, is not copied twice.
  expect(migrate()).toEqual({ recordings: 0, switched: 0, photos: 1, copied: 0, alreadyThere: 1, failed: 0 });
});

it("an instance on the store (with an empty folder of its own) plays the moved recordings with Range", async () => {
  if (!folderStack) throw new Error("no stack");
  storeStack = await startStack({
    name: "migrated",
    apps: 1,
    workers: 0,
    storageUrl: fakeStoreUrl(),
    databaseUrl: folderStack.databaseUrl,
  });
  const t: Target = {
    url: storeStack.apps[0],
    origin: storeStack.publicUrl,
    cookie: await signIn(storeStack.apps[0], storeStack.publicUrl, person.email, person.password),
  };
  const original = await call(t, `/api/recordings/${ids[0]}/original`);
  expect(original.status).toBe(200);
  expect(sha256(new Uint8Array(await original.arrayBuffer()))).toBe(sha256(clips[0]));
  const part = await call(t, `/api/recordings/${ids[1]}/media`, { headers: { Range: "bytes=0-99" } });
  expect(part.status).toBe(206);
  expect((await part.arrayBuffer()).byteLength).toBe(100);
}, 120_000);

it("a backup restores: the dump loads into a new database with every row, and every original it names is in the store", async () => {
  if (!folderStack) throw new Error("no stack");
  const check = () =>
    execFileSync(path.join(ROOT, "node_modules/.bin/tsx"), ["scripts/restore-check.ts"], {
      cwd: ROOT,
      env: { ...process.env, DATABASE_URL: folderStack!.databaseUrl, UPLOAD_DIR: folderStack!.uploadDir, STORAGE_URL: fakeStoreUrl() },
      encoding: "utf8",
    });
  const ok = JSON.parse(check().trim().split("\n").pop() ?? "{}");
  expect(ok.problems).toEqual([]);
  expect(ok.recordings).toBe(2);
  expect(ok.objectsChecked).toBe(2);
  expect(ok.tables).toBeGreaterThan(20);

  // A store that lost an original fails the check, naming the recording.
  const c = storeConfigFrom({ STORAGE_URL: fakeStoreUrl() });
  if (typeof c === "string" || c.kind !== "s3") throw new Error("no store");
  await s3Store(c).remove(`recordings/${ids[0]}/original`);
  let failed: { status?: number; stdout?: string } = {};
  try {
    check();
  } catch (err) {
    failed = err as typeof failed;
  }
  expect(failed.status).toBe(1);
  expect(JSON.parse(failed.stdout?.trim().split("\n").pop() ?? "{}").problems).toEqual([
    `${ids[0]}: original recordings/${ids[0]}/original is missing from the s3`,
  ]);
}, 120_000);
