import { Meilisearch } from "meilisearch";
import { env } from "~/lib/env.server";
import { synonymsSetting } from "./synonyms";

/** One index holds every kind of document; `kind` tells them apart and is a facet. */
export const INDEX_UID = process.env.SEARCH_INDEX ?? "benchreel";

export type SearchKind = "procedure" | "spec" | "mark" | "reading" | "recording" | "test_record";

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
  recordingTitle?: string;
  area?: string;
  /** Seconds into the recording, for marks and readings. */
  t?: number;
  date: number;
  /** Procedure revisions: plain text of each block, in order; a hit names its block. */
  blocks?: string[];
};

let client: Meilisearch | undefined;
export function searchClient(): Meilisearch {
  const host = env().MEILI_HOST;
  if (!host) throw new Error("MEILI_HOST is not set");
  client ??= new Meilisearch({ host, apiKey: env().MEILI_API_KEY, timeout: 5000 });
  return client;
}

export function searchIndex() {
  return searchClient().index<SearchDoc>(INDEX_UID);
}

export const SEARCH_SETTINGS = {
  searchableAttributes: ["title", "text", "tags", "blocks", "procedureTitle", "recordingTitle", "uploader"],
  filterableAttributes: ["kind", "visibility", "tags", "state", "uploader", "area", "group"],
  sortableAttributes: ["date"],
  // Block texts are searchable but never returned: they can be long, and the app finds the
  // matching block itself (app/lib/search/snippet.ts).
  displayedAttributes: ["id", "kind", "title", "text", "tags", "visibility", "url", "state", "uploader", "procedureTitle", "recordingTitle", "area", "t", "date", "group"],
  synonyms: synonymsSetting(),
};

/** Creates the index (if missing) and applies the settings; waits for both tasks. */
export async function ensureIndex(): Promise<void> {
  const c = searchClient();
  try {
    await c.getIndex(INDEX_UID);
  } catch {
    const created = await c.createIndex(INDEX_UID, { primaryKey: "id" }).waitTask();
    if (created.status === "failed" && created.error?.code !== "index_already_exists") {
      throw new Error(`search index could not be created: ${created.error?.message}`);
    }
  }
  const task = await searchIndex().updateSettings(SEARCH_SETTINGS).waitTask();
  if (task.status !== "succeeded") throw new Error(`search settings failed: ${task.error?.message ?? task.status}`);
}
