import { HL_POST, HL_PRE } from "./highlight";

/**
 * Finding the block of a procedure that a query matched, and marking the words in it. The
 * search service finds the procedure (its blocks are searchable but not returned, which keeps
 * responses small); the app then points the hit at the block with the most query words.
 */

const WORD = /[\p{L}\p{N}][\p{L}\p{N}.\-×·/]*[\p{L}\p{N}]|[\p{L}\p{N}]/gu;

export function queryTerms(q: string): string[] {
  return [...new Set((q.toLowerCase().match(WORD) ?? []).filter((t) => t.length >= 2 || /\d/.test(t)))];
}

function hits(word: string, terms: string[]): boolean {
  const w = word.toLowerCase();
  return terms.some((t) => w.startsWith(t) || (t.length >= 4 && w.includes(t)));
}

/** The index of the block holding the most distinct query terms (first of equals), and that count. */
export function pickBlock(blocks: string[], terms: string[]): { index: number; score: number } {
  let best = { index: -1, score: 0 };
  blocks.forEach((b, i) => {
    const words = (b.match(WORD) ?? []).map((w) => w.toLowerCase());
    const score = terms.filter((t) => words.some((w) => w.startsWith(t) || (t.length >= 4 && w.includes(t)))).length;
    if (score > best.score) best = { index: i, score };
  });
  return best;
}

/** Up to `maxWords` words around the first match, matched words wrapped in the markers. */
export function markSnippet(text: string, terms: string[], maxWords = 28): string {
  const parts: { word: string; start: number; end: number }[] = [];
  for (const m of text.matchAll(WORD)) parts.push({ word: m[0], start: m.index!, end: m.index! + m[0].length });
  if (!parts.length) return text;
  const first = Math.max(0, parts.findIndex((p) => hits(p.word, terms)));
  const from = Math.max(0, Math.min(first - Math.floor(maxWords / 3), parts.length - maxWords));
  const to = Math.min(parts.length, from + maxWords);
  let out = from > 0 ? "…" : "";
  let cursor = from > 0 ? parts[from].start : 0;
  for (let i = from; i < to; i++) {
    const p = parts[i];
    out += text.slice(cursor, p.start);
    out += hits(p.word, terms) ? `${HL_PRE}${p.word}${HL_POST}` : p.word;
    cursor = p.end;
  }
  out += to < parts.length ? "…" : text.slice(cursor);
  return out;
}
