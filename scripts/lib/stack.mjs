// Orchestration shared by `npm start` and `npm test`. Plain Node (no packages): it runs
// before `npm ci` may have happened.
import { execFileSync, spawn, spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
export const PG_BIN = process.env.PG_BIN ?? "/usr/lib/postgresql/15/bin";
const isRoot = process.getuid?.() === 0;

export function log(msg) {
  console.log(`\x1b[33m[benchreel]\x1b[0m ${msg}`);
}

function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: "inherit", cwd: ROOT, ...opts });
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(" ")} exited with ${r.status ?? r.signal}`);
}

// ---- installs -----------------------------------------------------------------------------

export function ensureNpmPackages() {
  const marker = path.join(ROOT, "node_modules/.package-lock.json");
  const lock = path.join(ROOT, "package-lock.json");
  if (fs.existsSync(marker) && fs.statSync(marker).mtimeMs >= fs.statSync(lock).mtimeMs) return;
  log("installing npm packages (npm ci)…");
  run("npm", ["ci", "--no-audit", "--no-fund"]);
}

let aptUpdated = false;
function aptInstall(pkgs) {
  if (!isRoot) throw new Error(`missing ${pkgs.join(", ")}: install with apt-get as root`);
  if (!aptUpdated) {
    log("apt-get update…");
    run("apt-get", ["update", "-qq"]);
    aptUpdated = true;
  }
  log(`apt-get install ${pkgs.join(" ")}…`);
  run("apt-get", ["install", "-y", "-qq", "--no-install-recommends", ...pkgs], {
    env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" },
  });
}

/** Installs Debian's packages for whichever of the named tools are missing. */
// poppler-utils goes with the services: the builds test reads the build sheet PDF's text and paper with pdftotext and pdfinfo.
export function ensureDebianTools({ postgres = true, ffmpeg = true, chromium = false, poppler = ffmpeg } = {}) {
  const missing = [];
  if (postgres && !fs.existsSync(path.join(PG_BIN, "postgres"))) missing.push("postgresql");
  if (ffmpeg && !fs.existsSync("/usr/bin/ffprobe")) missing.push("ffmpeg");
  if (chromium && !fs.existsSync("/usr/bin/chromium")) missing.push("chromium");
  if (poppler && !fs.existsSync("/usr/bin/pdftotext")) missing.push("poppler-utils");
  if (missing.length) aptInstall(missing);
}

// ---- ports --------------------------------------------------------------------------------

export function portFree(port) {
  return new Promise((resolve) => {
    const s = net.createServer();
    s.once("error", () => resolve(false));
    s.listen(port, "127.0.0.1", () => s.close(() => resolve(true)));
  });
}

export function freePort() {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once("error", reject);
    s.listen(0, "127.0.0.1", () => {
      const { port } = s.address();
      s.close(() => resolve(port));
    });
  });
}

export async function waitForPort(port, timeoutMs = 60_000, label = `port ${port}`) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const ok = await new Promise((resolve) => {
      const sock = net.connect(port, "127.0.0.1");
      sock.once("connect", () => {
        sock.destroy();
        resolve(true);
      });
      sock.once("error", () => resolve(false));
    });
    if (ok) return;
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`${label} did not open within ${timeoutMs} ms`);
}

// ---- PostgreSQL ---------------------------------------------------------------------------

function asPostgres(cmd, args, opts = {}) {
  return isRoot ? ["runuser", ["-u", "postgres", "--", cmd, ...args], opts] : [cmd, args, opts];
}

function postgresCanEnter(dir) {
  if (!isRoot) return true;
  const r = spawnSync("runuser", ["-u", "postgres", "--", "test", "-x", dir]);
  return r.status === 0;
}

/**
 * The folder for a cluster. Inside the checkout (`.data/<name>`, git-ignored) when the
 * postgres user can reach it; otherwise under /var/lib/postgresql, keyed by a hash of the
 * checkout path so that two checkouts never share one.
 */
export function clusterDir(name) {
  const parent = path.join(ROOT, ".data");
  fs.mkdirSync(parent, { recursive: true });
  if (postgresCanEnter(parent)) return path.join(parent, name, "pg");
  const key = createHash("sha1").update(ROOT).digest("hex").slice(0, 12);
  return path.join("/var/lib/postgresql", `benchreel-${key}`, name, "pg");
}

function chownPostgres(dir) {
  if (isRoot) execFileSync("chown", ["-R", "postgres:postgres", dir]);
}

export async function startPostgres(dir, port) {
  fs.mkdirSync(dir, { recursive: true });
  chownPostgres(path.dirname(dir));
  fs.chmodSync(dir, 0o700);
  if (!fs.existsSync(path.join(dir, "PG_VERSION"))) {
    log(`creating a PostgreSQL cluster in ${dir}`);
    run(
      ...asPostgres(path.join(PG_BIN, "initdb"), ["-D", dir, "-A", "trust", "-U", "postgres", "-E", "UTF8", "--no-locale"], {
        stdio: "ignore",
      }),
    );
  }
  const logFile = path.join(path.dirname(dir), "postgres.log");
  if (!fs.existsSync(logFile)) fs.writeFileSync(logFile, "");
  chownPostgres(logFile);
  run(
    ...asPostgres(
      path.join(PG_BIN, "pg_ctl"),
      ["-D", dir, "-w", "-t", "60", "-l", logFile, "-o", `-p ${port} -c listen_addresses=127.0.0.1 -k ${dir} -c fsync=on`, "start"],
      { stdio: "ignore" },
    ),
  );
  log(`PostgreSQL on 127.0.0.1:${port}`);
}

export function stopPostgres(dir) {
  if (!fs.existsSync(path.join(dir, "postmaster.pid"))) return;
  // "fast" ends sessions and checkpoints; "immediate" only if that did not finish (it
  // needs crash recovery at the next start, which PostgreSQL does by itself).
  for (const mode of ["fast", "immediate"]) {
    const [cmd, args, opts] = asPostgres(path.join(PG_BIN, "pg_ctl"), ["-D", dir, "-m", mode, "-w", "-t", "30", "stop"], {
      stdio: "ignore",
    });
    if (spawnSync(cmd, args, { cwd: ROOT, ...opts }).status === 0 || !runningPostmaster(dir)) break;
  }
  log("PostgreSQL stopped");
}

/**
 * The postmaster running on the cluster in `dir`, from its postmaster.pid (pid, data folder,
 * port), or null. The pid must still be a `postgres` process on that very folder: a pid file
 * left by a crash may name a pid that the system has since given to something else.
 */
export function runningPostmaster(dir) {
  let lines;
  try {
    lines = fs.readFileSync(path.join(dir, "postmaster.pid"), "utf8").split("\n");
  } catch {
    return null;
  }
  const pid = Number(lines[0]);
  const port = Number(lines[3]);
  const proc = processInfo(pid);
  if (!proc || path.basename(proc.cmdline[0] ?? "") !== "postgres") return null;
  if (path.resolve(lines[1] ?? "") !== path.resolve(dir)) return null;
  return { pid, port };
}

/** Whether the PostgreSQL on the port accepts connections (pg_isready). */
export function postgresAnswers(port) {
  return spawnSync(path.join(PG_BIN, "pg_isready"), ["-q", "-h", "127.0.0.1", "-p", String(port), "-t", "5"]).status === 0;
}

export function createDatabase(port, name, { dropFirst = false } = {}) {
  const psql = (sql) =>
    spawnSync(path.join(PG_BIN, "psql"), ["-h", "127.0.0.1", "-p", String(port), "-U", "postgres", "-d", "postgres", "-tAc", sql], {
      encoding: "utf8",
    });
  if (dropFirst) psql(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
  const exists = psql(`SELECT 1 FROM pg_database WHERE datname = '${name}'`).stdout.trim() === "1";
  if (!exists) {
    const r = psql(`CREATE DATABASE "${name}"`);
    if (r.status !== 0) throw new Error(`could not create database ${name}: ${r.stderr}`);
  }
}

// ---- processes ----------------------------------------------------------------------------

const children = new Set();

export function tsx(script, args = [], env = {}, logFile = null, opts = {}) {
  return spawnChild(path.join(ROOT, "node_modules/.bin/tsx"), [script, ...args], env, path.basename(script), logFile, opts);
}

/**
 * Starts a child in ROOT. With `detached`, the child leads a process group of its own, so
 * that it and its own children (tsx runs the script in a second node process) are signalled
 * and ended together, and a Ctrl-C in the terminal reaches only the supervisor, which then
 * stops them in order.
 */
export function spawnChild(cmd, args, env = {}, label = path.basename(args[0] ?? cmd), logFile = null, { detached = false } = {}) {
  let stdio = ["ignore", "inherit", "inherit"];
  if (logFile) {
    const fd = fs.openSync(logFile, "a");
    stdio = ["ignore", fd, fd];
  }
  const child = spawn(cmd, args, { cwd: ROOT, env: { ...process.env, ...env }, stdio, detached });
  child.label = label;
  child.group = detached;
  children.add(child);
  child.on("exit", () => {
    children.delete(child);
    // What the leader leaves of its group (a script whose tsx was killed) goes with it.
    if (detached) signalGroup(child.pid, "SIGKILL");
  });
  return child;
}

function signalGroup(pgid, signal) {
  try {
    process.kill(-pgid, signal);
  } catch {
    // the group is already empty
  }
}

// SIGTERM goes to the leader only (tsx passes it on to its script, which would otherwise get
// it twice); SIGKILL to the whole group.
function signalChild(child, signal) {
  if (child.group && signal === "SIGKILL") signalGroup(child.pid, signal);
  else child.kill(signal);
}

/** Runs a command to completion with extra env; resolves to its exit code. */
export function runWith(cmd, args, env = {}) {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { cwd: ROOT, env: { ...process.env, ...env }, stdio: "inherit" });
    children.add(child);
    child.on("exit", (code, signal) => {
      children.delete(child);
      resolve(code ?? (signal ? 1 : 0));
    });
  });
}

export async function stopChildren() {
  const waits = [...children].map(
    (c) =>
      new Promise((resolve) => {
        if (c.exitCode != null) return resolve();
        const t = setTimeout(() => signalChild(c, "SIGKILL"), 6000);
        c.once("exit", () => {
          clearTimeout(t);
          resolve();
        });
        signalChild(c, "SIGTERM");
      }),
  );
  await Promise.all(waits);
}

export function bin(name) {
  return path.join(ROOT, "node_modules/.bin", name);
}

/** The environment the app, the worker and the scripts share. */
export function appEnv({ dbPort, dbName, appPort, smtpPort, meiliPort, dataDir, nodeEnv }) {
  return {
    NODE_ENV: nodeEnv,
    DATABASE_URL: `postgres://postgres@127.0.0.1:${dbPort}/${dbName}`,
    SESSION_SECRET: process.env.SESSION_SECRET ?? "local-only-session-secret-change-me",
    PUBLIC_URL: process.env.PUBLIC_URL ?? `http://127.0.0.1:${appPort}`,
    SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
    MAIL_FAKE_DIR: path.join(dataDir, "mail"),
    MEILI_HOST: `http://127.0.0.1:${meiliPort}`,
    MEILI_API_KEY: "local-only-meili-key",
    UPLOAD_DIR: process.env.UPLOAD_DIR ?? path.join(dataDir, "uploads"),
    PORT: String(appPort),
    HOST: "127.0.0.1",
  };
}

