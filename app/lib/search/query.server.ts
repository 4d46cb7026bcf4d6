import { and, isNull, lt, sql } from "drizzle-orm";
import { z } from "zod";
import { searchOutbox } from "~/db/schema";
import { blockTexts, type JSONNode } from "~/lib/procedures/document";
import type { SessionUser } from "~/lib/auth.server";
import { db, pool } from "~/lib/db.server";
import { can } from "~/lib/permissions";
import { searchIndex, type SearchKind } from "./client.server";

import { HL_POST, HL_PRE } from "./highlight";
import { markSnippet, pickBlock, queryTerms } from "./snippet";

export const KINDS: SearchKind[] = ["procedure", "spec", "mark", "reading", "recording", "test_record"];

export const searchParamsSchema = z.object({
  q: z.string().trim().max(200, "Keep the query under 200 characters.").default(""),
  type: z.enum(KINDS as [SearchKind, ...SearchKind[]]).optional(),
  tag: z.string().trim().max(60).optional(),
  state: z.enum(["published", "draft", "in_review"]).optional(),
  uploader: z.string().trim().max(80).optional(),
  page: z.coerce.number().int().min(1).max(100).default(1),
  limit: z.coerce.number().int().min(1).max(50).default(20),
});
export type SearchParams = z.infer<typeof searchParamsSchema>;

export type SearchHit = {
  id: string;
  kind: SearchKind;
  title: string;
  snippet: string;
  url: string;
  tags: string[];
  state?: string;
  t?: number;
  context?: string;
};

export type SearchResponse = {
  query: string;
  hits: SearchHit[];
  total: number;
  page: number;
  pages: number;
  facets: Record<string, Record<string, number>>;
  processingTimeMs: number;
};

/** Meilisearch filter strings quote values with double quotes; escape what the value holds. */
export function quote(v: string): string {
  return `"${v.replace(/\\/g, "\\\\").replace(/"/g, '\\"')}"`;
}

/** Who the person is, as the visibility values of the documents they may see. */
export function visibilityFor(user: SessionUser): string[] {
  const v = ["all", `user:${user.id}`];
  if (can(user.role, "procedure:view-drafts:any")) v.push(`role:${user.role}`);
  return v;
}

export function buildFilter(user: SessionUser, p: SearchParams): string[] {
  const filter = [`visibility IN [${visibilityFor(user).map(quote).join(", ")}]`];
  if (p.type) filter.push(`kind = ${quote(p.type)}`);
  if (p.tag) filter.push(`tags = ${quote(p.tag)}`);
  if (p.state) filter.push(`state = ${quote(p.state)}`);
  if (p.uploader) filter.push(`uploader = ${quote(p.uploader)}`);
  return filter;
}

/**
 * A text fragment (the WICG "scroll to text" URL fragment) that makes the browser scroll to
 * and mark the block that matched; the block's first words, without our text prefixes.
 */
