// `npm run bench`: runs the benchmarks against the stack `scripts/test.mjs --only bench`
// started (its own throw-away database and ports). Not a test: it reports numbers, as
// medians and ratios, and whether each target was met. `npm run bench -- search` runs one.
import fs from "node:fs";
import path from "node:path";
import { pool } from "../../app/lib/db.server";

type Bench = { name: string; run: () => Promise<unknown> };

const benches: Bench[] = [
  {
    // BENCH_UPLOAD_SIZE (default 1G; the memory target is stated for 2G) sets the upload size.
    name: "recordings",
    run: async () => {
      const r = await import("./recordings");
      const size = process.env.BENCH_UPLOAD_SIZE ?? "1G";
      const m = /^(\d+(?:\.\d+)?)([KMG]?)$/i.exec(size);
      if (!m) throw new Error(`BENCH_UPLOAD_SIZE=${size}: use e.g. 512M, 1G, 2G`);
      const sizeBytes = Math.round(Number(m[1]) * 1024 ** ({ "": 0, K: 1, M: 2, G: 3 } as Record<string, number>)[m[2].toUpperCase()]);
      return r.benchRecordings({
        baseUrl: process.env.BENCHREEL_URL!,
        cookie: await r.benchSession(),
        uploadDir: process.env.UPLOAD_DIR!,
        sizeBytes,
      });
    },
  },
  { name: "search", run: async () => (await import("./search")).benchSearch() },
  { name: "storage", run: async () => (await import("./storage")).benchStorage() },
  { name: "procedures", run: async () => (await import("./procedures")).benchProcedures() },
  { name: "search-fake", run: async () => (await import("../fakes/meili/bench")).runMeiliBench({ docs: 20_000, log: console.log }) },
];

const wanted = process.argv.slice(2);
const results: Record<string, unknown> = {};
let failed = 0;
for (const b of benches) {
  if (wanted.length && !wanted.includes(b.name)) continue;
  console.log(`\n=== ${b.name} ===`);
  try {
    results[b.name] = await b.run();
    console.log(JSON.stringify(results[b.name], null, 2));
  } catch (err) {
    failed++;
    console.error(`${b.name} failed:`, (err as Error).stack ?? err);
  }
}
const out = path.join(process.env.BENCHREEL_RUN_DIR ?? ".", "..", "..", "bench-results.json");
fs.writeFileSync(out, JSON.stringify({ at: new Date().toISOString(), results }, null, 2));
console.log(`\nresults written to ${path.resolve(out)}`);
await pool().end();
process.exit(failed ? 1 : 0);