// ---- what is running (Linux /proc), for the supervisor of `npm start` ------------------------

/** A live process's group, command line and working folder, or null (gone or a zombie). */
export function processInfo(pid) {
  if (!Number.isInteger(pid) || pid <= 0) return null;
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    // "pid (comm) state ppid pgrp …"; comm may itself hold spaces and parentheses.
    const [state, , pgrp] = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    if (state === "Z" || state === "X") return null;
    const cmdline = fs.readFileSync(`/proc/${pid}/cmdline`, "utf8").split("\0").filter(Boolean);
    let cwd = null;
    try {
      cwd = fs.readlinkSync(`/proc/${pid}/cwd`);
    } catch {
      // another user's process: its folder cannot be read, so it is not ours
    }
    return { pid, pgid: Number(pgrp), cmdline, cwd };
  } catch {
    return null;
  }
}

/**
 * Whether the process runs `file` (a path inside ROOT) of this checkout: one of its
 * arguments, taken from its own working folder, is that file. A pid recorded before a crash
 * may since have gone to an unrelated process; this tells them apart.
 */
export function runsFile(pid, file) {
  const p = processInfo(pid);
  if (!p?.cwd) return false;
  const target = path.join(ROOT, file);
  return p.cmdline.some((arg) => path.resolve(p.cwd, arg) === target);
}

