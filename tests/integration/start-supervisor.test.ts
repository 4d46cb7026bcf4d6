// `npm start` as a supervisor (scripts/start.mjs): after a hard stop (the whole `npm start`
// job killed with SIGKILL) the next start ends the children left behind and takes over its
// PostgreSQL, with the data intact; a child that dies is started again; SIGTERM stops
// everything. It runs a second stack of its own (a data folder under .data/, free ports, the
// test run's build reused), so it touches neither the developer's `npm start` nor the app
// the other integration tests use.
import { randomUUID } from "node:crypto";
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { users } from "~/db/schema";
import { hashPassword } from "~/lib/auth.server";
import { waitFor } from "../support/app";

const ROOT = path.resolve(import.meta.dirname, "../..");
const name = `start-test-${process.pid}-${Date.now().toString(36)}`;
const dataDir = path.join(ROOT, ".data", name);
const stateFile = path.join(dataDir, "start.json");
const logFile = path.join(dataDir, "npm-start.log");

type State = {
  pid: number;
  pgDir: string;
  ports: { app: number; db: number; smtp: number; meili: number };
  children: Record<string, { pid: number; file: string }>;
};
const readState = (): State | null => {
  try {
    return JSON.parse(fs.readFileSync(stateFile, "utf8")) as State;
  } catch {
    return null;
  }
};

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once("error", reject);
    s.listen(0, "127.0.0.1", () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}
const portFree = (port: number) =>
  new Promise<boolean>((resolve) => {
    const s = net.createServer();
    s.once("error", () => resolve(false));
    s.listen(port, "127.0.0.1", () => s.close(() => resolve(true)));
  });

/** A live (not zombie) process's group, or null. */
function groupOf(pid: number): number | null {
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    const [state, , pgrp] = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    return state === "Z" || state === "X" ? null : Number(pgrp);
  } catch {
    return null;
  }
}
const alive = (pid: number) => groupOf(pid) !== null;
/** The live processes of a process group (a supervised child leads one: tsx and its script). */
const groupMembers = (pgid: number) =>
  fs
    .readdirSync("/proc")
    .filter((p) => /^\d+$/.test(p) && groupOf(Number(p)) === pgid)
    .map(Number);
const postmasterPid = (pgDir: string) => {
  try {
    return Number(fs.readFileSync(path.join(pgDir, "postmaster.pid"), "utf8").split("\n")[0]);
  } catch {
    return null;
  }
};

let ports: State["ports"];
let env: NodeJS.ProcessEnv;
let job: ChildProcess | null = null;
let pgDir = "";

/** `npm start` as a terminal would run it: a job (process group) of its own. */
function npmStart(): ChildProcess {
  const out = fs.openSync(logFile, "a");
  const child = spawn("npm", ["start", "--", "--reuse-build"], { cwd: ROOT, env, detached: true, stdio: ["ignore", out, out] });
  fs.closeSync(out);
  return child;
}
const logTail = () => (fs.existsSync(logFile) ? fs.readFileSync(logFile, "utf8").split("\n").slice(-40).join("\n") : "(no log)");
const exited = (child: ChildProcess) =>
  child.exitCode !== null || child.signalCode !== null ? Promise.resolve() : new Promise<void>((r) => child.once("exit", () => r()));

/**
 * Waits until this start's supervisor has its app and worker running (not ones a killed start
 * left behind, which may still answer on the port) and the app answers /healthz.
 */
async function healthy(timeoutMs = 180_000, notFrom: State | null = null) {
  try {
    await waitFor(
      async () => {
        const s = readState();
        if (
          !s?.children.app ||
          !s.children.worker ||
          (notFrom && (s.pid === notFrom.pid || s.children.app.pid === notFrom.children.app.pid))
        )
          return false;
        return (await fetch(`http://127.0.0.1:${ports.app}/healthz`)).status === 200;
      },
      timeoutMs,
      500,
    );
  } catch (err) {
    throw new Error(`the app did not answer /healthz (${String(err)}); npm start said:\n${logTail()}`);
  }
}

async function signIn(email: string, password: string) {
  const origin = `http://127.0.0.1:${ports.app}`;
  return fetch(`${origin}/signin`, {
    method: "POST",
    headers: { origin },
    body: new URLSearchParams({ email, password, next: "/" }),
    redirect: "manual",
  });
}

beforeAll(async () => {
  const buildDir = process.env.BENCHREEL_BUILD_DIR;
  if (!buildDir || !fs.existsSync(path.join(buildDir, "server/index.js")))
    throw new Error("run through `npm test`: it builds into BENCHREEL_BUILD_DIR, which this test reuses");
  const [app, db, smtp, meili] = await Promise.all([freePort(), freePort(), freePort(), freePort()]);
  ports = { app, db, smtp, meili };
  fs.mkdirSync(dataDir, { recursive: true });
  // Only what a person's shell would have, plus this stack's place: none of the test run's
  // own settings (its database, control URLs, fast retries) leak into the second stack.
  env = {
    PATH: process.env.PATH,
    HOME: process.env.HOME,
    PORT: String(app),
    BENCHREEL_PG_PORT: String(db),
    BENCHREEL_SMTP_PORT: String(smtp),
    BENCHREEL_MEILI_PORT: String(meili),
    BENCHREEL_DATA_NAME: name,
    BENCHREEL_BUILD_DIR: buildDir,
    UPLOAD_DIR: path.join(dataDir, "uploads"),
    ...(process.env.PG_BIN ? { PG_BIN: process.env.PG_BIN } : {}),
  };
});

