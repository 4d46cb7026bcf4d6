// `npm run reindex`: rebuilds the search index from PostgreSQL (full and idempotent).
import { pool } from "../app/lib/db.server";
import { reindexAll } from "../app/lib/search/indexer.server";

const started = Date.now();
try {
  const r = await reindexAll();
  console.log(`[reindex] ${r.documents} documents written, ${r.removed} stale removed in ${((Date.now() - started) / 1000).toFixed(1)} s`);
} finally {
  await pool().end();
}
