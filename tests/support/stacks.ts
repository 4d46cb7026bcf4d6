// Extra app instances and workers for the storage and instances suites: started from the test
// run's build on a database of their own (in the run's PostgreSQL cluster, migrated here), so
// their recordings, jobs and search index never mix with the shared app's. Each gets its own
// port and local folder; what they share is what a shop's several machines would share: the
// database and, with `storageUrl`, the object store.
import { type ChildProcess, execFileSync, spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";
import pg from "pg";
import { hashPassword } from "~/lib/auth.server";

const ROOT = fileURLToPath(new URL("../..", import.meta.url));
const runDir = process.env.BENCHREEL_RUN_DIR ?? fs.mkdtempSync("/tmp/br-stack-");

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

async function waitForPort(port: number, ms = 60_000): Promise<void> {
  const deadline = Date.now() + ms;
  while (Date.now() < deadline) {
    const ok = await new Promise<boolean>((resolve) => {
      const c = net.connect(port, "127.0.0.1", () => {
        c.end();
        resolve(true);
      });
      c.once("error", () => resolve(false));
    });
    if (ok) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`nothing listens on ${port}`);
}

export type Stack = {
  name: string;
  /** Each app instance's own address; PUBLIC_URL of all of them is the first's, as behind one proxy. */
  apps: string[];
  publicUrl: string;
  databaseUrl: string;
  sql: pg.Pool;
  workerLogs: string[];
  /** The node process of worker i (not tsx's wrapper), as `kill -9` would find it. */
  workerPid(i: number): number;
  stop(): Promise<void>;
};

/** The S3 stand-in started by `npm test` (scripts/fakes/s3), with another bucket. */
export function fakeStoreUrl(bucket = "benchreel"): string {
  const url = process.env.S3_FAKE_URL;
  if (!url) throw new Error("S3_FAKE_URL is not set: run through `npm test`");
  return url.replace(/\/[^/]+$/, `/${bucket}`);
}

/**
 * Starts the instances and workers. With object storage each has a local folder of its own (to
 * show nothing is shared on disk); without, they share one, as on one machine. `databaseUrl`
 * and `uploadDir` start a stack on another's database and folder (after it stopped).
 */
export async function startStack(opts: {
  name: string;
  apps: number;
  workers: number;
  storageUrl?: string;
  databaseUrl?: string;
  uploadDir?: string;
}): Promise<Stack & { uploadDir: string }> {
  const main = process.env.DATABASE_URL;
  const build = process.env.BENCHREEL_BUILD_DIR;
  if (!main || !build) throw new Error("run through `npm test`");
  const dbName = opts.databaseUrl
    ? new URL(opts.databaseUrl).pathname.slice(1)
    : `benchreel_${opts.name}_${randomBytes(3).toString("hex")}`;
  if (!opts.databaseUrl) {
    const admin = new pg.Client({ connectionString: main });
    await admin.connect();
    await admin.query(`create database ${dbName}`);
    await admin.end();
  }
  const dbUrl = new URL(main);
  dbUrl.pathname = `/${dbName}`;
  const databaseUrl = dbUrl.toString();
  const dir = path.join(runDir, `stack-${opts.name}-${randomBytes(3).toString("hex")}`);
  fs.mkdirSync(dir, { recursive: true });
  const uploadDir = opts.uploadDir ?? path.join(dir, "uploads");
  const folderOf = (who: string) => (opts.storageUrl ? path.join(dir, who) : uploadDir);
  const ports = await Promise.all(Array.from({ length: opts.apps }, freePort));
  const publicUrl = `http://127.0.0.1:${ports[0]}`;
  const base: NodeJS.ProcessEnv = {
    ...process.env,
    DATABASE_URL: databaseUrl,
    PUBLIC_URL: publicUrl,
    SEARCH_INDEX: dbName,
    STORAGE_URL: opts.storageUrl ?? "",
  };
  if (!opts.storageUrl) delete base.STORAGE_URL;
  if (!opts.databaseUrl)
    execFileSync(path.join(ROOT, "node_modules/.bin/tsx"), ["scripts/migrate.ts"], { cwd: ROOT, env: base, stdio: "ignore" });
  const children: ChildProcess[] = [];
  const start = (cmd: string, args: string[], env: NodeJS.ProcessEnv, log: string) => {
    const out = fs.openSync(log, "a");
    const child = spawn(cmd, args, { cwd: ROOT, env, stdio: ["ignore", out, out], detached: true });
    children.push(child);
    return child;
  };
  ports.forEach((port, i) =>
    start(
      process.execPath,
      ["server.js", path.join(build, "server/index.js")],
      { ...base, PORT: String(port), UPLOAD_DIR: folderOf(`app-${i}`) },
      path.join(dir, `app-${i}.log`),
    ),
  );
  const workerLogs = Array.from({ length: opts.workers }, (_, i) => path.join(dir, `worker-${i}.log`));
  const workers = workerLogs.map((log, i) =>
    start(path.join(ROOT, "node_modules/.bin/tsx"), ["scripts/worker.ts"], { ...base, UPLOAD_DIR: folderOf(`worker-${i}`) }, log),
  );
  await Promise.all(ports.map((p) => waitForPort(p)));
  const sql = new pg.Pool({ connectionString: databaseUrl, max: 3 });
  return {
    name: dbName,
    uploadDir,
    apps: ports.map((p) => `http://127.0.0.1:${p}`),
    publicUrl,
    databaseUrl,
    sql,
    workerLogs,
    workerPid(i) {
      const pid = workers[i].pid;
      const kids = fs.readFileSync(`/proc/${pid}/task/${pid}/children`, "utf8").trim().split(/\s+/).filter(Boolean).map(Number);
      if (kids.length !== 1) throw new Error(`worker ${i}: expected one node process under tsx, found ${kids.length}`);
      return kids[0];
    },
    async stop() {
      await sql.end();
      for (const c of children) {
        try {
          if (c.pid) process.kill(-c.pid, "SIGKILL");
        } catch {
          /* already gone */
        }
      }
    },
  };
}

/** A person in the stack's database; signing in (through any instance) is the test's part. */
export async function addPerson(stack: Stack, role: string, password = "test-password-123"): Promise<{ email: string; password: string }> {
  const email = `${role}-${randomBytes(4).toString("hex")}@test.larkspur.example`;
  await stack.sql.query("insert into users (id, email, name, role, password_hash) values ($1, $2, $3, $4, $5)", [
    randomBytes(8).toString("hex"),
    email,
    `Test ${role}`,
    role,
    await hashPassword(password),
  ]);
  return { email, password };
}