afterAll(async () => {
  // Whatever a failed step left: the job, the children, the cluster, the folders.
  if (job && job.exitCode === null && job.signalCode === null) {
    try {
      process.kill(-job.pid!, "SIGKILL");
    } catch {
      // already gone
    }
  }
  for (const { pid } of Object.values(readState()?.children ?? {})) {
    try {
      process.kill(-pid, "SIGKILL");
    } catch {
      // already gone
    }
  }
  if (pgDir && postmasterPid(pgDir)) {
    const pgCtl = [path.join(process.env.PG_BIN ?? "/usr/lib/postgresql/15/bin", "pg_ctl"), "-D", pgDir, "-m", "immediate", "-w", "stop"];
    if (process.getuid?.() === 0) spawnSync("runuser", ["-u", "postgres", "--", ...pgCtl], { stdio: "ignore" });
    else spawnSync(pgCtl[0], pgCtl.slice(1), { stdio: "ignore" });
  }
  if (pgDir) fs.rmSync(path.dirname(pgDir), { recursive: true, force: true });
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe("npm start after a hard stop", () => {
  const marker = { id: randomUUID(), email: `marker-${randomUUID().slice(0, 8)}@test.larkspur.example`, password: "marker-password-123" };
  let before: State;
  let postmaster: number | null = null;

  it("a SIGKILL of the npm start job leaves its PostgreSQL and children running (the fault)", async () => {
    job = npmStart();
    await healthy();
    before = readState()!;
    pgDir = before.pgDir;
    postmaster = postmasterPid(pgDir);
    expect(postmaster).not.toBeNull();

    // A row written through PostgreSQL before the kill.
    const pool = new pg.Pool({ connectionString: `postgres://postgres@127.0.0.1:${ports.db}/benchreel` });
    try {
      await drizzle(pool)
        .insert(users)
        .values({
          id: marker.id,
          email: marker.email,
          name: "Supervisor marker",
          role: "apprentice",
          passwordHash: await hashPassword(marker.password),
        });
    } finally {
      await pool.end();
    }

    process.kill(-job.pid!, "SIGKILL");
    await exited(job);
    expect(alive(before.pid)).toBe(false);
    expect(alive(postmaster!)).toBe(true);
    expect(Object.values(before.children).filter(({ pid }) => alive(pid))).toHaveLength(Object.keys(before.children).length);
    expect(await portFree(ports.app)).toBe(false);
  }, 240_000);

  it("the next npm start ends the children left behind, takes over its PostgreSQL, and the data is intact", async () => {
    job = npmStart();
    await healthy(180_000, before);
    const after = readState()!;
    expect(after.pid).not.toBe(before.pid);
    for (const [label, { pid }] of Object.entries(before.children)) {
      expect(groupMembers(pid), `${label} of the killed start`).toEqual([]);
      expect(after.children[label].pid, label).not.toBe(pid);
    }
    expect(postmasterPid(pgDir)).toBe(postmaster);

    const res = await signIn(marker.email, marker.password);
    expect(res.status).toBe(302);
    expect(res.headers.getSetCookie().length).toBeGreaterThan(0);
    expect((await signIn("dana@larkspur.example", "larkspur-demo")).status).toBe(302);
  }, 240_000);

  it("a child that dies is started again: the app, and the worker without its script left behind", async () => {
    for (const label of ["app", "worker"]) {
      const old = readState()!.children[label].pid;
      const members = groupMembers(old);
      process.kill(old, "SIGKILL");
      const restarted = await waitFor(
        async () => {
          const pid = readState()?.children[label]?.pid;
          return pid && pid !== old && alive(pid) ? pid : null;
        },
        30_000,
        200,
      ).catch((err) => {
        throw new Error(`${label} was not started again (${String(err)}):\n${logTail()}`);
      });
      expect(restarted).not.toBe(old);
      // The worker runs as tsx + its script: killing tsx must not leave a second worker.
      expect(members.filter(alive), `${label}'s old process group`).toEqual([]);
    }
    await healthy(60_000);
    expect(fs.readFileSync(logFile, "utf8")).toMatch(/worker stopped \(SIGKILL\); starting it again in \d+ s/);
  }, 120_000);

  it("SIGTERM stops the children and PostgreSQL and frees every port", async () => {
    const last = readState()!;
    const pm = postmasterPid(pgDir)!;
    process.kill(last.pid, "SIGTERM");
    await exited(job!);
    await waitFor(async () => !alive(last.pid), 60_000, 200);
    expect(alive(pm)).toBe(false);
    expect(fs.existsSync(path.join(pgDir, "postmaster.pid"))).toBe(false);
    for (const [label, { pid }] of Object.entries(last.children)) expect(groupMembers(pid), label).toEqual([]);
    for (const [what, port] of Object.entries(ports)) expect(await portFree(port), `${what} port ${port}`).toBe(true);
    expect(fs.existsSync(stateFile)).toBe(false);
  }, 90_000);
});
