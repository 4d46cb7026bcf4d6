// Several instances on one database and one object store (issue 18): two app instances and
// two workers, started from the test run's build with STORAGE_URL on the S3 stand-in. A
// session and a flash message made through one instance hold on the other; an upload begun
// through A is continued through B, and the lock on it holds across them (a PostgreSQL
// advisory lock: while A writes, B's request asks A to let go and waits for it); processing
// jobs spread over both workers; a worker killed mid-job is taken over by the other.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { storeConfigFrom } from "~/lib/storage/config";
import { s3Store } from "~/lib/storage/store.server";
import { waitFor } from "../support/app";
import { addPerson, fakeStoreUrl, type Stack, startStack } from "../support/stacks";
import { call, createUpload, offsetOf, patch, signIn, type Target, waitReady } from "../support/tus-raw";

const runDir = process.env.BENCHREEL_RUN_DIR ?? fs.mkdtempSync("/tmp/br-inst-");
const work = path.join(runDir, "instances-test");
fs.mkdirSync(work, { recursive: true });

/** An MPEG-4 Part 2 clip: not browser-safe, so the worker transcodes it (seconds of work to share or interrupt). */
function transcodeClip(name: string, seconds: number): Buffer {
  const file = path.join(work, name);
  execFileSync("/usr/bin/ffmpeg", [
    ...["-hide_banner", "-loglevel", "error", "-y", "-f", "lavfi", "-i", `testsrc2=duration=${seconds}:size=640x360:rate=25`],
    ...["-c:v", "mpeg4", "-q:v", "4", file],
  ]);
  return fs.readFileSync(file);
}

let stack: Stack;
let a: Target;
let b: Target;

beforeAll(async () => {
  stack = await startStack({ name: "instances", apps: 2, workers: 2, storageUrl: fakeStoreUrl() });
  const person = await addPerson(stack, "editor");
  const cookie = await signIn(stack.apps[0], stack.publicUrl, person.email, person.password);
  a = { url: stack.apps[0], origin: stack.publicUrl, cookie };
  b = { url: stack.apps[1], origin: stack.publicUrl, cookie };
}, 120_000);
afterAll(async () => {
  await stack?.stop();
});

/** Uploads a whole file through one instance; the recording's id. */
async function uploadThrough(t: Target, bytes: Buffer, name: string): Promise<string> {
  const upload = await createUpload(t, bytes.length, name);
  const res = await patch(t, upload, 0, bytes);
  expect(res.status).toBe(204);
  return res.headers.get("benchreel-recording") ?? "";
}