export function blockFragment(block: string): string {
  const words = block
    .replaceAll(HL_PRE, "")
    .replaceAll(HL_POST, "")
    .replace(/^…\s*/, "")
    .replace(/\s*…$/, "")
    .replace(/^(#+ |• |Caution: |Spec: |Calculator: |Video moment at [^:]+: )/, "")
    .split(/\s+/)
    .filter(Boolean)
    .slice(0, 6)
    .join(" ");
  return words ? `#:~:text=${encodeURIComponent(words).replace(/-/g, "%2D")}` : "";
}

/**
 * Plain text per block of the given revisions, from PostgreSQL (the source of truth), kept in
 * a small in-process cache keyed by revision and its indexed date (a saved draft has a new
 * date, so its entry is simply not found again).
 */
const blockCache = new Map<string, string[]>();
const BLOCK_CACHE_MAX = 300;

async function revisionBlocks(hits: { id: string; date: number }[]): Promise<Map<string, string[]>> {
  const out = new Map<string, string[]>();
  const missing = new Map<string, string>();
  for (const h of hits) {
    const id = h.id.replace(/^rev-/, "");
    if (!/^[0-9a-f-]{36}$/.test(id)) continue;
    const cached = blockCache.get(`${id}:${h.date}`);
    if (cached) out.set(id, cached);
    else missing.set(id, `${id}:${h.date}`);
  }
  if (missing.size) {
    // A named prepared statement: this runs on the search path whenever hits are new to the cache.
    const { rows } = await pool().query<{ id: string; doc: unknown }>({
      name: "benchreel-search-revision-docs",
      text: "select id, doc from procedure_revisions where id = any($1::uuid[])",
      values: [[...missing.keys()]],
    });
    const found = new Map(rows.map((r) => [r.id, blockTexts(r.doc as JSONNode).map((b) => b.text)]));
    // A revision the index has but the database has not (about to be removed from the index)
    // is remembered as having no blocks, so it is not looked up on every search.
    for (const [id, key] of missing) {
      const blocks = found.get(id) ?? [];
      out.set(id, blocks);
      if (blockCache.size >= BLOCK_CACHE_MAX) blockCache.delete(blockCache.keys().next().value!);
      blockCache.set(key, blocks);
    }
  }
  return out;
}

/** The search request the app sends for a person and parameters (the benchmark sends the same). */
export function searchRequest(user: SessionUser, p: SearchParams) {
  return {
    filter: buildFilter(user, p),
    facets: ["kind", "tags", "state", "uploader"],
    limit: p.limit,
    offset: (p.page - 1) * p.limit,
    attributesToHighlight: ["title", "text"],
    highlightPreTag: HL_PRE,
    highlightPostTag: HL_POST,
    attributesToCrop: ["text"],
    cropLength: 28,
    cropMarker: "…",
  };
}

/** Where a search's time went, in milliseconds (sent as Server-Timing by /api/search). */
export type SearchTimings = { service: number; blocks: number; shaping: number };

export async function runSearch(user: SessionUser, p: SearchParams, timings?: SearchTimings): Promise<SearchResponse> {
  const t0 = performance.now();
  const res = await searchIndex().search(p.q, searchRequest(user, p));
  const t1 = performance.now();
  const blocksByRevision = await revisionBlocks(res.hits.filter((h) => h.kind === "procedure"));
  const t2 = performance.now();
  const terms = queryTerms(p.q);
  const hits: SearchHit[] = res.hits.map((h) => {
    const f = (h._formatted ?? {}) as Partial<Record<string, unknown>>;
    let url = h.url;
    let snippet = String(f.text ?? h.text ?? "");
    let context: string | undefined;
    if (h.kind === "procedure") {
      const blocks = blocksByRevision.get(h.id.replace(/^rev-/, "")) ?? [];
      const best = terms.length ? pickBlock(blocks, terms) : { index: -1, score: 0 };
      if (best.index >= 0) {
        snippet = markSnippet(blocks[best.index], terms);
        url = `${h.url}${blockFragment(snippet)}`;
      } else if (!snippet && blocks.length) snippet = markSnippet(blocks[0], terms);
    }
    if (h.kind === "mark" || h.kind === "reading") context = h.recordingTitle;
    if (h.kind === "spec") context = h.procedureTitle;
    return { id: h.id, kind: h.kind, title: String(f.title ?? h.title), snippet, url, tags: h.tags ?? [], state: h.state, t: h.t, context };
  });
  const total = res.estimatedTotalHits ?? hits.length;
  if (timings) Object.assign(timings, { service: t1 - t0, blocks: t2 - t1, shaping: performance.now() - t2 });
  return {
    query: p.q,
    hits,
    total,
    page: p.page,
    pages: Math.max(1, Math.ceil(total / p.limit)),
    facets: (res.facetDistribution ?? {}) as Record<string, Record<string, number>>,
    processingTimeMs: res.processingTimeMs,
  };
}

let behindCache: { at: number; value: Promise<boolean> } | null = null;

/** True when changes older than a few seconds are still waiting to be indexed (asked at most once a second). */
export function indexIsBehind(): Promise<boolean> {
  if (behindCache && Date.now() - behindCache.at < 1000) return behindCache.value;
  const value = countBehind().catch(() => false);
  behindCache = { at: Date.now(), value };
  return value;
}

async function countBehind(): Promise<boolean> {
  const [r] = await db()
    .select({ n: sql<number>`count(*)::int` })
    .from(searchOutbox)
    .where(and(isNull(searchOutbox.doneAt), lt(searchOutbox.createdAt, sql`now() - interval '5 seconds'`)));
  return (r?.n ?? 0) > 0;
}
