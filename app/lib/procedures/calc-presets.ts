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

import type { CalcKind, CalcOutcome, ResultRow } from "./calc-shared";
export {
  CALC_CAUTION,
  CALC_KINDS,
  calcLabel,
  numericLeaves,
  setAtPath,
  type CalcKind,
  type CalcOutcome,
  type NumericLeaf,
  type ResultRow,
} from "./calc-shared";

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

const f = (v: number, digits = 3) =>
  Number.isFinite(v) ? Number(v.toFixed(digits)).toLocaleString("en-GB", { maximumFractionDigits: digits }) : "—";

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
      if (r.percentOfYield != null)
        rows.push({ label: "Of yield", value: `${f(r.percentOfYield, 1)} %`, tone: r.percentOfYield > 90 ? "bad" : "ok" });
      if (r.elongation_mm != null) rows.push({ label: "Elongation (stress-area simplification)", value: `${f(r.elongation_mm, 3)} mm` });
      return { ok: true, rows, warnings: r.warnings };
    }
    if (kind === "distortion") {
      const r = calculateDistortion(preset as DistortionInput);
      const rows: ResultRow[] = r.levels.map((l) => ({
        label: `Out-of-round at ${f(l.depth_mm, 1)} mm`,
        value: `${f(l.outOfRound_mm * 1000, 1)} µm`,
      }));
      if (r.levels.length > 1) rows.push({ label: "Taper", value: `${f(r.taper_mm * 1000, 1)} µm` });
      for (const l of r.levels)
        for (const o of l.orders)
          rows.push({
            label: `Order ${o.order} at ${f(l.depth_mm, 1)} mm`,
            value: `${f(o.radialAmplitude_mm * 1000, 1)} µm at ${f(o.phaseDeg, 0)}°`,
          });
      return { ok: true, rows, warnings: r.warnings };
    }
    const r = calculateClearance(preset as ClearanceInput);
    const input = preset as ClearanceInput;
    // Each verdict names what it judges: the spec judges the cold clearance; the hot one has its own caution.
    const judged = input.kind === "piston-to-wall" ? "Cold clearance" : input.kind === "bearing" ? "Oil clearance" : "Gap";
    const rows: ResultRow[] = [
      {
        label: r.hotClearance_mm != null ? "Cold clearance" : "Clearance",
        value: `${f(r.clearance_mm, 3)} mm (${f(r.clearance_mm / 0.0254, 2)} thou)`,
      },
    ];
    if (r.hotClearance_mm != null)
      rows.push({
        label: "Hot clearance",
        value: `${f(r.hotClearance_mm, 3)} mm${r.hotCaution === "seize" ? " (negative: would seize)" : r.hotCaution === "tight" ? " (near zero: too tight)" : ""}`,
        tone: r.hotCaution ? "bad" : undefined,
      });
    if (r.perInchOfDiameter != null) rows.push({ label: "Per inch of diameter", value: `${f(r.perInchOfDiameter * 1000, 2)} thou/in` });
    if (r.recommendedGap_mm != null) rows.push({ label: "Recommended gap", value: `${f(r.recommendedGap_mm, 3)} mm` });
    if (r.verdict)
      rows.push({
        label: `${judged} against spec`,
        value: r.verdict === "within" ? "Within spec" : r.verdict === "below" ? "Out of spec (below)" : "Out of spec (above)",
        tone: r.verdict === "within" ? "ok" : "bad",
      });
    return { ok: true, rows, warnings: r.warnings };
  } catch (err) {
    return { ok: false, message: (err as Error).message };
  }
}
