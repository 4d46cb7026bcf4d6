/**
 * Calculator blocks: which calculators a procedure can embed, their default presets, and
 * one function that runs a preset through app/lib/calc and gives the rows a reader sees.
 */
import {
  calculateClearance,
  calculateDistortion,
  calculatePreload,
  clearanceInputSchema,
  distortionInputSchema,
  preloadInputSchema,
  type ClearanceInput,
  type DistortionInput,
  type PreloadInput,
} from "~/lib/calc";

export const CALC_KINDS = ["preload", "distortion", "clearance"] as const;
export type CalcKind = (typeof CALC_KINDS)[number];

export const CALC_CAUTION =
  "Estimates for planning and checking. The fastener maker's and the engine maker's published values take precedence; follow local codes and licensed practice.";

export const DEFAULT_PRESETS: Record<CalcKind, Record<string, unknown>> = {
  preload: {
    thread: "M12x1.5",
    direction: "torque-to-preload",
    torque: { value: 110, unit: "N.m" },
    method: { kind: "nut-factor", k: 0.15 },
    material: { propertyClass: "12.9" },
  },
  distortion: {
    mode: "diametral",
    reference: { value: 88.0, unit: "mm" },
    readings: [
      { depth: { value: 10, unit: "mm" }, angleDeg: 0, diameter: { value: 88.006, unit: "mm" } },
      { depth: { value: 10, unit: "mm" }, angleDeg: 45, diameter: { value: 88.012, unit: "mm" } },
      { depth: { value: 10, unit: "mm" }, angleDeg: 90, diameter: { value: 88.009, unit: "mm" } },
      { depth: { value: 10, unit: "mm" }, angleDeg: 135, diameter: { value: 88.003, unit: "mm" } },
    ],
  },
  clearance: {
    kind: "piston-to-wall",
    bore: { value: 88.0, unit: "mm" },
    piston: { value: 87.93, unit: "mm" },
  },
};

const SCHEMAS = { preload: preloadInputSchema, distortion: distortionInputSchema, clearance: clearanceInputSchema } as const;

/** null when the preset is a valid input of its calculator, else the first problem as text. */
export function checkCalculatorPreset(kind: CalcKind, preset: unknown): string | null {
  const schema = SCHEMAS[kind];
  if (!schema) return "unknown calculator";
  const r = schema.safeParse(preset);
  if (r.success) return null;
  const i = r.error.issues[0];
  return `${i.path.join(".") || "input"}: ${i.message}`;
}

export type ResultRow = { label: string; value: string; tone?: "warn" | "bad" | "ok" };
export type CalcOutcome = { ok: true; rows: ResultRow[]; warnings: string[] } | { ok: false; message: string };

const f = (v: number, digits = 3) => (Number.isFinite(v) ? Number(v.toFixed(digits)).toLocaleString("en-GB", { maximumFractionDigits: digits }) : "—");

/** Runs the preset through the shared math module; never throws. */
export function runCalculator(kind: CalcKind, preset: unknown): CalcOutcome {
  const problem = checkCalculatorPreset(kind, preset);
  if (problem) return { ok: false, message: problem };
  try {
    if (kind === "preload") {
      const r = calculatePreload(preset as PreloadInput);
      const rows: ResultRow[] = [
        { label: "Preload (clamp load)", value: `${f(r.preload_N / 1000, 2)} kN` },
        { label: "Torque", value: `${f(r.torque_Nm, 1)} N·m` },
        { label: "Stress in the stress area", value: `${f(r.stress_MPa, 0)} MPa` },
      ];
      if (r.percentOfYield != null) rows.push({ label: "Of yield", value: `${f(r.percentOfYield, 1)} %`, tone: r.percentOfYield > 90 ? "bad" : "ok" });
      if (r.elongation_mm != null) rows.push({ label: "Elongation (stress-area simplification)", value: `${f(r.elongation_mm, 3)} mm` });
      return { ok: true, rows, warnings: r.warnings };
    }
    if (kind === "distortion") {
      const r = calculateDistortion(preset as DistortionInput);
      const rows: ResultRow[] = r.levels.map((l) => ({ label: `Out-of-round at ${f(l.depth_mm, 1)} mm`, value: `${f(l.outOfRound_mm * 1000, 1)} µm` }));
      if (r.levels.length > 1) rows.push({ label: "Taper", value: `${f(r.taper_mm * 1000, 1)} µm` });
      for (const l of r.levels) for (const o of l.orders) rows.push({ label: `Order ${o.order} at ${f(l.depth_mm, 1)} mm`, value: `${f(o.radialAmplitude_mm * 1000, 1)} µm at ${f(o.phaseDeg, 0)}°` });
      return { ok: true, rows, warnings: r.warnings };
    }
    const r = calculateClearance(preset as ClearanceInput);
    const rows: ResultRow[] = [{ label: "Clearance", value: `${f(r.clearance_mm, 3)} mm (${f(r.clearance_mm / 0.0254, 2)} thou)` }];
    if (r.hotClearance_mm != null) rows.push({ label: "Hot clearance", value: `${f(r.hotClearance_mm, 3)} mm` });
    if (r.perInchOfDiameter != null) rows.push({ label: "Per inch of diameter", value: `${f(r.perInchOfDiameter * 1000, 2)} thou/in` });
    if (r.recommendedGap_mm != null) rows.push({ label: "Recommended gap", value: `${f(r.recommendedGap_mm, 3)} mm` });
    if (r.verdict) rows.push({ label: "Against spec", value: r.verdict === "within" ? "Within spec" : r.verdict === "below" ? "Out of spec (below)" : "Out of spec (above)", tone: r.verdict === "within" ? "ok" : "bad" });
    return { ok: true, rows, warnings: r.warnings };
  } catch (err) {
    return { ok: false, message: (err as Error).message };
  }
}

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
    else if (p !== "value" && p !== "method" && p !== "material" && p !== "thermal" && p !== "spec" && p !== "grip") parts.push(WORDS[p] ?? p);
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
