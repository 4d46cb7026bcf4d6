/**
 * The Preload form: its fields (named after the input JSON's paths), defaults in the person's
 * units, and the one function that turns the typed values into the calculator's input and
 * result. The page runs it in the browser as the person types and in its action without JS.
 */
import {
  NUT_FACTOR_PRESETS,
  PROPERTY_CLASS_IDS,
  STEEL_MODULUS_GPA,
  calculatePreload,
  fitNutFactor,
  toSI,
  type NutFactorFit,
  type UnitCode,
  type PreloadResult,
  type ThreadGeometry,
} from "~/lib/calc";
import { DEFAULT_UNITS, fieldValue, parseNumber, type UnitSystem } from "./units";
import { readQuantity, runChecked, zodIssues, type FieldErrors, type FormValues, type Outcome } from "./outcome";

export interface PreloadOutcome extends Outcome<PreloadResult> {
  /** The nut-factor fit of the measured points, when there are any. */
  fit?: NutFactorFit;
  /** The measured points in SI (torque N·m, preload N), for the chart. */
  points?: { torque_Nm: number; preload_N: number }[];
}

/** Defaults for the demo scenario (M12×1.5 head studs, moly paste), in the person's units. */
export function preloadDefaults(system: UnitSystem): FormValues {
  const u = DEFAULT_UNITS[system];
  const moly = NUT_FACTOR_PRESETS.find((p) => p.condition === "moly-paste")!;
  return {
    thread: "M12x1.5",
    direction: "torque-to-preload",
    "torque.value": fieldValue(110, "N.m", u.torque, -1),
    "torque.unit": u.torque,
    "preload.value": fieldValue(70, "kN", u.force, -1),
    "preload.unit": u.force,
    "method.kind": "nut-factor",
    nutCondition: moly.condition,
    "method.k": String(moly.k),
    "method.muThread": "0.10",
    "method.muHead": "0.10",
    "method.headDiameter.value": fieldValue(17, "mm", u.length, system === "inch" ? -1 : -2),
    "method.headDiameter.unit": u.length,
    materialChoice: "12.9",
    "material.yieldStrength.value": fieldValue(1100, "MPa", u.stress, 0),
    "material.yieldStrength.unit": u.stress,
    "grip.on": "",
    "grip.length.value": fieldValue(100, "mm", u.length, system === "inch" ? -1 : -3),
    "grip.length.unit": u.length,
    "grip.modulus.value": "",
    "grip.modulus.unit": u.modulus,
    points: "",
    "points.torqueUnit": u.torque,
    "points.forceUnit": u.force,
    "out.force": u.force,
    "out.torque": u.torque,
    "out.stress": u.stress,
    "out.length": system === "inch" ? "thou" : "mm",
  };
}

/** Form field of an input path (the fields are named after the paths, with a few pickers). */
function fieldOf(path: string): string {
  if (path.startsWith("material.propertyClass") || path === "material") return "materialChoice";
  if (path.startsWith("material.yieldStrength")) return "material.yieldStrength.value";
  if (path === "torque") return "torque.value";
  if (path === "preload") return "preload.value";
  if (path === "method.kind") return "method.kind";
  if (path.endsWith(".unit")) return path.replace(/\.unit$/, ".value");
  return path;
}

/** Reads "torque, clamp load" lines (comma, tab, semicolon or spaces between the two). */
export function parsePointLines(text: string): { rows: [number, number][]; error?: string } {
  const rows: [number, number][] = [];
  const lines = text.split(/\r?\n/);
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i].trim();
    if (!line || line.startsWith("#")) continue;
    const parts = line.split(/[\t;]+|,\s+|\s+|,(?=\S)/).filter(Boolean);
    if (parts.length !== 2) return { rows, error: `Line ${i + 1}: give two numbers, torque and clamp load.` };
    const a = parseNumber(parts[0]);
    const b = parseNumber(parts[1]);
    if (a === undefined || b === undefined || Number.isNaN(a) || Number.isNaN(b)) {
      // A header line ("torque, load") is fine as the first line.
      if (rows.length === 0 && /[a-z]/i.test(line) && i === lines.findIndex((l) => l.trim() !== "")) continue;
      return { rows, error: `Line ${i + 1}: "${line.slice(0, 40)}" is not two numbers.` };
    }
    rows.push([a, b]);
  }
  return { rows };
}