describe("two app instances, two workers, one database and one store", () => {
  it("a session signed in through instance A is good on instance B", async () => {
    const me = await call(b, "/api/me");
    expect(me.status).toBe(200);
    expect(((await me.json()) as { user: { role: string } }).user.role).toBe("editor");
  });

  it("an upload begun through A is continued through B; while A writes, B waits for A to let go", async () => {
    const clip = transcodeClip("handover.avi", 4);
    const upload = await createUpload(a, clip.length, "handover.avi");
    const first = 100_000;
    expect((await patch(a, upload, 0, clip.subarray(0, first))).status).toBe(204);
    expect(await offsetOf(b, upload)).toBe(first);

    // A PATCH through A that sends a little and then stalls, holding the upload's lock.
    let stall!: ReadableStreamDefaultController<Uint8Array>;
    const body = new ReadableStream<Uint8Array>({
      start(c) {
        stall = c;
        c.enqueue(clip.subarray(first, first + 50_000));
      },
    });
    const held = call(a, upload, {
      method: "PATCH",
      headers: { "Tus-Resumable": "1.0.0", "Upload-Offset": String(first), "Content-Type": "application/offset+octet-stream" },
      body,
      duplex: "half",
    } as RequestInit).catch((err: Error) => err);
    await waitFor(async () => {
      const { rows } = await stack.sql.query(
        "select 1 from pg_locks where locktype = 'advisory' and classid = $1 and objid::bigint = (hashtext($2)::bigint & 4294967295) and granted",
        [0x747573, upload.split("/").pop()],
      );
      return rows.length > 0;
    });
    // B asks for the same lock: A's request is told to let go, and B answers once it has.
    const offset = await offsetOf(b, upload);
    expect(offset).toBeGreaterThanOrEqual(first);
    await held;
    try {
      stall.close();
    } catch {
      /* the request already ended */
    }
    const now = await offsetOf(b, upload);
    const done = await patch(b, upload, now, clip.subarray(now));
    expect(done.status).toBe(204);
    const id = done.headers.get("benchreel-recording") ?? "";
    expect((await waitReady(a, id)).state).toBe("ready");
    const store = s3Store(storeConfigFrom({ STORAGE_URL: fakeStoreUrl() }) as Extract<ReturnType<typeof storeConfigFrom>, { kind: "s3" }>);
    const [{ original_key }] = (await stack.sql.query("select original_key from recording_storage where recording_id = $1", [id])).rows;
    const original = await store.read(original_key);
    const chunks: Buffer[] = [];
    for await (const c of original) chunks.push(c as Buffer);
    expect(Buffer.concat(chunks).equals(clip)).toBe(true);

    // A flash message set through A is shown by B.
    const saved = await call(a, `/recordings/${id}`, {
      method: "POST",
      headers: { "content-type": "application/x-www-form-urlencoded" },
      body: new URLSearchParams({ intent: "details", title: "Handover clip", description: "", tags: "" }),
    });
    expect(saved.status).toBe(302);
    const flash = saved.headers
      .getSetCookie()
      .map((c) => c.split(";")[0])
      .find((c) => c.startsWith("br_flash="));
    expect(flash).toBeTruthy();
    const page = await call({ ...b, cookie: `${b.cookie}; ${flash}` }, `/recordings/${id}`);
    expect(await page.text()).toContain("Details saved.");
  });

  it("processing jobs go to both workers", async () => {
    const clips = [transcodeClip("spread-1.avi", 8), transcodeClip("spread-2.avi", 8)];
    // Both uploads end together, so each job finds a worker free while the other works.
    const uploads = await Promise.all(clips.map((c, i) => createUpload(i ? b : a, c.length, `spread-${i + 1}.avi`)));
    const ids = await Promise.all(
      uploads.map(async (u, i) => (await patch(i ? b : a, u, 0, clips[i])).headers.get("benchreel-recording") ?? ""),
    );
    for (const id of ids) expect((await waitReady(a, id)).state).toBe("ready");
    // "Ready" is written a moment before the worker logs which job it finished.
    const whoDid = await waitFor(async () => {
      const logs = stack.workerLogs.map((f) => fs.readFileSync(f, "utf8"));
      const found = ids.map((id) => logs.findIndex((log) => log.includes(`[recordings] ${id}: ready`)));
      return found.every((i) => i >= 0) ? found : null;
    });
    expect(new Set(whoDid)).toEqual(new Set([0, 1]));
  }, 180_000);

  it("a worker killed in the middle of a job is taken over by the other", async () => {
    const clip = transcodeClip("takeover.avi", 30);
    const id = await uploadThrough(a, clip, "takeover.avi");
    const pids = [stack.workerPid(0), stack.workerPid(1)];
    // The worker working it is the parent of the ffmpeg that names the recording's folder.
    const owner = await waitFor(async () => {
      for (const p of fs.readdirSync("/proc").filter((d) => /^\d+$/.test(d))) {
        const argv = fs.readFileSync(`/proc/${p}/cmdline`, "latin1").split("\0");
        if (!argv[0]?.endsWith("ffmpeg") || !argv.some((x) => x.includes(`/recordings/${id}/`))) continue;
        const ppid = Number(/PPid:\s+(\d+)/.exec(fs.readFileSync(`/proc/${p}/status`, "utf8"))?.[1]);
        if (pids.includes(ppid)) return ppid;
      }
      return null;
    }, 60_000);
    process.kill(owner, "SIGKILL");
    const other = pids.indexOf(owner) === 0 ? 1 : 0;
    expect((await waitReady(b, id, 150_000)).state).toBe("ready");
    const log = await waitFor(async () => {
      const text = fs.readFileSync(stack.workerLogs[other], "utf8");
      return text.includes(`[recordings] ${id}: ready`) ? text : null;
    });
    expect(log).toMatch(/took over 1 job/);
  }, 240_000);
});
