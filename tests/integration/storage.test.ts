// The storage suite, once against the local folder and once against the S3 stand-in (the
// same cases): the store's own contract (keys, Range reads, copies, removal), then a recording
// end to end through the app: a resumed tus upload, processing (the original read from the
// store, the browser copy and poster written to it), Range and the download from the store,
// and deletion leaving no object behind; abandoned uploads swept by the worker (bytes and rows,
// with tus's own expiration for bytes no row knows) while one within its age still resumes; a
// damaged recording leaving no temp copy on the worker's disk; and run photos kept in the store,
// taken through one instance and served (and drawn in the build sheet) by another, and held by
// the restore check.
import { execFileSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { ListMultipartUploadsCommand } from "@aws-sdk/client-s3";
import pg from "pg";
import PgBoss from "pg-boss";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { tusFilePath } from "~/lib/recordings/storage.server";
import { UPLOAD_SWEEP_QUEUE } from "~/lib/recordings/queue.server";
import { storeConfigFrom } from "~/lib/storage/config";
import { folderStore, type ObjectStore, s3Store, sha256Of } from "~/lib/storage/store.server";
import { makeBuild } from "../support/build-fixture";
import { BASE_URL, createUser, waitFor } from "../support/app";
import { addPerson, fakeStoreUrl, type Stack, startStack } from "../support/stacks";
import { call, createUpload, offsetOf, patch, sha256, signIn, type Target, waitReady } from "../support/tus-raw";

const ROOT = path.resolve(__dirname, "../..");
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
  let stack: (Stack & { uploadDir: string }) | null = null;
  let target: Target;
  /** The database the app under test uses (the shared app's, or the stack's own). */
  let sql: pg.Pool;
  /** The worker's local folder: the folder store itself, or only its scratch space with a store. */
  let workerDir: string;
  beforeAll(async () => {
    if (name === "folder") {
      const builder = await createUser("builder");
      target = { url: BASE_URL, origin: BASE_URL, cookie: builder.cookie };
      sql = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });
      workerDir = path.resolve(process.env.UPLOAD_DIR ?? "");
      return;
    }
    stack = await startStack({ name: "storage", apps: 1, workers: 1, storageUrl: fakeStoreUrl() });
    const person = await addPerson(stack, "builder");
    target = {
      url: stack.apps[0],
      origin: stack.publicUrl,
      cookie: await signIn(stack.apps[0], stack.publicUrl, person.email, person.password),
    };
    sql = stack.sql;
    workerDir = path.join(stack.uploadDir, "..", "worker-0");
  }, 120_000);
  afterAll(async () => {
    if (!stack) await sql?.end();
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

  it("sweeps, by the worker's scheduled job, an upload abandoned past its age and bytes no upload knows; one within its age resumes", async () => {
    const DAYS_15 = "15 days";
    const longAgo = new Date(Date.now() - 15 * 24 * 3600 * 1000);
    const bytes = Buffer.alloc(300_000, 7);
    const idOf = (p: string) => path.basename(p);
    const abandoned = await createUpload(target, bytes.length, `abandoned-${name}.mp4`);
    const resting = await createUpload(target, bytes.length, `resting-${name}.mp4`);
    const unknown = await createUpload(target, bytes.length, `unknown-${name}.mp4`);
    for (const u of [abandoned, resting, unknown]) expect((await patch(target, u, 0, bytes.subarray(0, 100_000))).status).toBe(204);

    // Abandoned: begun and last written to 15 days ago. Resting: begun 15 days ago, bytes just now.
    await sql.query(`update uploads set created_at = now() - interval '${DAYS_15}' where id = any($1)`, [[idOf(abandoned), idOf(resting)]]);
    if (name === "s3")
      await sql.query(`update upload_activity set last_byte_at = now() - interval '${DAYS_15}' where upload_id = $1`, [idOf(abandoned)]);
    else fs.utimesSync(tusFilePath(idOf(abandoned)), longAgo, longAgo);
    // Unknown: its row lost (a restore, a crash), its bytes begun 15 days ago as tus counts them.
    await sql.query("delete from uploads where id = $1", [idOf(unknown)]);
    const store = name === "s3" ? s3Store(s3Config()) : null;
    const openUploads = async () =>
      store ? ((await store.client.send(new ListMultipartUploadsCommand({ Bucket: store.bucket }))).Uploads ?? []) : [];
    if (store) {
      const mp = (await openUploads()).find((u) => u.Key === idOf(unknown));
      const uploadsDir = fs.readdirSync(path.join(runDir, "s3", store.bucket)).find((d) => d.endsWith("uploads"));
      fs.utimesSync(path.join(runDir, "s3", store.bucket, uploadsDir ?? "", mp?.UploadId ?? "", "key"), longAgo, longAgo);
    } else {
      const sidecar = `${tusFilePath(idOf(unknown))}.json`;
      fs.writeFileSync(sidecar, JSON.stringify({ ...JSON.parse(fs.readFileSync(sidecar, "utf8")), creation_date: longAgo.toISOString() }));
    }
    const held = async (id: string) =>
      store
        ? (await Promise.all([`${id}.info`, `${id}.part`].map((k) => store.head(k)))).some(Boolean) ||
          (await openUploads()).some((u) => u.Key === id)
        : fs.existsSync(tusFilePath(id)) || fs.existsSync(`${tusFilePath(id)}.json`);
    expect(await held(idOf(abandoned))).toBe(true);
    expect(await held(idOf(unknown))).toBe(true);

    // The worker registered the hourly schedule; a job sent to its queue runs the sweep now.
    const schedule = await sql.query("select cron from pgboss.schedule where name = $1", [UPLOAD_SWEEP_QUEUE]);
    expect(schedule.rows).toEqual([{ cron: "23 * * * *" }]);
    const boss = new PgBoss({
      connectionString: stack?.databaseUrl ?? process.env.DATABASE_URL,
      supervise: false,
      schedule: false,
      migrate: false,
    });
    await boss.start();
    await boss.send(UPLOAD_SWEEP_QUEUE, {});
    await boss.stop({ graceful: false, wait: false });
    await waitFor(
      async () =>
        !(await held(idOf(abandoned))) &&
        !(await held(idOf(unknown))) &&
        (await sql.query("select 1 from uploads where id = $1", [idOf(abandoned)])).rowCount === 0,
      60_000,
      500,
    );
    expect((await call(target, abandoned, { method: "HEAD", headers: { "Tus-Resumable": "1.0.0" } })).status).toBe(404);
    if (name === "s3") expect((await sql.query("select 1 from upload_activity where upload_id = $1", [idOf(abandoned)])).rowCount).toBe(0);

    // The resting upload was kept and resumes to a recording.
    expect(await offsetOf(target, resting)).toBe(100_000);
    const done = await patch(target, resting, 100_000, bytes.subarray(100_000));
    expect(done.status).toBe(204);
    expect(done.headers.get("benchreel-recording")).toMatch(/^[0-9a-f-]{36}$/);
  }, 120_000);

  it("keeps no temp copy on the worker's disk after processing a damaged file fails", async () => {
    // A faststart MP4 cut short: it probes (its index is at the front) but its packets run out.
    const whole = path.join(work, "damaged-whole.mp4");
    execFileSync("/usr/bin/ffmpeg", [
      ...["-hide_banner", "-loglevel", "error", "-y", "-f", "lavfi", "-i", "testsrc=duration=4:size=320x240:rate=25"],
      ...["-pix_fmt", "yuv420p", "-c:v", "libx264", "-movflags", "+faststart", whole],
    ]);
    const cut = fs.readFileSync(whole).subarray(0, Math.floor(fs.statSync(whole).size * 0.5));
    const upload = await createUpload(target, cut.length, `damaged-${name}.mp4`);
    const res = await patch(target, upload, 0, cut);
    expect(res.status).toBe(204);
    const id = res.headers.get("benchreel-recording") ?? "";
    const recording = await waitReady(target, id);
    expect(recording.state).toBe("damaged");
    const scratch = path.join(workerDir, "recordings", id);
    const filesIn = (dir: string) =>
      fs.existsSync(dir)
        ? fs
            .readdirSync(dir, { recursive: true, withFileTypes: true })
            .filter((e) => e.isFile())
            .map((e) => e.name)
        : [];
    if (name === "s3") {
      // The original stays in the store for download; the worker's copy of it is gone.
      // (Nothing else either, once the decode check of the recording before it has let go of its own copy.)
      await waitFor(async () => filesIn(workerDir).length === 0, 15_000);
      expect(filesIn(scratch)).toEqual([]);
      expect((await call(target, `/api/recordings/${id}/original`, { method: "HEAD" })).status).toBe(200);
    } else {
      // The folder is the store: the original is kept there for download, and no temporary file.
      await waitFor(async () => filesIn(scratch).every((f) => !f.includes(".tmp")), 15_000);
      expect(filesIn(scratch)).toContain("original");
    }
  }, 120_000);
});

