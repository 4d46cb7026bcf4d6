import { and, gt, inArray, isNull, lte, sql } from "drizzle-orm";
import { searchOutbox } from "~/db/schema";
import { db, pool } from "~/lib/db.server";
import { env } from "~/lib/env.server";
import {
  ensureIndex,
  SEARCH_SETTINGS,
  searchClient,
  searchErrorCode,
  searchErrorMessage,
  searchIndex,
  searchServiceAway,
  type SearchDoc,
} from "./client.server";
import {
  allDocuments,
  buildChange,
  failureReason,
  isPassingFailure,
  recordsOf,
  type IndexChange,
  type Unindexable,
} from "./documents.server";
import { clearSetAside, setAside, setAsideCount } from "./set-aside.server";
import { currentSynonyms } from "./words.server";

const LOCK_KEY = 74_210_001; // one drainer at a time across workers

let indexReady = false;
/** Set when this process found the index lost; cleared by a full rebuild that succeeded. */
let rebuildOwed = false;

async function check(task: { status: string; error?: { message?: string } | null }, what: string) {
  if (task.status !== "succeeded") throw new Error(`${what}: ${task.error?.message ?? task.status}`);
}

/** Sends changes to the search service; resolves only after every task succeeded. */
export async function applyChanges(upserts: SearchDoc[], deleteIds: string[], deleteGroups: string[]) {
  const index = searchIndex();
  if (deleteGroups.length) {
    for (let i = 0; i < deleteGroups.length; i += 100) {
      const list = deleteGroups
        .slice(i, i + 100)
        .map((g) => JSON.stringify(g))
        .join(", ");
      await check(await index.deleteDocuments({ filter: `group IN [${list}]` }).waitTask(), "delete by group");
    }
  }
  if (deleteIds.length) await check(await index.deleteDocuments(deleteIds).waitTask(), "delete");
  for (let i = 0; i < upserts.length; i += 1000) {
    await check(await index.addDocuments(upserts.slice(i, i + 1000), { primaryKey: "id" }).waitTask(), "add documents");
  }
}

/** The longest wait between two tries of a failing batch. */
export const MAX_RETRY_MS = 60_000;
/** How often the service's /health is asked while it is away. */
export const HEALTH_PROBE_MS = 1_000;

export function retryDelayMs(attempts: number, baseMs = env().SEARCH_RETRY_BASE_MS): number {
  return Math.min(baseMs * 2 ** Math.max(0, attempts - 1), MAX_RETRY_MS);
}

/**
 * Whether the last batch failed because the service was away. A worker that starts does not
 * know (the rows may carry a long back-off from before), and asking costs one request.
 */
let serviceAway = true;
let lastProbe = 0;

/**
 * While the service is away, asks its /health (every HEALTH_PROBE_MS at most); the moment it
 * answers, every pending row is due at once. The back-off only spares a service that answers
 * with errors; how long an outage lasted must not delay the changes made during it.
 */
async function probeWhileAway() {
  if (!serviceAway || Date.now() - lastProbe < HEALTH_PROBE_MS) return;
  lastProbe = Date.now();
  const back = await searchClient()
    .health()
    .then(
      (h) => h.status === "available",
      () => false,
    );
  if (!back) return;
  serviceAway = false;
  await db()
    .update(searchOutbox)
    .set({ nextAttemptAt: sql`now()` })
    .where(and(isNull(searchOutbox.doneAt), gt(searchOutbox.nextAttemptAt, sql`now()`)));
}

const keyOf = (r: { kind: string; entityId: string }) => `${r.kind}:${r.entityId}`;

/**
 * Drains due outbox rows: builds each changed record's documents from the database as it
 * is now (so replays are harmless), sends them, and marks the rows done only after the
 * service's tasks succeeded. A record whose documents cannot be built is set aside with the
 * reason (search_set_aside) and the rest of the batch goes on; it is tried again when it
 * changes, or when an admin asks. On any other failure the rows stay pending with a later
 * next attempt; when the service was away, they go as soon as it answers again.
 */
