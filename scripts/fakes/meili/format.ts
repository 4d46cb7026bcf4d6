/**
 * Highlighting and cropping of the returned hits (`_formatted`, `_matchesPosition`).
 *
 * Only the page is formatted, and a long text is not tokenized word by word: the terms the
 * document holds are located with `indexOf` on the normalized text (a native scan), each
 * occurrence is checked to sit on word or part boundaries, and only the region around the
 * chosen crop window is split into words. Texts whose normalization changes their length
 * (decomposed accents, ligatures) take the word-by-word path, which gives the same result.
 */
import { forEachChunk, partsOfChunk } from "./tokenizer";

/** term → length of the highlighted prefix (0: the whole word). */
export type HitMatch = Map<string, number>;
type Span = { start: number; end: number; term: string };
export type Crop = { length: number; marker: string };

const NON_ASCII = /[^\x00-\x7f]/;
const WORD_CHAR = /[\p{L}\p{N}]/u;

function isWord(c: string | undefined): boolean {
  if (c === undefined) return false;
  const k = c.charCodeAt(0);
  if (k < 128) return (k >= 48 && k <= 57) || (k >= 97 && k <= 122) || (k >= 65 && k <= 90);
  return WORD_CHAR.test(c);
}
const isDigit = (c: string | undefined) => c !== undefined && c >= "0" && c <= "9";

/** Normalized text with the same length as the original, or null when that is impossible. */
function normalizedSameLength(text: string): string | null {
  let t = text.toLowerCase();
  if (t.length !== text.length) return null;
  if (!NON_ASCII.test(t)) return t;
  const d = t.normalize("NFKD");
  if (d.length !== t.length) return null;
  t = d.replace(/[⋅∙•]/g, "·").replace(/×/g, "x").replace(/[‐‑]/g, "-");
  return t;
}

/** An occurrence at [i, j) is a word, or a part of a designation, when its edges are boundaries. */
function atBoundaries(s: string, i: number, j: number): boolean {
  if (i > 0) {
    const c = s[i - 1];
    if (isWord(c)) {
      if (!(c === "x" && isDigit(s[i - 2]) && isDigit(s[i]))) return false;
    } else if (c === "." && isDigit(s[i - 2]) && isDigit(s[i])) return false;
  }
  if (j < s.length) {
    const c = s[j];
    if (isWord(c)) {
      if (!(c === "x" && isDigit(s[j - 1]) && isDigit(s[j + 1]))) return false;
    } else if (c === "." && isDigit(s[j - 1]) && isDigit(s[j + 1])) return false;
  }
  return true;
}

/** Terms sharing their first letters are looked for with one scan of the text (a prefix's many words). */
const SCAN_PREFIX = 3;

/**
 * Sorted, non-overlapping spans of the query's terms in a text (fast path). The terms that begin
 * alike are found together: one `indexOf` pass for their shared first letters, then each term is
 * compared where those letters occur, which finds exactly the occurrences a scan per term finds.
 */
function findSpans(norm: string, match: HitMatch): Span[] {
  const spans: Span[] = [];
  const groups = new Map<string, [string, number][]>();
  // Two terms can cover the same letters ("12" and a prefix of "12x5"): the one first in the
  // match keeps the span, as when each term was scanned in turn.
  const rank = new Map<string, number>();
  for (const [term, prefix] of match) {
    if (!term) continue;
    rank.set(term, rank.size);
    const key = term.slice(0, SCAN_PREFIX);
    const group = groups.get(key);
    if (group) group.push([term, prefix]);
    else groups.set(key, [[term, prefix]]);
  }
  for (const [key, group] of groups) {
    for (let i = norm.indexOf(key); i >= 0; i = norm.indexOf(key, i + 1)) {
      for (const [term, prefix] of group) {
        if (term.length > key.length && !norm.startsWith(term, i)) continue;
        const j = i + term.length;
        if (!atBoundaries(norm, i, j)) continue;
        spans.push({ start: i, end: prefix > 0 && prefix < term.length ? i + prefix : j, term });
      }
    }
  }
  // "nm" also stands for "n·m"
  if (norm.includes("·")) {
    const dotted = [...norm.matchAll(/[\p{L}\p{N}]+(?:·[\p{L}\p{N}]+)+/gu)];
    for (const term of match.keys())
      if (term && !term.includes("·"))
        for (const m of dotted)
          if (m[0].replace(/·/g, "") === term && atBoundaries(norm, m.index!, m.index! + m[0].length))
            spans.push({ start: m.index!, end: m.index! + m[0].length, term });
  }
  spans.sort((a, b) => a.start - b.start || b.end - a.end || rank.get(a.term)! - rank.get(b.term)!);
  const out: Span[] = [];
  for (const s of spans) if (!out.length || s.start >= out[out.length - 1].end) out.push(s);
  return out;
}

/** The spans of one chunk (whole, prefix, or some parts), for the word-by-word path. */
function chunkSpans(start: number, end: number, raw: string, term: string, hasParts: boolean, match: HitMatch, out: Span[]) {
  const whole = match.get(term) ?? (hasParts && term.includes("·") ? match.get(term.replace(/·/g, "")) : undefined);
  if (whole !== undefined) {
    out.push({ start, end: whole > 0 && whole < end - start ? start + whole : end, term });
    return true;
  }
  if (!hasParts) return false;
  const parts = partsOfChunk(raw, start);
  if (!parts) return false;
  let any = false;
  for (const p of parts) {
    const m = match.get(p.term);
    if (m !== undefined) {
      out.push({ start: p.start, end: m > 0 && m < p.end - p.start ? p.start + m : p.end, term: p.term });
      any = true;
    }
  }
  return any;
}

