import { and, isNull, lt, sql } from "drizzle-orm";
import { z } from "zod";
import { searchOutbox } from "~/db/schema";
import type { SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { can } from "~/lib/permissions";
import { searchErrorMessage, searchIndex, type SearchKind } from "./client.server";
import { HL_POST, HL_PRE } from "./highlight";

export const KINDS: SearchKind[] = ["procedure", "spec", "mark", "reading", "recording", "test_record", "caption", "build"];

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
  /** A recording's readings hit: the readings that matched (highlighted), each opening the recording at it. */
  readings?: ReadingMatch[];
  /** How many more of its readings matched than are listed. */
  moreReadings?: number;
};

export type ReadingMatch = { id: string; text: string; url: string; t?: number };

/** How many matching readings a recording's hit lists. */
export const READINGS_LISTED = 5;

/** Where a reading opens: its recording at its second, the reading's row marked (`#reading-<id>`). */
export function readingUrl(recordingUrl: string, id: string, t: number | null | undefined): string {
  return `${recordingUrl}${t != null ? `?t=${t}` : ""}#reading-${id}`;
}

/** The readings of a recording's document that hold highlighted words, in the document's order. */
export function matchingReadings(
  recordingUrl: string,
  formatted: unknown,
  ids: unknown,
  times: unknown,
): { listed: ReadingMatch[]; more: number } {
  const lines = Array.isArray(formatted) ? formatted : [];
  const idList = Array.isArray(ids) ? ids : [];
  const timeList = Array.isArray(times) ? times : [];
  const all: ReadingMatch[] = [];
  lines.forEach((line, i) => {
    if (typeof line !== "string" || !line.includes(HL_PRE) || typeof idList[i] !== "string") return;
    const t = typeof timeList[i] === "number" ? (timeList[i] as number) : undefined;
    all.push({ id: idList[i] as string, text: line, url: readingUrl(recordingUrl, idList[i] as string, t), t });
  });
  return { listed: all.slice(0, READINGS_LISTED), more: Math.max(0, all.length - READINGS_LISTED) };
}

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
  if (p.tag) filter.push(`tags = ${quote(p.tag)} OR procedureTags = ${quote(p.tag)}`);
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
 * The line of a cropped procedure body (one block per line) holding the most distinct
 * highlighted words, then the most highlights; the first of equals. Null when nothing in it
 * is highlighted.
 */
export function bestLine(cropped: string): string | null {
  let best: string | null = null;
  let most = [0, 0];
  for (const line of cropped.split("\n")) {
    const marked = line
      .split(HL_PRE)
      .slice(1)
      .map((part) => part.split(HL_POST)[0].toLowerCase());
    const score = [new Set(marked).size, marked.length];
    if (score[0] > most[0] || (score[0] === most[0] && score[1] > most[1])) [best, most] = [line, score];
  }
  return best;
}

/** A cropped body as one run of text: its lines (blocks) joined, without heading marks. */
export function bodySnippet(cropped: string): string {
  return cropped
    .split("\n")
    .map((line) => line.trim().replace(/^#+ /, ""))
    .filter(Boolean)
    .join(" ");
}

/** What a search hit needs from a document; the long texts come back only as crops. */
const RETURNED = [
  "id",
  "kind",
  "title",
  "tags",
  "url",
  "state",
  "t",
  "procedureTitle",
  "recordingTitle",
  "readingIds",
  "readingTimes",
  "before",
  "after",
  "inRecording",
];

/** The search request the app sends for a person and parameters (the benchmark sends the same). */
export function searchRequest(user: SessionUser, p: SearchParams) {
  return {
    filter: buildFilter(user, p),
    facets: ["kind", "tags", "state", "uploader"],
    limit: p.limit,
    offset: (p.page - 1) * p.limit,
    attributesToRetrieve: RETURNED,
    attributesToHighlight: ["title", "text", "body", "readings"],
    highlightPreTag: HL_PRE,
    highlightPostTag: HL_POST,
    attributesToCrop: ["text", "body"],
    cropLength: 28,
    cropMarker: "…",
  };
}

/** Where a search's time went, in milliseconds (sent as Server-Timing by /api/search). */
export type SearchTimings = { service: number; shaping: number };

export async function runSearch(user: SessionUser, p: SearchParams, timings?: SearchTimings): Promise<SearchResponse> {
  const t0 = performance.now();
  const res = await searchIndex().search(p.q, searchRequest(user, p));
  const t1 = performance.now();
  const hits: SearchHit[] = res.hits.map((h) => {
    const f = (h._formatted ?? {}) as Partial<Record<string, unknown>>;
    let url = h.url;
    let snippet = String(f.text ?? "");
    let context: string | undefined;
    if (h.kind === "procedure") {
      // The service cropped the body around its best matches; the hit points at the block
      // (line) holding most of them, and shows the crop.
      const body = String(f.body ?? "");
      const line = bestLine(body);
      if (line) {
        snippet = bodySnippet(body);
        url = `${h.url}${blockFragment(line)}`;
      } else if (!snippet) snippet = bodySnippet(body);
    }
    if (h.kind === "mark") context = h.recordingTitle;
    if (h.kind === "spec") context = h.procedureTitle;
    if (h.kind === "caption") {
      // A line said in a recording: the recording's title, the line (highlighted) between its neighbours.
      const line = String(f.title ?? h.title);
      return {
        id: h.id,
        kind: h.kind,
        title: h.inRecording ?? "Recording",
        snippet: [h.before, line, h.after].filter(Boolean).join(" "),
        url,
        tags: [],
        t: h.t,
      };
    }
    if (h.kind === "reading") {
      // One hit per recording, listing the readings that matched; it opens at the first of them.
      const { listed, more } = matchingReadings(h.url, f.readings, h.readingIds, h.readingTimes);
      const count = h.readingIds?.length ?? 0;
      return {
        id: h.id,
        kind: h.kind,
        title: h.recordingTitle ?? "Readings",
        snippet: listed.length ? "" : `${count} reading${count === 1 ? "" : "s"}`,
        url: listed[0]?.url ?? h.url,
        tags: h.tags ?? [],
        t: listed[0]?.t,
        readings: listed,
        moreReadings: more,
      };
    }
    return { id: h.id, kind: h.kind, title: String(f.title ?? h.title), snippet, url, tags: h.tags ?? [], state: h.state, t: h.t, context };
  });
  const total = res.estimatedTotalHits ?? hits.length;
  if (timings) Object.assign(timings, { service: t1 - t0, shaping: performance.now() - t1 });
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

const NO_STORE = { "Cache-Control": "private, no-store" };

/**
 * The search API's answer (GET /api/search, which the header box calls on every pause in
 * typing): the hits with `behind`, and Server-Timing for where the time went; a 503 with a
 * reason while the search service is down (changes are still saved and queued).
 */
export async function searchAnswer(user: SessionUser, p: SearchParams): Promise<Response> {
  const behind = indexIsBehind().catch(() => false);
  try {
    const t: SearchTimings = { service: 0, shaping: 0 };
    const result = await runSearch(user, p, t);
    const timing = `search;dur=${t.service.toFixed(2)}, shape;dur=${t.shaping.toFixed(2)}`;
    return Response.json({ ...result, behind: await behind }, { headers: { ...NO_STORE, "Server-Timing": timing } });
  } catch (err) {
    console.error("[search]", searchErrorMessage(err));
    const reason = "The search service is not answering. Your changes are saved and will be searchable when it is back.";
    return Response.json({ error: "search unavailable", reason, behind: true }, { status: 503, headers: NO_STORE });
  }
}
