/**
 * The Bore distortion form: a grid of readings (depths down, angles across) for the measured
 * state and, optionally, a compared state; defaults for the demo's 88.0 mm bores; and the one
 * function that turns the typed values into the calculator's input and result.
 */
import { calculateDistortion, type DistortionResult } from "~/lib/calc";
import { DEFAULT_UNITS, fieldValue, parseNumber, systemOf, type UnitSystem } from "./units";
import { readQuantity, runChecked, type FieldErrors, type FormValues, type Outcome } from "./outcome";

export const MAX_DEPTHS = 12;
export const MAX_ANGLES = 24;

export interface DistortionOutcome extends Outcome<DistortionResult> {
  depths: number[];
  angles: number[];
  /** Cells left blank (not sent to the calculator). */
  blank: number;
}

export const DEFAULT_ANGLES = {
  diametral: "0, 30, 60, 90, 120, 150",
  radial: "0, 30, 60, 90, 120, 150, 180, 210, 240, 270, 300, 330",
} as const;

// Invented readings for an 88.0 mm iron-lined bore, two-point gauge, 1 µm resolution:
// with the torque plate on (the main state) and free (the compared state).
const DEMO_DEPTHS_MM = [12, 45, 80];
const DEMO_PLATE = [
  [88.012, 88.012, 88.003, 88.0, 87.997, 88.0],
  [88.012, 88.012, 88.007, 88.005, 88.002, 88.004],
  [88.007, 88.007, 88.006, 88.005, 88.002, 88.003],
];
const DEMO_FREE = [
  [88.008, 88.008, 88.01, 88.011, 88.009, 88.007],
  [88.008, 88.009, 88.01, 88.011, 88.009, 88.007],
  [88.007, 88.008, 88.009, 88.009, 88.008, 88.007],
];

export function distortionDefaults(system: UnitSystem): FormValues {
  const u = DEFAULT_UNITS[system];
  const v: FormValues = {
    mode: "diametral",
    depths: DEMO_DEPTHS_MM.map((d) => fieldValue(d, "mm", u.length, system === "inch" ? -1 : -3)).join(", "),
    "depth.unit": u.length,
    angles: DEFAULT_ANGLES.diametral,
    "reading.unit": u.length,
    "reference.value": fieldValue(88, "mm", u.length, system === "inch" ? 1 : 0, true),
    "reference.unit": u.length,
    "compare.on": "on",
    "label.main": "Torque plate on",
    "label.compare": "Free",
    "out.small": system === "inch" ? "thou" : "um",
    "out.length": u.length,
  };
  DEMO_PLATE.forEach((row, i) =>
    row.forEach((d, j) => (v[`m.${i}.${j}`] = fieldValue(d, "mm", u.length, system === "inch" ? 1 : 0, true))),
  );
  DEMO_FREE.forEach((row, i) => row.forEach((d, j) => (v[`c.${i}.${j}`] = fieldValue(d, "mm", u.length, system === "inch" ? 1 : 0, true))));
  return v;
}

/** Result units in the readings' own system: sizes in mm or in, deviations in µm or thou. */
export function resultUnitsOfReadings(values: FormValues): FormValues {
  const system = systemOf(values["reading.unit"]);
  return { ...values, "out.length": DEFAULT_UNITS[system].length, "out.small": system === "inch" ? "thou" : "um" };
}

/** A list of numbers typed as "12, 45, 80" (commas, semicolons or spaces). */
export function parseList(text: string | undefined, what: string, max: number): { list: number[]; error?: string } {
  const parts = (text ?? "").split(/[,;\s]+/).filter(Boolean);
  if (parts.length === 0) return { list: [], error: `Enter the ${what}.` };
  if (parts.length > max) return { list: [], error: `At most ${max} ${what}.` };
  const list: number[] = [];
  for (const p of parts) {
    const n = parseNumber(p);
    if (n === undefined || Number.isNaN(n)) return { list: [], error: `"${p}" is not a number.` };
    list.push(n);
  }
  return { list };
}