/** Positions of the matches in a text (for `_matchesPosition`). */
export function matchSpans(text: string, match: HitMatch): [number, number][] {
  if (match.size === 0) return [];
  const norm = normalizedSameLength(text);
  if (norm !== null) return findSpans(norm, match).map((s) => [s.start, s.end]);
  const out: Span[] = [];
  forEachChunk(text, (start, end, raw, term, hasParts) => void chunkSpans(start, end, raw, term, hasParts, match, out));
  return out.map((s) => [s.start, s.end]);
}

type Word = { start: number; end: number; matched: string[] };

/** Chooses L consecutive words holding the most distinct matched terms, matches centred. */
function chooseWindow(words: Word[], L: number): number {
  let best = -1;
  let bestStart = 0;
  const idx: number[] = [];
  words.forEach((w, i) => w.matched.length && idx.push(i));
  let j = 0;
  const counts = new Map<string, number>();
  for (let i = 0; i < idx.length; i++) {
    for (const t of words[idx[i]].matched) counts.set(t, (counts.get(t) ?? 0) + 1);
    while (idx[i] - idx[j] >= L) {
      for (const t of words[idx[j]].matched) {
        const c = counts.get(t)! - 1;
        if (c) counts.set(t, c);
        else counts.delete(t);
      }
      j++;
    }
    if (counts.size > best) {
      best = counts.size;
      bestStart = Math.max(0, idx[j] - Math.floor((L - (idx[i] - idx[j] + 1)) / 2));
    }
  }
  return Math.max(0, Math.min(bestStart, words.length - L));
}

/** Words of text[from, to), each with the spans' terms it holds. */
function wordsIn(text: string, from: number, to: number, spans: Span[], max = Infinity): Word[] {
  const words: Word[] = [];
  const re = /[\p{L}\p{N}]+(?:[.·⋅∙•/\-‐‑_×][\p{L}\p{N}]+)*/gu;
  re.lastIndex = from;
  let k = 0;
  for (let m = re.exec(text); m !== null && m.index < to && words.length < max; m = re.exec(text)) {
    const w: Word = { start: m.index, end: m.index + m[0].length, matched: [] };
    while (k < spans.length && spans[k].end <= w.start) k++;
    for (let s = k; s < spans.length && spans[s].start < w.end; s++) w.matched.push(spans[s].term);
    words.push(w);
  }
  return words;
}

function hasWordBefore(text: string, off: number) {
  for (let i = off - 1; i >= 0; i--) if (isWord(text[i])) return true;
  return false;
}
function hasWordAfter(text: string, off: number) {
  for (let i = off; i < text.length; i++) if (isWord(text[i])) return true;
  return false;
}

/** Highlights (tags) and/or crops one string value. */
export function formatText(text: string, match: HitMatch, tags: [string, string] | null, crop: Crop | null): string {
  const norm = normalizedSameLength(text);
  let spans: Span[];
  if (norm !== null) spans = match.size ? findSpans(norm, match) : [];
  else {
    spans = [];
    if (match.size) forEachChunk(text, (start, end, raw, term, hasParts) => void chunkSpans(start, end, raw, term, hasParts, match, spans));
  }
  let startOff = 0;
  let endOff = text.length;
  let prefix = "";
  let suffix = "";
  if (crop) {
    const L = Math.max(1, crop.length);
    let words: Word[];
    if (spans.length === 0) words = wordsIn(text, 0, text.length, spans, L);
    else {
      // the densest stretch of matches, then the words around it only
      const reach = L * 12;
      let best = 0;
      let bestAt = 0;
      let j = 0;
      const counts = new Map<string, number>();
      for (let i = 0; i < spans.length; i++) {
        counts.set(spans[i].term, (counts.get(spans[i].term) ?? 0) + 1);
        while (spans[i].start - spans[j].start > reach) {
          const c = counts.get(spans[j].term)! - 1;
          if (c) counts.set(spans[j].term, c);
          else counts.delete(spans[j].term);
          j++;
        }
        if (counts.size > best) {
          best = counts.size;
          bestAt = j;
        }
      }
      const from = Math.max(0, spans[bestAt].start - reach);
      words = wordsIn(text, from, Math.min(text.length, spans[bestAt].start + 2 * reach), spans);
      // drop a word cut by the region's start
      if (from > 0 && words.length && words[0].start === from && isWord(text[from - 1])) words.shift();
      if (words.length < L) words = wordsIn(text, 0, text.length, spans);
    }
    if (words.length) {
      const from = spans.length ? chooseWindow(words, L) : 0;
      startOff = words[from].start;
      endOff = words[Math.min(words.length, from + L) - 1].end;
      if (hasWordBefore(text, startOff)) prefix = crop.marker;
      else startOff = 0;
      if (hasWordAfter(text, endOff)) suffix = crop.marker;
      else endOff = text.length;
    }
  }
  let out = "";
  let pos = startOff;
  if (tags)
    for (const s of spans) {
      if (s.start < startOff || s.end > endOff) continue;
      out += text.slice(pos, s.start) + tags[0] + text.slice(s.start, s.end) + tags[1];
      pos = s.end;
    }
  out += text.slice(pos, endOff);
  return prefix + out + suffix;
}