export async function drainSearchOutbox(limit = 500): Promise<{ done: number; failed: number; setAside: number }> {
  await probeWhileAway();
  const client = await pool().connect();
  try {
    const { rows } = await client.query<{ locked: boolean }>("select pg_try_advisory_lock($1) as locked", [LOCK_KEY]);
    if (!rows[0]?.locked) return { done: 0, failed: 0, setAside: 0 };
    try {
      const pending = await db()
        .select()
        .from(searchOutbox)
        .where(and(isNull(searchOutbox.doneAt), lte(searchOutbox.nextAttemptAt, sql`now()`)))
        .orderBy(searchOutbox.id)
        .limit(limit);
      if (!pending.length) return { done: 0, failed: 0, setAside: 0 };
      const ids = pending.map((p) => p.id);
      try {
        if (!indexReady) {
          // An index made anew here means the service lost the old one: only these changes
          // would reach it, so the index check owes a full rebuild.
          if ((await ensureIndex()).created) rebuildOwed = true;
          indexReady = true;
        }
        const seen = new Set<string>();
        const upserts = new Map<string, SearchDoc>();
        const deleteIds = new Set<string>();
        const deleteGroups = new Set<string>();
        const unindexable = new Map<string, Unindexable>();
        const indexed = new Map<string, { kind: string; entityId: string }>();
        let words = false;
        for (const row of pending) {
          const key = keyOf(row);
          if (seen.has(key)) continue;
          seen.add(key);
          if (row.kind === "search_words") {
            words = true;
            continue;
          }
          let change: IndexChange;
          try {
            change = await buildChange(row.kind, row.entityId);
          } catch (err) {
            if (isPassingFailure(err)) throw err;
            unindexable.set(key, { kind: row.kind, entityId: row.entityId, reason: failureReason(err) });
            continue;
          }
          change.deleteGroups.forEach((g) => deleteGroups.add(g));
          change.deleteIds.forEach((d) => deleteIds.add(d));
          for (const d of change.upserts) {
            upserts.set(d.id, d);
            for (const rec of recordsOf(d)) indexed.set(keyOf(rec), rec);
          }
          for (const u of change.unindexable) unindexable.set(keyOf(u), u);
          indexed.set(key, row);
        }
        for (const id of upserts.keys()) deleteIds.delete(id);
        for (const key of unindexable.keys()) indexed.delete(key);
        await applyChanges([...upserts.values()], [...deleteIds], [...deleteGroups]);
        // The search words as they are now, the whole list (a replay sends the same).
        if (words)
          await check(
            await searchIndex()
              .updateSynonyms(await currentSynonyms())
              .waitTask(),
            "synonyms",
          );
        await db().transaction(async (tx) => {
          await tx.update(searchOutbox).set({ doneAt: new Date(), lastError: null }).where(inArray(searchOutbox.id, ids));
          await clearSetAside(tx, [...indexed.values()]);
          await setAside(tx, [...unindexable.values()]);
        });
        serviceAway = false;
        for (const u of unindexable.values())
          console.error(`[search] set aside ${u.kind} ${u.entityId}, it could not be indexed: ${u.reason}`);
        return { done: ids.length, failed: 0, setAside: unindexable.size };
      } catch (err) {
        indexReady = false;
        serviceAway = searchServiceAway(err);
        const message = searchErrorMessage(err).slice(0, 500);
        await db()
          .update(searchOutbox)
          .set({
            attempts: sql`${searchOutbox.attempts} + 1`,
            lastError: message,
            nextAttemptAt: new Date(Date.now() + retryDelayMs((pending[0]?.attempts ?? 0) + 1)),
          })
          .where(inArray(searchOutbox.id, ids));
        return { done: 0, failed: ids.length, setAside: 0 };
      }
    } finally {
      await client.query("select pg_advisory_unlock($1)", [LOCK_KEY]);
    }
  } finally {
    client.release();
  }
}

/**
 * How far the index is behind: rows not yet indexed, how many of them already failed once,
 * the last error, and the records set aside (docs/decisions/005).
 */
export async function searchBacklog(): Promise<{ pending: number; failing: number; lastError: string | null; setAside: number }> {
  const [r] = await db()
    .select({
      pending: sql<number>`count(*)::int`,
      failing: sql<number>`(count(*) filter (where ${searchOutbox.attempts} > 0))::int`,
      lastError: sql<string | null>`max(${searchOutbox.lastError})`,
    })
    .from(searchOutbox)
    .where(isNull(searchOutbox.doneAt));
  return { pending: r?.pending ?? 0, failing: r?.failing ?? 0, lastError: r?.lastError ?? null, setAside: await setAsideCount() };
}

/**
 * Full rebuild from PostgreSQL (idempotent): every document is written again and documents
 * of records that no longer exist are removed. Outbox rows older than the rebuild are done.
 * Holds the search lock, so the drainer and other rebuilds wait (`npm run reindex` too).
 */
