// `npm start`: install what is missing, start PostgreSQL and the local fakes, migrate, seed,
// build, and serve the app with its worker. It then supervises: a child that dies (app,
// worker, fakes) is started again with a back-off, and so is PostgreSQL; Ctrl-C (or SIGTERM,
// or the terminal closing) stops everything it started.
//
// What it started is written to `<data folder>/start.json`, so that a start after a hard
// stop (kill -9, a lost terminal) ends the children the killed one left behind and takes
// over its PostgreSQL (the cluster's own postmaster.pid names its pid and port) instead of
// refusing because the ports are taken.
//
//   npm start                      build, then serve
//   npm start -- --reuse-build     serve the build already in BENCHREEL_BUILD_DIR (or build/)
//
// BENCHREEL_DATA_NAME (default `dev`) names the data folder under `.data/` (database
// cluster, mail, search data, start.json); with other ports it lets a second stack run, as
// the supervisor's own test does.
import fs from "node:fs";
import path from "node:path";
import {
  ROOT,
  appEnv,
  bin,
  clusterDir,
  createDatabase,
  endLeftGroup,
  ensureDebianTools,
  ensureNpmPackages,
  log,
  portFree,
  postgresAnswers,
  runWith,
  runningPostmaster,
  runsFile,
  spawnChild,
  startPostgres,
  stopChildren,
  stopPostgres,
  supervise,
  tsx,
  waitForPort,
} from "./lib/stack.mjs";

const reuseBuild = process.argv.slice(2).includes("--reuse-build");
const appPort = Number(process.env.PORT ?? 3000);
const dbPort = Number(process.env.BENCHREEL_PG_PORT ?? 5544);
const smtpPort = Number(process.env.BENCHREEL_SMTP_PORT ?? 2525);
const meiliPort = Number(process.env.BENCHREEL_MEILI_PORT ?? 7701);
const dataName = process.env.BENCHREEL_DATA_NAME ?? "dev";
if (!/^[A-Za-z0-9][A-Za-z0-9._-]*$/.test(dataName)) {
  console.error(`BENCHREEL_DATA_NAME must be a plain folder name, not ${JSON.stringify(dataName)}`);
  process.exit(1);
}
const dataDir = path.join(ROOT, ".data", dataName);
const stateFile = path.join(dataDir, "start.json");
const buildDir = path.resolve(ROOT, process.env.BENCHREEL_BUILD_DIR ?? "build");
const SELF = "scripts/start.mjs";

/** start.json: { pid, pgDir, ports, children: { label: { pid, file } } } */
function readState() {
  try {
    return JSON.parse(fs.readFileSync(stateFile, "utf8"));
  } catch {
    return null;
  }
}
function writeState(state) {
  fs.writeFileSync(`${stateFile}.tmp`, JSON.stringify(state, null, 2));
  fs.renameSync(`${stateFile}.tmp`, stateFile);
}

fs.mkdirSync(dataDir, { recursive: true });
const pgDir = clusterDir(dataName);
const previous = readState();
if (previous?.pid && previous.pid !== process.pid && runsFile(previous.pid, SELF)) {
  console.error(
    `Benchreel is already running from this checkout (process ${previous.pid}) on http://127.0.0.1:${previous.ports?.app ?? appPort}.\nStop it with Ctrl-C in its terminal first.`,
  );
  process.exit(1);
}

// Children of a supervisor that was killed: each led its own process group, recorded with
// the file it runs; only processes of that group still running that file are ended.
for (const [label, { pid, file }] of Object.entries(previous?.children ?? {})) {
  const ended = await endLeftGroup(pid, file);
  if (ended.length) log(`ended the ${label} left running by a start that was killed (pid ${ended.join(", ")})`);
}

// Its PostgreSQL: taken over when it answers on the port asked for, else stopped cleanly
// and started again below.
let pgRunning = false;
const postmaster = runningPostmaster(pgDir);
if (postmaster) {
  if (postmaster.port === dbPort && postgresAnswers(dbPort)) {
    log(`PostgreSQL of this checkout is still running (pid ${postmaster.pid}, port ${dbPort}); taking it over`);
    pgRunning = true;
  } else {
    log(
      `PostgreSQL of this checkout is still running (pid ${postmaster.pid}, port ${postmaster.port}); stopping it to start again on ${dbPort}`,
    );
    stopPostgres(pgDir);
  }
}

for (const [port, what] of [
  [appPort, "app (PORT)"],
  [dbPort, "PostgreSQL"],
  [smtpPort, "fake SMTP"],
  [meiliPort, "fake search"],
]) {
  if (port === dbPort && pgRunning) continue;
  if (!(await portFree(port))) {
    console.error(
      `Port ${port} for the ${what} is taken, and not by anything a start of this checkout left behind; is another Benchreel (or something else) running?`,
    );
    process.exit(1);
  }
}
const state = { pid: process.pid, pgDir, ports: { app: appPort, db: dbPort, smtp: smtpPort, meili: meiliPort }, children: {} };
writeState(state);