export function runDistortionForm(values: FormValues): DistortionOutcome {
  const errors: FieldErrors = {};
  const mode = values.mode === "radial" ? "radial" : "diametral";
  const key = mode === "radial" ? "radius" : "diameter";
  const d = parseList(values.depths, "depths", MAX_DEPTHS);
  const a = parseList(values.angles, "angles", MAX_ANGLES);
  if (d.error) errors.depths = d.error;
  if (a.error) errors.angles = a.error;
  const depthUnit = values["depth.unit"] ?? "mm";
  const unit = values["reading.unit"] ?? "mm";
  const compare = values["compare.on"] === "on";
  let blank = 0;

  const cellsMain: string[] = [];
  const cellsCompare: string[] = [];
  const readingsOf = (prefix: "m" | "c", cells: string[]) => {
    const out: unknown[] = [];
    d.list.forEach((depth, i) =>
      a.list.forEach((angleDeg, j) => {
        const name = `${prefix}.${i}.${j}`;
        const n = parseNumber(values[name]);
        if (n === undefined) {
          blank++;
          return;
        }
        if (Number.isNaN(n)) {
          errors[name] = "Not a number.";
          return;
        }
        cells.push(name);
        out.push({ depth: { value: depth, unit: depthUnit }, angleDeg, [key]: { value: n, unit } });
      }),
    );
    return out;
  };
  const input: Record<string, unknown> = { mode, readings: readingsOf("m", cellsMain) };
  const reference = readQuantity(values, "reference", errors, false, parseNumber);
  if (reference) input.reference = reference;
  if (compare) input.compareTo = { mode, readings: readingsOf("c", cellsCompare) };
  if (!errors.depths && !errors.angles && (input.readings as unknown[]).length === 0 && !Object.keys(errors).length)
    errors.grid = "Type at least one reading.";

  const fieldOf = (path: string): string => {
    let m = /^readings\.(\d+)/.exec(path);
    if (m) return cellsMain[Number(m[1])] ?? "grid";
    m = /^compareTo\.readings\.(\d+)/.exec(path);
    if (m) return cellsCompare[Number(m[1])] ?? "grid";
    if (path === "readings" || path.startsWith("compareTo")) return "grid";
    if (path.startsWith("reference")) return "reference.value";
    return path;
  };
  const out = runChecked(calculateDistortion, input, errors, fieldOf);
  // A depth or angle problem is reported on the cell; say it once at the list too.
  for (const [f, msg] of Object.entries(out.errors)) {
    if (/^[mc]\.\d+\.\d+$/.test(f) && /depth/i.test(msg)) out.errors.depths ??= msg;
    if (/^[mc]\.\d+\.\d+$/.test(f) && /angle/i.test(msg)) out.errors.angles ??= msg;
  }
  return { ...out, depths: d.list, angles: a.list, blank };
}

/**
 * Shape of the bore along its depth from the level means: "barrel" when the middle levels are
 * wider than the straight line from top to bottom, "hourglass" when narrower, "straight"
 * otherwise (within `tolerance_mm`). Needs three or more levels.
 */
export function profileShape(
  levels: { depth_mm: number; meanDiameter_mm: number }[],
  tolerance_mm = 0.001,
): { shape: "barrel" | "hourglass" | "straight" | "unknown"; bulge_mm: number } {
  if (levels.length < 3) return { shape: "unknown", bulge_mm: 0 };
  const first = levels[0];
  const last = levels[levels.length - 1];
  const span = last.depth_mm - first.depth_mm;
  if (!(span > 0)) return { shape: "unknown", bulge_mm: 0 };
  let bulge = 0;
  for (const l of levels.slice(1, -1)) {
    const line = first.meanDiameter_mm + ((l.depth_mm - first.depth_mm) / span) * (last.meanDiameter_mm - first.meanDiameter_mm);
    const dev = l.meanDiameter_mm - line;
    if (Math.abs(dev) > Math.abs(bulge)) bulge = dev;
  }
  if (bulge > tolerance_mm) return { shape: "barrel", bulge_mm: bulge };
  if (bulge < -tolerance_mm) return { shape: "hourglass", bulge_mm: bulge };
  return { shape: "straight", bulge_mm: bulge };
}
