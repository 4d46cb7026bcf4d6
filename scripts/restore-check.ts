// Proves a backup restores (docs/deploying.md, "Backups and restore"): dumps the database named
// by DATABASE_URL with pg_dump, restores the dump into a new database with pg_restore, compares
// every table's row count, and checks that each recording the restored database names has its
// original in the store it says (the folder or STORAGE_URL's bucket) with the size the row
// expects, and each run photo it names its object with the row's size. Prints a JSON summary;
// exits 1 on any difference. The restored copy is dropped afterwards (`--keep` leaves it).
//
//   npm run restore:check
import { execFileSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import pg from "pg";
import { env } from "../app/lib/env.server";
import { storedPhoto } from "../app/lib/storage/photos.server";
import { configuredBackend, recordingKeys, storeOf } from "../app/lib/storage/recordings.server";

const keep = process.argv.includes("--keep");
const source = env().DATABASE_URL;

/** pg_dump / pg_restore of the newest PostgreSQL installed (Debian keeps them per version). */
function pgTool(name: string): string {
  const root = "/usr/lib/postgresql";
  const versions = fs.existsSync(root) ? fs.readdirSync(root).sort((a, b) => Number(b) - Number(a)) : [];
  for (const v of versions) if (fs.existsSync(path.join(root, v, "bin", name))) return path.join(root, v, "bin", name);
  return name;
}

const dumpFile = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "benchreel-restore-")), "benchreel.dump");
const restoredName = `${new URL(source).pathname.slice(1)}_restore_${randomBytes(3).toString("hex")}`;
const restoredUrl = new URL(source);
restoredUrl.pathname = `/${restoredName}`;

const admin = new pg.Client({ connectionString: source });
await admin.connect();
const problems: string[] = [];
const summary = { tables: 0, rows: 0, recordings: 0, objectsChecked: 0, photos: 0, problems };
try {
  execFileSync(pgTool("pg_dump"), ["--format=custom", `--file=${dumpFile}`, source], { stdio: ["ignore", "ignore", "inherit"] });
  await admin.query(`create database ${restoredName}`);
  execFileSync(pgTool("pg_restore"), ["--no-owner", "--exit-on-error", `--dbname=${restoredUrl}`, dumpFile], {
    stdio: ["ignore", "ignore", "inherit"],
  });
  const restored = new pg.Client({ connectionString: restoredUrl.toString() });
  await restored.connect();
  try {
    const { rows: tables } = await admin.query<{ schema: string; name: string }>(
      `select table_schema as schema, table_name as name from information_schema.tables
       where table_type = 'BASE TABLE' and table_schema in ('public', 'pgboss', 'drizzle') order by 1, 2`,
    );
    for (const t of tables) {
      const q = `select count(*)::bigint as n from "${t.schema}"."${t.name}"`;
      // The source is live: rows written between the dump and this count are not a fault of the restore.
      const [a, b] = await Promise.all([admin.query<{ n: string }>(q), restored.query<{ n: string }>(q)]);
      summary.tables++;
      summary.rows += Number(b.rows[0].n);
      if (t.schema === "public" && Number(b.rows[0].n) > Number(a.rows[0].n))
        problems.push(`${t.name}: restored ${b.rows[0].n} rows, source ${a.rows[0].n}`);
      if (t.schema === "public" && Number(b.rows[0].n) === 0 && Number(a.rows[0].n) > 0) problems.push(`${t.name}: restored empty`);
    }
    const { rows: recs } = await restored.query<{ id: string; original_size: number; backend: string | null; original_key: string | null }>(
      `select r.id, r.original_size, s.backend, s.original_key from recordings r
       left join recording_storage s on s.recording_id = r.id where r.has_original`,
    );
    for (const r of recs) {
      summary.recordings++;
      const backend = r.backend === "s3" ? "s3" : "folder";
      if (backend === "s3" && configuredBackend() !== "s3") {
        problems.push(`${r.id}: kept in object storage, but STORAGE_URL is not set here`);
        continue;
      }
      const key = r.original_key ?? recordingKeys(r.id).original;
      const head = await storeOf(backend).head(key);
      summary.objectsChecked++;
      if (!head) problems.push(`${r.id}: original ${key} is missing from the ${backend}`);
      else if (head.size !== Number(r.original_size))
        problems.push(`${r.id}: original is ${head.size} bytes, the row says ${r.original_size}`);
    }
    const { rows: photos } = await restored.query<{ id: string; run_id: string; bytes: string }>(
      "select id, run_id, bytes from run_photos order by created_at",
    );
    for (const p of photos) {
      summary.photos++;
      const stored = await storedPhoto(p.run_id, p.id);
      if (!stored) problems.push(`photo ${p.id} of run ${p.run_id} is missing from the store`);
      else if (stored.size !== Number(p.bytes)) problems.push(`photo ${p.id}: ${stored.size} bytes, the row says ${p.bytes}`);
    }
  } finally {
    await restored.end();
  }
} finally {
  if (!keep) await admin.query(`drop database if exists ${restoredName}`).catch(() => {});
  await admin.end();
  fs.rmSync(path.dirname(dumpFile), { recursive: true, force: true });
}
console.log(JSON.stringify({ ...summary, restoredDatabase: keep ? restoredName : null }));
process.exit(problems.length ? 1 : 0);