export function reindexAll(): Promise<{ documents: number; removed: number }> {
  return withSearchLock(rebuild);
}

async function rebuild(): Promise<{ documents: number; removed: number }> {
  const startedAt = new Date();
  await ensureIndex();
  indexReady = true;
  const { docs, unindexable } = await allDocuments();
  const keep = new Set(docs.map((d) => d.id));
  const index = searchIndex();
  await applyChanges(docs, [], []);
  // Remove what is in the index but no longer in the database.
  const stale: string[] = [];
  for (let offset = 0; ; offset += 1000) {
    const page = await index.getDocuments({ fields: ["id"], limit: 1000, offset });
    for (const d of page.results) if (!keep.has(String(d.id))) stale.push(String(d.id));
    if (page.results.length < 1000) break;
  }
  if (stale.length) await check(await index.deleteDocuments(stale).waitTask(), "delete stale");
  await db().transaction(async (tx) => {
    await tx
      .update(searchOutbox)
      .set({ doneAt: new Date() })
      .where(and(isNull(searchOutbox.doneAt), lte(searchOutbox.createdAt, startedAt)));
    await clearSetAside(tx, docs.flatMap(recordsOf));
    await setAside(tx, unindexable);
  });
  rebuildOwed = false;
  return { documents: docs.length, removed: stale.length };
}

/**
 * Runs `fn` holding the lock the drainer takes (a PostgreSQL advisory lock, across processes).
 * Waits for it up to `waitMs` (a drain takes milliseconds, a rebuild seconds), then fails.
 */
export async function withSearchLock<T>(fn: () => Promise<T>, waitMs = 120_000): Promise<T> {
  const client = await pool().connect();
  try {
    const until = Date.now() + waitMs;
    for (;;) {
      const { rows } = await client.query<{ locked: boolean }>("select pg_try_advisory_lock($1) as locked", [LOCK_KEY]);
      if (rows[0]?.locked) break;
      if (Date.now() > until) throw new Error(`the search index stayed busy for ${Math.round(waitMs / 1000)} s (another rebuild?)`);
      await new Promise((r) => setTimeout(r, 100));
    }
    try {
      return await fn();
    } finally {
      await client.query("select pg_advisory_unlock($1)", [LOCK_KEY]);
    }
  } finally {
    client.release();
  }
}

let lastUnreachable: string | null = null;

const sameList = (a: readonly string[] | null | undefined, b: readonly string[], ordered: boolean) =>
  !!a && a.length === b.length && (ordered ? a.every((x, i) => x === b[i]) : b.every((x) => a.includes(x)));

/**
 * The worker's check that the search service still holds the shop's index (every
 * SEARCH_CHECK_MS). The outbox sends only changes, so a service replaced or reset while
 * nothing changed would otherwise stay empty until someone ran `npm run reindex`. The index
 * is rebuilt in full from PostgreSQL when it is missing, when its settings are not ours (the
 * service makes an index with its defaults when documents arrive for one it does not have),
 * when the drainer had to create it after an outage, or when an earlier rebuild failed. A
 * service that does not answer is left to the outbox's retries (said once in the log).
 */
export async function repairIndex(): Promise<"ok" | "rebuilt" | "unreachable"> {
  let lost: string | null = rebuildOwed ? "the index was made anew, or a rebuild had failed" : null;
  try {
    const settings = await searchIndex().getSettings();
    const ours =
      sameList(settings.searchableAttributes as string[] | null | undefined, SEARCH_SETTINGS.searchableAttributes, true) &&
      sameList(settings.filterableAttributes as string[] | null | undefined, SEARCH_SETTINGS.filterableAttributes, false) &&
      sameList(settings.rankingRules as string[] | null | undefined, SEARCH_SETTINGS.rankingRules, true);
    if (!ours) lost ??= "its settings are not the app's";
  } catch (err) {
    if (searchErrorCode(err) !== "index_not_found") {
      const why = searchErrorMessage(err);
      if (why !== lastUnreachable) console.error(`[search] index check: the search service is not answering (${why})`);
      lastUnreachable = why;
      return "unreachable";
    }
    lost = "it has no index";
  }
  lastUnreachable = null;
  if (!lost) return "ok";
  rebuildOwed = true; // until a rebuild succeeds
  try {
    const { documents } = await reindexAll();
    console.log(`[search] rebuilt the index (${documents} documents): ${lost}`);
    return "rebuilt";
  } catch (err) {
    throw new Error(`rebuilding the lost index failed, tried again at the next check: ${searchErrorMessage(err)}`);
  }
}
