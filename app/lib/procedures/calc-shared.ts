/**
 * The calculator-block helpers that need no math: result shapes, the numbers a reader may change
 * (the kinds, labels and caution live in app/lib/calc-kinds.ts and are re-exported here). Kept
 * apart from calc-presets.ts (which runs app/lib/calc and its zod schemas) so that the read page
 * can ship without the math until a reader changes a number.
 */
export { CALC_CAUTION, CALC_KINDS, calcLabel, type CalcKind } from "~/lib/calc-kinds";

export type ResultRow = { label: string; value: string; tone?: "warn" | "bad" | "ok" };
export type CalcOutcome = { ok: true; rows: ResultRow[]; warnings: string[] } | { ok: false; message: string };

/** The numbers in a preset a reader may change ("try your numbers"): every numeric leaf with a readable label. */
export type NumericLeaf = { path: (string | number)[]; label: string; value: number; unit?: string };

export function numericLeaves(preset: unknown): NumericLeaf[] {
  const out: NumericLeaf[] = [];
  const visit = (v: unknown, path: (string | number)[]) => {
    if (typeof v === "number") {
      out.push({ path, label: leafLabel(path), value: v });
      return;
    }
    if (Array.isArray(v)) v.forEach((x, i) => visit(x, [...path, i]));
    else if (v && typeof v === "object") {
      const o = v as Record<string, unknown>;
      if (typeof o.value === "number" && typeof o.unit === "string") {
        out.push({ path: [...path, "value"], label: leafLabel(path), value: o.value, unit: o.unit });
        return;
      }
      for (const [k, x] of Object.entries(o)) visit(x, [...path, k]);
    }
  };
  visit(preset, []);
  return out;
}

const WORDS: Record<string, string> = {
  k: "nut factor K",
  muThread: "thread friction μ",
  muHead: "head friction μ",
  headDiameter: "head bearing diameter",
  angleDeg: "angle (°)",
  gapPerBore: "gap per inch of bore",
  housingBore: "housing bore",
  bearingBore: "bearing bore",
  shellThickness: "shell thickness",
  measuredGap: "measured gap",
  boreTemperature: "bore temperature",
  pistonTemperature: "piston temperature",
  alphaPerK: "expansion coefficient (1/K)",
  yieldStrength: "yield strength",
};

function leafLabel(path: (string | number)[]): string {
  const parts: string[] = [];
  for (let i = 0; i < path.length; i++) {
    const p = path[i];
    if (typeof p === "number") parts.push(`#${p + 1}`);
    else if (p !== "value" && p !== "method" && p !== "material" && p !== "thermal" && p !== "spec" && p !== "grip")
      parts.push(WORDS[p] ?? p);
    else if ((p === "spec" || p === "grip") && i === path.length - 2) parts.push(p);
  }
  return parts.join(" ") || "value";
}

export function setAtPath<T>(obj: T, path: (string | number)[], value: unknown): T {
  const clone = JSON.parse(JSON.stringify(obj)) as T;
  let cur = clone as unknown as Record<string | number, unknown>;
  for (let i = 0; i < path.length - 1; i++) cur = cur[path[i]] as Record<string | number, unknown>;
  cur[path[path.length - 1]] = value;
  return clone;
}

/** A number as a person reads it: no binary noise (88.00399999999999 → 88.004). */
export const tidyNumber = (v: number): number => Number(v.toPrecision(12));

/** A preset in words for comparisons and search: "thread M12x1.5, torque 110 N.m, nut factor K 0.14". */
export function presetText(preset: unknown): string {
  const words: string[] = [];
  const visit = (v: unknown, path: (string | number)[]) => {
    if (typeof v === "string") words.push(`${leafLabel(path)} ${v}`);
    else if (typeof v === "number") words.push(`${leafLabel(path)} ${tidyNumber(v)}`);
    else if (Array.isArray(v)) v.forEach((x, i) => visit(x, [...path, i]));
    else if (v && typeof v === "object") {
      const o = v as Record<string, unknown>;
      if (typeof o.value === "number" && typeof o.unit === "string") words.push(`${leafLabel(path)} ${tidyNumber(o.value)} ${o.unit}`);
      else for (const [k, x] of Object.entries(o)) visit(x, [...path, k]);
    }
  };
  visit(preset, []);
  return words.join(", ");
}