/** The live processes of group `pgid` that run `file` of this checkout. */
export function groupRunning(pgid, file) {
  const pids = [];
  for (const name of fs.readdirSync("/proc")) {
    if (!/^\d+$/.test(name)) continue;
    const pid = Number(name);
    if (processInfo(pid)?.pgid === pgid && runsFile(pid, file)) pids.push(pid);
  }
  return pids;
}

const sleep = (ms) => new Promise((r) => setTimeout(r, ms));

/**
 * Ends what is left of process group `pgid` running `file` of this checkout (see
 * groupRunning): SIGTERM to its leader if it is still there (it passes it on), else to each;
 * SIGKILL to whatever remains after `graceMs`. Resolves to the pids that were found.
 */
export async function endLeftGroup(pgid, file, graceMs = 5000) {
  const found = groupRunning(pgid, file);
  const left = () => found.filter((pid) => processInfo(pid));
  const signal = (pids, sig) =>
    pids.forEach((pid) => {
      try {
        process.kill(pid, sig);
      } catch {
        /* gone */
      }
    });
  const waitGone = async (ms) => {
    const deadline = Date.now() + ms;
    while (left().length && Date.now() < deadline) await sleep(100);
  };
  signal(found.includes(pgid) ? [pgid] : found, "SIGTERM");
  await waitGone(graceMs);
  signal(left(), "SIGKILL");
  await waitGone(5000);
  return found;
}

