// `npm run reindex`: rebuild the search index from PostgreSQL. Uses the environment if set,
// else the local values `npm start` uses (run it while `npm start` is running).
import path from "node:path";
import { ROOT, appEnv, bin, runWith } from "./lib/stack.mjs";

const local = appEnv({
  dbPort: Number(process.env.BENCHREEL_PG_PORT ?? 5544),
  dbName: "benchreel",
  appPort: Number(process.env.PORT ?? 3000),
  smtpPort: Number(process.env.BENCHREEL_SMTP_PORT ?? 2525),
  meiliPort: Number(process.env.BENCHREEL_MEILI_PORT ?? 7701),
  dataDir: path.join(ROOT, ".data/dev"),
  nodeEnv: "production",
});
const env = Object.fromEntries(Object.entries(local).map(([k, v]) => [k, process.env[k] ?? v]));
process.exit(await runWith(bin("tsx"), ["scripts/reindex.ts"], env));
