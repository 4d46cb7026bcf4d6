// `npm start`: install what is missing, start PostgreSQL and the local fakes, migrate, seed,
// build, and serve the app with its worker. Ctrl-C stops everything it started.
import fs from "node:fs";
import path from "node:path";
import {
  ROOT, appEnv, bin, clusterDir, createDatabase, ensureDebianTools, ensureNpmPackages, log, portFree,
  runWith, spawnChild, startPostgres, stopChildren, stopPostgres, tsx, waitForPort,
} from "./lib/stack.mjs";

const appPort = Number(process.env.PORT ?? 3000);
const dbPort = Number(process.env.BENCHREEL_PG_PORT ?? 5544);
const smtpPort = Number(process.env.BENCHREEL_SMTP_PORT ?? 2525);
const meiliPort = Number(process.env.BENCHREEL_MEILI_PORT ?? 7701);
const dataDir = path.join(ROOT, ".data/dev");
const lockFile = path.join(dataDir, "start.lock");

function alive(pid) {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

fs.mkdirSync(dataDir, { recursive: true });
if (fs.existsSync(lockFile)) {
  const pid = Number(fs.readFileSync(lockFile, "utf8"));
  if (pid && alive(pid)) {
    console.error(`Benchreel is already running from this checkout (process ${pid}) on http://127.0.0.1:${appPort}.\nStop it with Ctrl-C in its terminal first.`);
    process.exit(1);
  }
}
for (const [port, what] of [[appPort, "app (PORT)"], [dbPort, "PostgreSQL"], [smtpPort, "fake SMTP"], [meiliPort, "fake search"]]) {
  if (!(await portFree(port))) {
    console.error(`Port ${port} for the ${what} is taken; is Benchreel (or something else) already running?`);
    process.exit(1);
  }
}
fs.writeFileSync(lockFile, String(process.pid));

const pgDir = clusterDir("dev");
let stopping = false;
async function shutdown(code = 0) {
  if (stopping) return;
  stopping = true;
  log("stopping…");
  await stopChildren();
  stopPostgres(pgDir);
  fs.rmSync(lockFile, { force: true });
  process.exit(code);
}
process.on("SIGINT", () => shutdown(0));
process.on("SIGTERM", () => shutdown(0));

try {
  ensureNpmPackages();
  ensureDebianTools({ postgres: true, ffmpeg: true });
  await startPostgres(pgDir, dbPort);
  createDatabase(dbPort, "benchreel");
  const env = { ...appEnv({ dbPort, dbName: "benchreel", appPort, smtpPort, meiliPort, dataDir, nodeEnv: "production" }), UPLOAD_DIR: process.env.UPLOAD_DIR ?? path.join(ROOT, "uploads") };

  if ((await runWith(bin("tsx"), ["scripts/migrate.ts"], env)) !== 0) throw new Error("migrations failed");
  if ((await runWith(bin("tsx"), ["scripts/seed.ts"], env)) !== 0) throw new Error("seeding failed");

  tsx("scripts/fakes/smtp/server.ts", ["--port", String(smtpPort), "--dir", env.MAIL_FAKE_DIR], env);
  if (fs.existsSync(path.join(ROOT, "scripts/fakes/meili/server.ts"))) {
    tsx("scripts/fakes/meili/server.ts", ["--port", String(meiliPort), "--data", path.join(dataDir, "meili"), "--key", env.MEILI_API_KEY], env);
  }
  await waitForPort(smtpPort, 30_000, "fake SMTP");

  log("building the app…");
  if ((await runWith(bin("react-router"), ["build"], env)) !== 0) throw new Error("build failed");

  spawnChild(process.execPath, ["server.js", "build/server/index.js"], env, "app");
  tsx("scripts/worker.ts", [], env);
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
`);
} catch (err) {
  console.error(`\n[benchreel] start failed: ${err.message}`);
  await shutdown(1);
}