/** Turns the typed values into the Preload input, result, fit and field errors. */
export function runPreloadForm(values: FormValues): PreloadOutcome {
  const errors: FieldErrors = {};
  const direction = values.direction === "preload-to-torque" ? "preload-to-torque" : "torque-to-preload";
  const input: Record<string, unknown> = { thread: (values.thread ?? "").trim(), direction };
  if (direction === "torque-to-preload") input.torque = readQuantity(values, "torque", errors, true, parseNumber);
  else input.preload = readQuantity(values, "preload", errors, true, parseNumber);

  if (values["method.kind"] === "friction") {
    const muThread = parseNumber(values["method.muThread"]);
    const muHead = parseNumber(values["method.muHead"]);
    if (muThread === undefined || Number.isNaN(muThread)) errors["method.muThread"] = "Enter the thread friction coefficient.";
    if (muHead === undefined || Number.isNaN(muHead)) errors["method.muHead"] = "Enter the head friction coefficient.";
    input.method = {
      kind: "friction",
      muThread,
      muHead,
      headDiameter: readQuantity(values, "method.headDiameter", errors, true, parseNumber),
    };
  } else {
    const preset = NUT_FACTOR_PRESETS.find((p) => p.condition === values.nutCondition);
    let k = preset?.k;
    if (k === undefined) {
      k = parseNumber(values["method.k"]);
      if (k === undefined || Number.isNaN(k)) errors["method.k"] = "Enter the nut factor K.";
    }
    input.method = { kind: "nut-factor", k };
  }

  const mc = values.materialChoice ?? "";
  if ((PROPERTY_CLASS_IDS as readonly string[]).includes(mc)) input.material = { propertyClass: mc };
  else if (mc === "yield") input.material = { yieldStrength: readQuantity(values, "material.yieldStrength", errors, true, parseNumber) };

  if (values["grip.on"] === "on") {
    const grip: Record<string, unknown> = { length: readQuantity(values, "grip.length", errors, true, parseNumber) };
    const modulus = readQuantity(values, "grip.modulus", errors, false, parseNumber);
    if (modulus) grip.modulus = modulus;
    input.grip = grip;
  }

  const out: PreloadOutcome = runChecked(calculatePreload, input, errors, fieldOf);

  // Measured points: fitted with fitNutFactor on the same thread.
  const text = values.points ?? "";
  if (text.trim()) {
    const { rows, error } = parsePointLines(text);
    if (error) out.errors.points = error;
    else if (rows.length > 0 && out.result) {
      const tu = values["points.torqueUnit"] ?? "N.m";
      const fu = values["points.forceUnit"] ?? "kN";
      const pts = rows.map(([t, f]) => ({ torque: { value: t, unit: tu }, preload: { value: f, unit: fu } }));
      try {
        out.fit = fitNutFactor(pts as never, input.thread as string);
        out.points = rows.map(([t, f]) => ({ torque_Nm: toSI(t, tu as UnitCode), preload_N: toSI(f, fu as UnitCode) }));
      } catch (err) {
        const issues = zodIssues(err);
        if (!issues) throw err;
        const i = issues[0];
        const m = /^points\.(\d+)/.exec(i.path);
        out.errors.points = m ? `Line ${Number(m[1]) + 1}: ${i.message}` : i.message;
      }
    }
  }
  return out;
}

/** The modulus used when the grip has none (for the page's explanation). */
export const DEFAULT_MODULUS_GPA = STEEL_MODULUS_GPA;

/**
 * The name of `d3_mm` on the page. For a metric thread it is the minor diameter; for a Unified
 * thread it holds D − 1.299038·P, the second diameter of ASME B1.1's stress-area formula, below
 * the thread's basic minor diameter (app/lib/calc/threads.ts).
 */
export function d3Label(system: ThreadGeometry["system"]): string {
  return system === "unified" ? "Stress-area diameter D − 1.299038·P" : "Minor diameter d3 = d − 1.226869·P";
}

/** Why the Unified thread's second diameter is not called its minor diameter, for under the table. */
export const UNIFIED_STRESS_AREA_NOTE =
  "ASME B1.1's stress area 0.7854·(D − 0.9743·P)² is π/4 times the square of the mean of the pitch diameter d2 and D − 1.299038·P. That diameter is a term of the formula: it lies below the basic minor diameter D − 1.082532·P.";
