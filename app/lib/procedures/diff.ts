/** Comparing two revisions: spec changes as rows, text changes block by block as the reader sees them (the `diff` package). */
import { diffArrays } from "diff";
import type { ReaderBlock } from "./reader-blocks";

export type SpecRow = {
  specKey: string;
  label: string;
  quantity: string;
  unit: string;
  nominal: number | null;
  min: number | null;
  max: number | null;
  note: string;
};
/** A spec as the pages show it: its row id is the anchor a search hit lands on. */
export type SpecView = SpecRow & { id: string };
export type SpecField = "label" | "unit" | "nominal" | "min" | "max" | "note" | "quantity";
export type SpecChange =
  | { kind: "added"; after: SpecRow }
  | { kind: "removed"; before: SpecRow }
  | { kind: "changed"; before: SpecRow; after: SpecRow; fields: SpecField[] }
  | { kind: "unchanged"; before: SpecRow; after: SpecRow };

const FIELDS: SpecField[] = ["label", "quantity", "unit", "nominal", "min", "max", "note"];

/** Matches specs by their key (kept across revisions), then by label for specs re-created with a new key. */
export function diffSpecs(before: SpecRow[], after: SpecRow[]): SpecChange[] {
  const out: SpecChange[] = [];
  const remainingBefore = new Map(before.map((s) => [s.specKey, s]));
  const unmatchedAfter: SpecRow[] = [];
  const pairs: [SpecRow, SpecRow][] = [];
  for (const a of after) {
    const b = remainingBefore.get(a.specKey);
    if (b) {
      remainingBefore.delete(a.specKey);
      pairs.push([b, a]);
    } else unmatchedAfter.push(a);
  }
  for (const a of [...unmatchedAfter]) {
    const b = [...remainingBefore.values()].find((x) => x.label.trim().toLowerCase() === a.label.trim().toLowerCase());
    if (b) {
      remainingBefore.delete(b.specKey);
      unmatchedAfter.splice(unmatchedAfter.indexOf(a), 1);
      pairs.push([b, a]);
    }
  }
  const order = new Map(after.map((s, i) => [s.specKey, i]));
  pairs.sort((x, y) => (order.get(x[1].specKey) ?? 0) - (order.get(y[1].specKey) ?? 0));
  for (const [b, a] of pairs) {
    const fields = FIELDS.filter((f) => (b[f] ?? null) !== (a[f] ?? null));
    out.push(fields.length ? { kind: "changed", before: b, after: a, fields } : { kind: "unchanged", before: b, after: a });
  }
  for (const a of unmatchedAfter) out.push({ kind: "added", after: a });
  for (const b of remainingBefore.values()) out.push({ kind: "removed", before: b });
  return out;
}

export type Piece = { text: string; op: "same" | "add" | "del" };
export type BlockChange =
  | { op: "same" | "add" | "del"; block: ReaderBlock }
  | { op: "change"; block: ReaderBlock; before: ReaderBlock; pieces: Piece[]; titlePieces: Piece[] | null };

/** What makes two blocks the same for a reader; a step's number is left out, so inserting a step does not mark every later one. */
const sameBlock = (l: ReaderBlock, r: ReaderBlock) =>
  l.kind === r.kind &&
  l.text === r.text &&
  (l.title ?? "") === (r.title ?? "") &&
  (l.level ?? 0) === (r.level ?? 0) &&
  Boolean(l.caution) === Boolean(r.caution) &&
  Boolean(l.quote) === Boolean(r.quote);

/** Words, spaces and signs; a number with its decimals is one word, so 0.15 → 0.18 reads as a new figure, not "0." plus digits. */
const tokens = (s: string) => s.match(/\d+(?:[.,]\d+)*|[\p{L}\p{N}_]+|\s+|[^\s\p{L}\p{N}_]/gu) ?? [];

/**
 * Word changes, with a rewritten phrase kept whole: where words were replaced on both sides and
 * only spaces stand between the replacements, the old phrase is struck through once and the new
 * one follows, instead of alternating word by word.
 */
function pieces(a: string, b: string): Piece[] {
  const raw = diffArrays(tokens(a), tokens(b)).map(
    (c): Piece => ({ text: c.value.join(""), op: c.added ? "add" : c.removed ? "del" : "same" }),
  );
  const out: Piece[] = [];
  const push = (p: Piece) => {
    const last = out[out.length - 1];
    if (last?.op === p.op) last.text += p.text;
    else out.push({ ...p });
  };
  let del = "";
  let add = "";
  const flush = () => {
    // Spaces that end both sides belong to the unchanged text that follows.
    const tail = del && add ? (/\s+$/.exec(del)?.[0] ?? "") : "";
    const shared = tail && add.endsWith(tail) ? tail : "";
    if (del) push({ op: "del", text: del.slice(0, del.length - shared.length) });
    if (add) push({ op: "add", text: add.slice(0, add.length - shared.length) });
    if (shared) push({ op: "same", text: shared });
    del = add = "";
  };
  raw.forEach((p, i) => {
    if (p.op === "del") del += p.text;
    else if (p.op === "add") add += p.text;
    else if (del && add && /^\s+$/.test(p.text) && raw[i + 1] && raw[i + 1].op !== "same") {
      del += p.text;
      add += p.text;
    } else {
      flush();
      push(p);
    }
  });
  flush();
  return out;
}

/**
 * Aligns the two block lists (whole blocks compared as the reader sees them), then shows a
 * removed block directly followed by an added one of the same kind as one changed block with
 * word changes.
 */
export function diffBlocks(before: ReaderBlock[], after: ReaderBlock[]): BlockChange[] {
  const parts = diffArrays(before, after, { comparator: sameBlock });
  const out: BlockChange[] = [];
  for (let i = 0; i < parts.length; i++) {
    const p = parts[i];
    if (!p.added && !p.removed) {
      for (const b of p.value) out.push({ op: "same", block: b });
      continue;
    }
    const next = parts[i + 1];
    if (p.removed && next?.added) {
      const dels = p.value;
      const adds = next.value;
      const n = Math.max(dels.length, adds.length);
      for (let k = 0; k < n; k++) {
        const d = dels[k];
        const a = adds[k];
        if (d && a && d.kind === a.kind) {
          out.push({
            op: "change",
            block: a,
            before: d,
            pieces: pieces(d.text, a.text),
            titlePieces: (d.title ?? "") === (a.title ?? "") ? null : pieces(d.title ?? "", a.title ?? ""),
          });
        } else {
          if (d) out.push({ op: "del", block: d });
          if (a) out.push({ op: "add", block: a });
        }
      }
      i++;
      continue;
    }
    for (const b of p.value) out.push({ op: p.added ? "add" : "del", block: b });
  }
  return out;
}

export function summarize(changes: BlockChange[]): { added: number; removed: number; changed: number } {
  return {
    added: changes.filter((c) => c.op === "add").length,
    removed: changes.filter((c) => c.op === "del").length,
    changed: changes.filter((c) => c.op === "change").length,
  };
}