/**
 * Keeps a child running. `start` spawns it (and returns the ChildProcess); when it ends while
 * `stop()` has not been called, it is started again after a back-off that doubles from 1 s to
 * at most 30 s, back to 1 s once a run has lasted a minute. Each exit and restart is logged.
 */
export function supervise(label, start, { onStart } = {}) {
  let child = null;
  let stopped = false;
  let timer = null;
  let delay = 0;
  const launch = () => {
    const startedAt = Date.now();
    const c = start();
    child = c;
    let ended = false;
    const onEnd = (why) => {
      if (ended) return;
      ended = true;
      if (stopped) return;
      delay = Date.now() - startedAt >= 60_000 ? 1000 : Math.min(Math.max(delay * 2, 1000), 30_000);
      log(`${label} stopped (${why}); starting it again in ${delay / 1000} s`);
      timer = setTimeout(() => {
        timer = null;
        if (stopped) return;
        launch();
        log(`${label} started again (pid ${child.pid})`);
      }, delay);
    };
    c.once("exit", (code, signal) => onEnd(signal ?? `exit code ${code}`));
    c.once("error", (err) => onEnd(err.message));
    if (c.pid) onStart?.(c);
  };
  launch();
  return {
    get child() {
      return child;
    },
    stop() {
      stopped = true;
      clearTimeout(timer);
    },
  };
}
