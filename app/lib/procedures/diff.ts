/** Comparing two revisions: spec changes as rows, text changes block by block (the `diff` package). */
import { diffArrays, diffWords } from "diff";
import type { Block } from "./document";

export type SpecRow = { specKey: string; label: string; quantity: string; unit: string; nominal: number | null; min: number | null; max: number | null; note: string };
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
  | { op: "same"; type: string; text: string }
  | { op: "add"; type: string; text: string }
  | { op: "del"; type: string; text: string }
  | { op: "change"; type: string; pieces: Piece[] };

/**
 * Aligns the two block lists (whole blocks compared by their text), then shows a removed block
 * directly followed by an added one of the same kind as one changed block with word changes.
 */
export function diffBlocks(before: Block[], after: Block[]): BlockChange[] {
  const parts = diffArrays(before, after, { comparator: (l, r) => l.text === r.text && l.type === r.type });
  const out: BlockChange[] = [];
  for (let i = 0; i < parts.length; i++) {
    const p = parts[i];
    if (!p.added && !p.removed) {
      for (const b of p.value) out.push({ op: "same", type: b.type, text: b.text });
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
        if (d && a) {
          const pieces = diffWords(d.text, a.text).map((c): Piece => ({ text: c.value, op: c.added ? "add" : c.removed ? "del" : "same" }));
          out.push({ op: "change", type: a.type, pieces });
        } else if (d) out.push({ op: "del", type: d.type, text: d.text });
        else if (a) out.push({ op: "add", type: a.type, text: a.text });
      }
      i++;
      continue;
    }
    for (const b of p.value) out.push({ op: p.added ? "add" : "del", type: b.type, text: b.text });
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