describe("a run photo kept in the store", () => {
  let stack: (Stack & { uploadDir: string }) | null = null;
  beforeAll(async () => {
    // Two instances with the store and an empty folder each, on the shared app's database so
    // the run is made as the other suites make theirs.
    stack = await startStack({
      name: "photos",
      apps: 2,
      workers: 0,
      storageUrl: fakeStoreUrl(),
      databaseUrl: process.env.DATABASE_URL,
    });
  }, 120_000);
  afterAll(async () => {
    await stack?.stop();
  });

  it("is taken through instance A, served by instance B and drawn in B's build sheet, and kept on neither's disk", async () => {
    if (!stack) throw new Error("no stack");
    const builder = await createUser("builder");
    const a: Target = { url: stack.apps[0], origin: stack.publicUrl, cookie: builder.cookie };
    const b: Target = { url: stack.apps[1], origin: stack.publicUrl, cookie: builder.cookie };
    const png = execFileSync("/usr/bin/ffmpeg", [
      ...["-v", "error", "-f", "lavfi", "-i", "color=c=gray:s=8x6", "-frames:v", "1", "-f", "image2pipe", "-vcodec", "png", "-"],
    ]);
    // A run of a published demo procedure, and a photo for one of its specs measured once (a
    // spec measured per cylinder or stud would also need its place; the runs suite covers those).
    const { rows } = await stack.sql.query<{ slug: string; spec_key: string }>(
      `select p.slug, s.spec_key from procedures p join procedure_specs s on s.revision_id = p.published_revision_id
        order by p.slug, s.position`,
    );
    const build = await makeBuild();
    let taken: Response | null = null;
    let runId = "";
    for (const slug of [...new Set(rows.map((r) => r.slug))]) {
      const started = await call(a, "/runs/start", {
        method: "POST",
        headers: { "content-type": "application/x-www-form-urlencoded" },
        body: new URLSearchParams({ procedure: slug, build }),
      });
      expect(started.status).toBe(302);
      runId = /\/runs\/([0-9a-f-]{36})$/.exec(started.headers.get("location") ?? "")?.[1] ?? "";
      for (const r of rows.filter((x) => x.slug === slug)) {
        const form = new FormData();
        form.set("specKey", r.spec_key);
        form.set("photo", new File([new Uint8Array(png)], "gauge.png", { type: "image/png" }));
        const res = await call(a, `/api/runs/${runId}/photos`, { method: "POST", body: form });
        if (res.status === 201) {
          taken = res;
          break;
        }
        expect(res.status).toBe(422);
      }
      if (taken) break;
    }
    expect(taken?.status).toBe(201);
    const { id, url } = (await taken!.json()) as { id: string; url: string };

    const served = await call(b, url);
    expect(served.status).toBe(200);
    expect(served.headers.get("content-type")).toBe("image/png");
    expect(sha256(new Uint8Array(await served.arrayBuffer()))).toBe(sha256(png));
    // Signed out, instance B refuses it before touching the store.
    expect((await fetch(`${b.url}${url}`)).status).toBe(401);

    const store = s3Store(s3Config());
    expect(await store.list(`run-photos/${runId}/`)).toEqual([`run-photos/${runId}/${id}.png`]);
    for (const app of ["app-0", "app-1"]) expect(fs.existsSync(path.join(stack.uploadDir, "..", app, "run-photos"))).toBe(false);

    // Instance B's build sheet PDF draws the photo, read from the store.
    const pdf = await call(b, `/builds/${build}/sheet.pdf`);
    expect(pdf.status).toBe(200);
    const file = path.join(os.tmpdir(), `store-photo-sheet-${randomUUID()}.pdf`);
    fs.writeFileSync(file, Buffer.from(await pdf.arrayBuffer()));
    try {
      const images = execFileSync("pdfimages", ["-list", file])
        .toString()
        .trim()
        .split("\n")
        .slice(2)
        .map((l) => l.trim().split(/\s+/))
        .filter((c) => c[2] === "image");
      expect(images.map((c) => [c[3], c[4]])).toEqual([["8", "6"]]);
    } finally {
      fs.rmSync(file, { force: true });
    }

    // The restore check (a dump restored into a new database) finds the photo's object in the
    // store with the row's size, and names the photo once the store has lost it.
    const restoreCheck = (): { photos: number; problems: string[] } => {
      let out: string;
      try {
        out = execFileSync(path.join(ROOT, "node_modules/.bin/tsx"), ["scripts/restore-check.ts"], {
          cwd: ROOT,
          env: { ...process.env, STORAGE_URL: fakeStoreUrl() },
          encoding: "utf8",
        });
      } catch (err) {
        // Exit 1 names problems; on the shared database some may be other suites' half-made data.
        out = (err as { stdout?: string }).stdout ?? "";
      }
      return JSON.parse(out.trim().split("\n").pop() ?? "{}");
    };
    const before = restoreCheck();
    expect(before.photos).toBeGreaterThanOrEqual(1);
    expect(before.problems.filter((p) => p.includes(id))).toEqual([]);
    await store.remove(`run-photos/${runId}/${id}.png`);
    expect(restoreCheck().problems).toContain(`photo ${id} of run ${runId} is missing from the store`);
  }, 180_000);
});
