// Seeds the invented demo scenario of PRODUCT.md. Idempotent: each part checks what is
// already there, so a second run adds nothing twice.
import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "../app/db/schema";
import { seedUsers } from "./seed/users";
import { seedProcedures } from "./seed/procedures";
import { seedRecordings } from "./seed/recordings";
import { seedCaptions } from "./seed/captions";
import { seedTestRecords } from "./seed/test-records";
import { seedBuilds } from "./seed/builds";
import { seedRuns } from "./seed/runs";

const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL });
const db = drizzle(pool, { schema });
try {
  const n = await seedUsers(db);
  console.log(`[seed] demo people: ${n ? `${n} added` : "already there"}`);
  const r = await seedRecordings(db);
  console.log(`[seed] demo recordings: ${r ? `${r} added` : "already there"}`);
  const c = await seedCaptions(db);
  console.log(`[seed] demo captions: ${c ? `${c} recordings added` : "already there"}`);
  const pr = await seedProcedures(db);
  console.log(`[seed] demo procedures: ${pr ? `${pr} added` : "already there"}`);
  const tr = await seedTestRecords(db);
  console.log(`[seed] demo test records: ${tr === "skipped" ? "skipped (no demo procedures)" : tr ? `${tr} added` : "already there"}`);
  const b = await seedBuilds(db);
  console.log(`[seed] demo builds: ${b ? `${b} added` : "already there"}`);
  const ru = await seedRuns(db);
  console.log(
    `[seed] demo runs: ${ru === "skipped" ? "skipped (no demo procedure or build on the bench)" : ru ? `${ru} added` : "already there"}`,
  );
} finally {
  await pool.end();
}
