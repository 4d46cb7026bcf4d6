import { Meilisearch, MeilisearchApiError, MeilisearchRequestError } from "meilisearch";
import { env } from "~/lib/env.server";
import { currentSynonyms } from "./words.server";

/** One index holds every kind of document; `kind` tells them apart and is a facet. */
export const indexUid = () => env().SEARCH_INDEX;

export type SearchKind = "procedure" | "spec" | "mark" | "reading" | "recording" | "test_record" | "caption" | "build";

export type SearchDoc = {
  id: string;
  kind: SearchKind;
  title: string;
  text: string;
  tags: string[];
  /** Who may see it: "all", "role:<role>", "user:<id>". Filtered in the query, never in the UI. */
  visibility: string[];
  url: string;
  /** Procedure state for revision and spec documents. */
  state?: string;
  uploader?: string;
  procedureTitle?: string;
  /** A spec's procedure's tags: filtered on with `tags`, never searched. */
  procedureTags?: string[];
  recordingTitle?: string;
  area?: string;
  /** Seconds into the recording, for marks and readings. */
  t?: number;
  date: number;
  /** Procedure revisions: the plain text of their blocks, one block per line, in order. */
  body?: string;
  /** Ranks kinds for the same words: procedures and specs above single observations (KIND_WEIGHT). */
  kindWeight: number;
  /** A recording's readings (one document per recording): one line per reading, with its id and second. */
  readings?: string[];
  readingIds?: string[];
  readingTimes?: (number | null)[];
  /** A caption line's neighbours and recording, shown around the hit, never searched (one document per line). */
  before?: string;
  after?: string;
  inRecording?: string;
};

/**
 * The `kindWeight` of each kind. The ranking rule `kindWeight:desc` comes right after `words`
 * and `typo`: among documents that hold the same query words as well, a procedure or one of
 * its specs comes before a recording, a mark or the readings of a recording.
 */
export const KIND_WEIGHT: Record<SearchKind, number> = {
  procedure: 5,
  spec: 5,
  // A build by its number, customer, serial or engine comes before the records filed for it.
  build: 4,
  test_record: 3,
  recording: 3,
  mark: 2,
  reading: 1,
  caption: 1,
};

/** How long one call to the search service may take before it fails (ms). */
const SEARCH_TIMEOUT_MS = 5_000;

/** The service's own error behind an SDK error, if it sent one. */
function serviceError(err: unknown): MeilisearchApiError | undefined {
  for (let e: unknown = err, depth = 0; e && depth < 4; e = (e as { cause?: unknown }).cause, depth++) {
    if (e instanceof MeilisearchApiError) return e;
  }
  return undefined;
}

/** The service's error code (`index_not_found`…), if it sent one. */
export function searchErrorCode(err: unknown): string | undefined {
  return (serviceError(err)?.cause as { code?: string } | undefined)?.code;
}

/**
 * Whether a call failed because the service is away: the request itself failed (refused,
 * reset, timed out; the SDK says so with a MeilisearchRequestError), or a gateway answered 5xx
 * for it. Then the outbox waits for the service and asks its /health until it answers
 * (`drainSearchOutbox`). A task the service ran and failed, or an error it answered, is not that.
 */
export function searchServiceAway(err: unknown): boolean {
  const e = serviceError(err);
  if (e) return e.response.status >= 500;
  for (let x: unknown = err, depth = 0; x && depth < 4; x = (x as { cause?: unknown }).cause, depth++) {
    if (x instanceof MeilisearchRequestError) return true;
  }
  return false;
}

/** The message of a search-service error, from the service's own error object when there is one. */
export function searchErrorMessage(err: unknown): string {
  const e = serviceError(err);
  if (e) {
    const code = searchErrorCode(e);
    return code ? `${e.message} (${code})` : e.message;
  }
  return err instanceof Error ? err.message : String(err);
}

let client: Meilisearch | undefined;
export function searchClient(): Meilisearch {
  const host = env().MEILI_HOST;
  if (!host) throw new Error("MEILI_HOST is not set");
  // The SDK's own transport (fetch, whose connections are kept alive); a call that takes longer
  // than the limit fails with a request error, which the outbox treats as the service away.
  client ??= new Meilisearch({ host, apiKey: env().MEILI_API_KEY, timeout: SEARCH_TIMEOUT_MS });
  return client;
}

export function searchIndex() {
  return searchClient().index<SearchDoc>(indexUid());
}

export const SEARCH_SETTINGS = {
  searchableAttributes: ["title", "text", "tags", "body", "readings", "procedureTitle", "recordingTitle", "uploader"],
  // Meilisearch's rules, with the custom rule `kindWeight:desc` after words and typo (KIND_WEIGHT).
  rankingRules: ["words", "typo", "kindWeight:desc", "proximity", "attribute", "sort", "exactness"],
  // The trade's short words (moly, stud, bore, lash, ring) take one typo from 4 letters, not 5.
  typoTolerance: { minWordSizeForTypos: { oneTypo: 4, twoTypos: 9 } },
  filterableAttributes: ["kind", "visibility", "tags", "procedureTags", "state", "uploader", "area", "group"],
  sortableAttributes: ["date"],
  // `body` (a procedure's blocks) is displayed so that the service can crop and highlight it;
  // searches ask for its crop only, never the whole text (RETURNED in query.server.ts).
  displayedAttributes: [
    "id",
    "kind",
    "title",
    "text",
    "body",
    "tags",
    "visibility",
    "url",
    "state",
    "uploader",
    "procedureTitle",
    "recordingTitle",
    "area",
    "t",
    "date",
    "group",
    "readings",
    "readingIds",
    "readingTimes",
    "before",
    "after",
    "inRecording",
  ],
};

/**
 * Creates the index (if missing) and applies the settings with the shop's search words as its
 * synonyms (app/lib/search/words.server.ts); waits for both tasks. Resolves to whether it had
 * to create the index (then whatever it held before is gone: see repairIndex).
 */
export async function ensureIndex(): Promise<{ created: boolean }> {
  const c = searchClient();
  let created = false;
  try {
    await c.getIndex(indexUid());
  } catch {
    const task = await c.createIndex(indexUid(), { primaryKey: "id" }).waitTask();
    if (task.status === "failed" && task.error?.code !== "index_already_exists") {
      throw new Error(`search index could not be created: ${task.error?.message}`);
    }
    created = task.status === "succeeded";
  }
  const task = await searchIndex()
    .updateSettings({ ...SEARCH_SETTINGS, synonyms: await currentSynonyms() })
    .waitTask();
  if (task.status !== "succeeded") throw new Error(`search settings failed: ${task.error?.message ?? task.status}`);
  return { created };
}