const supervised = [];
let pgWatch = null;
let stopping = false;
async function shutdown(code = 0) {
  if (stopping) return;
  stopping = true;
  log("stopping…");
  clearInterval(pgWatch);
  for (const s of supervised) s.stop();
  await stopChildren();
  stopPostgres(pgDir);
  fs.rmSync(stateFile, { force: true });
  process.exit(code);
}
process.on("SIGINT", () => shutdown(0));
process.on("SIGTERM", () => shutdown(0));
process.on("SIGHUP", () => shutdown(0));
// A closed terminal makes writes fail (EIO); that must not cut the stop short.
process.stdout.on("error", () => {});
process.stderr.on("error", () => {});
process.on("uncaughtException", (err) => {
  console.error(`\n[benchreel] ${err.stack ?? err}`);
  if (stopping) process.exit(1);
  shutdown(1);
});

/** Starts a long-running child, keeps it running, and records its pid in start.json. */
function keep(label, file, spawnIt) {
  const s = supervise(label, spawnIt, {
    onStart: (child) => {
      state.children[label] = { pid: child.pid, file };
      if (!stopping) writeState(state);
    },
  });
  supervised.push(s);
  return s;
}

/** PostgreSQL runs on its own (pg_ctl); it is looked at every 5 s and started again if gone. */
function watchPostgres() {
  let failures = 0;
  let nextTry = 0;
  pgWatch = setInterval(async () => {
    if (stopping || Date.now() < nextTry || runningPostmaster(pgDir)) return;
    log("PostgreSQL is not running; starting it again");
    try {
      await startPostgres(pgDir, dbPort);
      failures = 0;
    } catch (err) {
      failures++;
      const delay = Math.min(5000 * 2 ** failures, 60_000);
      nextTry = Date.now() + delay;
      log(`PostgreSQL did not start (${err.message}); trying again in ${delay / 1000} s`);
    }
  }, 5000);
}

try {
  ensureNpmPackages();
  ensureDebianTools({ postgres: true, ffmpeg: true });
  if (!pgRunning) await startPostgres(pgDir, dbPort);
  createDatabase(dbPort, "benchreel");
  const env = {
    ...appEnv({ dbPort, dbName: "benchreel", appPort, smtpPort, meiliPort, dataDir, nodeEnv: "production" }),
    UPLOAD_DIR: process.env.UPLOAD_DIR ?? path.join(ROOT, "uploads"),
    BENCHREEL_BUILD_DIR: buildDir,
  };

  if ((await runWith(bin("tsx"), ["scripts/migrate.ts"], env)) !== 0) throw new Error("migrations failed");
  if ((await runWith(bin("tsx"), ["scripts/seed.ts"], env)) !== 0) throw new Error("seeding failed");
  watchPostgres();

  const detached = { detached: true };
  keep("fake SMTP", "scripts/fakes/smtp/server.ts", () =>
    tsx("scripts/fakes/smtp/server.ts", ["--port", String(smtpPort), "--dir", env.MAIL_FAKE_DIR], env, null, detached),
  );
  if (fs.existsSync(path.join(ROOT, "scripts/fakes/meili/server.ts"))) {
    keep("fake search", "scripts/fakes/meili/server.ts", () =>
      tsx(
        "scripts/fakes/meili/server.ts",
        ["--port", String(meiliPort), "--data", path.join(dataDir, "meili"), "--key", env.MEILI_API_KEY],
        env,
        null,
        detached,
      ),
    );
  }
  await waitForPort(smtpPort, 30_000, "fake SMTP");

  const serverBuild = path.join(buildDir, "server/index.js");
  if (reuseBuild && fs.existsSync(serverBuild)) {
    log(`using the build in ${path.relative(ROOT, buildDir) || "."} (--reuse-build)`);
  } else {
    log("building the app…");
    if ((await runWith(bin("react-router"), ["build"], env)) !== 0) throw new Error("build failed");
  }

  keep("app", "server.js", () => spawnChild(process.execPath, ["server.js", serverBuild], env, "app", null, detached));
  keep("worker", "scripts/worker.ts", () => tsx("scripts/worker.ts", [], env, null, detached));
  await waitForPort(appPort, 60_000, "app");

  console.log(`
  Benchreel is running on http://127.0.0.1:${appPort}

  Demo sign-ins (password for all: larkspur-demo)
    dana@larkspur.example     Admin
    priya@larkspur.example    Editor
    marcus@larkspur.example   Senior builder
    tomas@larkspur.example    QC inspector
    jamie@larkspur.example    Apprentice

  Mail goes to the local fake: Admin → Outbox shows it.  Ctrl-C stops everything.
  A part that stops is started again; after a hard stop, \`npm start\` picks up what was left.
`);
} catch (err) {
  console.error(`\n[benchreel] start failed: ${err.message}`);
  await shutdown(1);
}
