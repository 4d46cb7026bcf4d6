/**
 * The fake's tokenizer. Shop text is full of designations that a plain word splitter would
 * shred: "0.0035", "M12x1.5", "110 N·m", "piston-to-wall", "3/8-16". A *chunk* is a run of
 * letters and digits joined by single joiner characters (`.`, `·`, `/`, `-`, `_`, `×`); it is
 * indexed whole, and its *parts* (split at the joiners, except a `.` between two digits and
 * split at an `x` between two digits) are indexed too, so "M12x1.5" is found by "m12x1.5",
 * by "m12" and by "1.5", and "piston-to-wall" by "piston to wall". A chunk holding `·` is
 * also indexed with its joiners removed ("n·m" → "nm"). Everything else (spaces, commas,
 * brackets, dashes between numbers such as the en dash in "0.0030–0.0035") separates chunks.
 *
 * Terms are lower-cased with diacritics removed, like Meilisearch's normaliser.
 */

// letters/digits, then any number of (one joiner + letters/digits)
// (group 1 is non-empty when the chunk holds joiners)
const CHUNK_RE = /[\p{L}\p{N}]+((?:[.·⋅∙•/\-‐‑_×][\p{L}\p{N}]+)*)/gu;
const DIGIT_X_DIGIT = /\d[xX]\d/;

/** Whether a chunk can have parts: it holds a joiner, or an x between two digits. */
function mayHaveParts(m: RegExpExecArray): boolean {
  if (m[1] !== "") return true;
  const raw = m[0];
  return (raw.includes("x") || raw.includes("X")) && DIGIT_X_DIGIT.test(raw);
}
const JOINERS = new Set([".", "·", "⋅", "∙", "•", "/", "-", "‐", "‑", "_", "×"]);
const NON_ASCII = /[^\x00-\x7f]/;
const MARKS = /\p{M}+/gu;
const isDigit = (c: string | undefined) => c !== undefined && c >= "0" && c <= "9";

/** Lower-case, strip diacritics, unify the middle-dot and multiplication-sign variants. */
export function normalizeTerm(s: string): string {
  const t = s.toLowerCase();
  if (!NON_ASCII.test(t)) return t;
  return t.normalize("NFKD").replace(MARKS, "").replace(/[⋅∙•]/g, "·").replace(/×/g, "x").replace(/[‐‑]/g, "-");
}

export type Part = { start: number; end: number; term: string };
export type Chunk = { start: number; end: number; term: string; parts: Part[] | null };

/** Split a chunk (original text) at its joiners; null when it has a single part. */
function splitParts(text: string, offset: number): Part[] | null {
  let hasJoiner = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (JOINERS.has(c) || ((c === "x" || c === "X") && isDigit(text[i - 1]) && isDigit(text[i + 1]))) {
      hasJoiner = true;
      break;
    }
  }
  if (!hasJoiner) return null;
  const parts: Part[] = [];
  let from = 0;
  for (let i = 0; i <= text.length; i++) {
    const c = text[i];
    let cut = i === text.length;
    if (!cut && JOINERS.has(c)) cut = !(c === "." && isDigit(text[i - 1]) && isDigit(text[i + 1]));
    else if (!cut && (c === "x" || c === "X")) cut = isDigit(text[i - 1]) && isDigit(text[i + 1]);
    if (cut) {
      if (i > from) parts.push({ start: offset + from, end: offset + i, term: normalizeTerm(text.slice(from, i)) });
      from = i + 1;
    }
  }
  return parts.length > 1 ? parts : null;
}

/**
 * Calls cb(start, end, raw, term) for every chunk of a text without allocating per chunk
 * (used to highlight and crop long texts); `parts` gives the parts of the current chunk.
 */
export function forEachChunk(text: string, cb: (start: number, end: number, raw: string, term: string, hasParts: boolean) => void) {
  CHUNK_RE.lastIndex = 0;
  for (let m = CHUNK_RE.exec(text); m !== null; m = CHUNK_RE.exec(text))
    cb(m.index, m.index + m[0].length, m[0], normalizeTerm(m[0]), mayHaveParts(m));
}

export function partsOfChunk(raw: string, offset: number): Part[] | null {
  return splitParts(raw, offset);
}

/** All chunks of a text with their offsets (used for queries, highlighting and cropping). */
export function scanChunks(text: string): Chunk[] {
  const out: Chunk[] = [];
  CHUNK_RE.lastIndex = 0;
  for (let m = CHUNK_RE.exec(text); m !== null; m = CHUNK_RE.exec(text)) {
    const raw = m[0];
    out.push({
      start: m.index,
      end: m.index + raw.length,
      term: normalizeTerm(raw),
      parts: mayHaveParts(m) ? splitParts(raw, m.index) : null,
    });
  }
  return out;
}

/** Extra terms a chunk is indexed under besides itself and its parts. */
function variants(term: string, hasParts: boolean, emit: (t: string) => void) {
  if (!hasParts) return;
  if (term.includes("·")) emit(term.replace(/·/g, ""));
  // "0.0035" is also found when typed as ".0035"
  if (term.charCodeAt(0) === 48 && term[1] === ".") {
    const dec = /^0\.(\d+)$/.exec(term);
    if (dec) emit(dec[1]);
  }
}

/**
 * Calls `emit` for every term a text is indexed under (whole chunks, their parts, variants)
 * and returns the number of chunks (the field length used by BM25).
 */
export function indexTerms(text: string, emit: (term: string) => void): number {
  let n = 0;
  CHUNK_RE.lastIndex = 0;
  for (let m = CHUNK_RE.exec(text); m !== null; m = CHUNK_RE.exec(text)) {
    n++;
    const raw = m[0];
    const term = normalizeTerm(raw);
    emit(term);
    const joined = mayHaveParts(m);
    if (joined) {
      const parts = splitParts(raw, 0);
      if (parts) for (const p of parts) emit(p.term);
    }
    variants(term, joined, emit);
  }
  return n;
}

/** The terms of a text as a flat list (for tests and for the minisearch baseline). */
export function tokenize(text: string): string[] {
  const out: string[] = [];
  indexTerms(text, (t) => out.push(t));
  return out;
}

export const isNumericTerm = (t: string) => /^[\d.,]+$/.test(t) && /\d/.test(t);
