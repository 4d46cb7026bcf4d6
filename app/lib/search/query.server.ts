import { and, isNull, lt, sql } from "drizzle-orm";
import { z } from "zod";
import { searchOutbox } from "~/db/schema";
import type { SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { can } from "~/lib/permissions";
import { searchIndex, type SearchKind } from "./client.server";

import { HL_POST, HL_PRE } from "./highlight";

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

/** The block holding the most distinct highlighted words (the first of equals); -1 if none. */
export function bestBlock(blocks: unknown[]): number {
  let best = -1;
  let bestScore = 0;
  blocks.forEach((b, i) => {
    if (typeof b !== "string") return;
    const words = new Set<string>();
    for (const m of b.matchAll(new RegExp(`${HL_PRE}([^${HL_POST}]*)${HL_POST}`, "g"))) words.add(m[1].toLowerCase());
    if (words.size > bestScore) {
      best = i;
      bestScore = words.size;
    }
  });
  return best;
}

export async function runSearch(user: SessionUser, p: SearchParams): Promise<SearchResponse> {
  const res = await searchIndex().search(p.q, {
    filter: buildFilter(user, p),
    facets: ["kind", "tags", "state", "uploader"],
    limit: p.limit,
    offset: (p.page - 1) * p.limit,
    attributesToHighlight: ["title", "text", "blocks"],
    highlightPreTag: HL_PRE,
    highlightPostTag: HL_POST,
    attributesToCrop: ["text", "blocks"],
    cropLength: 28,
    cropMarker: "…",
  });
  const hits: SearchHit[] = res.hits.map((h) => {
    const f = (h._formatted ?? {}) as Partial<Record<string, unknown>>;
    let url = h.url;
    let snippet = String(f.text ?? h.text ?? "");
    let context: string | undefined;
    const blocks = Array.isArray(f.blocks) ? (f.blocks as string[]) : [];
    const matched = bestBlock(blocks);
    if (matched >= 0) {
      url = `${h.url}${blockFragment(blocks[matched])}`;
      snippet = blocks[matched];
    } else if (!snippet && blocks.length) snippet = blocks[0];
    if (h.kind === "mark" || h.kind === "reading") context = h.recordingTitle;
    if (h.kind === "spec") context = h.procedureTitle;
    return { id: h.id, kind: h.kind, title: String(f.title ?? h.title), snippet, url, tags: h.tags ?? [], state: h.state, t: h.t, context };
  });
  const total = res.estimatedTotalHits ?? hits.length;
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

/** True when changes older than a few seconds are still waiting to be indexed. */
export async function indexIsBehind(): Promise<boolean> {
  const [r] = await db()
    .select({ n: sql<number>`count(*)::int` })
    .from(searchOutbox)
    .where(and(isNull(searchOutbox.doneAt), lt(searchOutbox.createdAt, sql`now() - interval '5 seconds'`)));
  return (r?.n ?? 0) > 0;
}
