/**
 * Unit choices and number formatting for the calculator pages. Conversions go through
 * `convert` of app/lib/calc (the contract's factors); nothing here does arithmetic of its own.
 */
import { convert, isUnitCode, unitLabel, type UnitCode } from "~/lib/calc";

export type UnitSystem = "metric" | "inch";

/** The units a selector offers, per quantity kind (a subset of the contract's codes). */
export const UNIT_CHOICES = {
  length: ["mm", "um", "in", "thou"],
  torque: ["N.m", "ft.lbf", "in.lbf"],
  force: ["N", "kN", "lbf"],
  temperature: ["degC", "degF"],
  stress: ["MPa", "GPa", "ksi", "psi"],
} as const satisfies Record<string, readonly UnitCode[]>;

export type ChoiceKind = keyof typeof UNIT_CHOICES;

/** Default units per unit system: "length" for parts (bores, pistons), "small" for clearances and gaps. */
export const DEFAULT_UNITS: Record<
  UnitSystem,
  { length: UnitCode; small: UnitCode; torque: UnitCode; force: UnitCode; temperature: UnitCode; stress: UnitCode; modulus: UnitCode }
> = {
  metric: { length: "mm", small: "mm", torque: "N.m", force: "kN", temperature: "degC", stress: "MPa", modulus: "GPa" },
  inch: { length: "in", small: "thou", torque: "ft.lbf", force: "lbf", temperature: "degF", stress: "ksi", modulus: "ksi" },
};

const INCH_UNITS: ReadonlySet<string> = new Set(["in", "thou", "ft.lbf", "in.lbf", "lbf", "ksi", "psi", "degF"]);

/**
 * The unit system a unit belongs to: a result is shown first in the system of its inputs, not
 * the account's (metric readings in an inch account give millimetres; the other system is a
 * click away).
 */
export function systemOf(unit: string | undefined, fallback: UnitSystem = "metric"): UnitSystem {
  if (!unit || !isUnitCode(unit)) return fallback;
  return INCH_UNITS.has(unit) ? "inch" : "metric";
}

/**
 * Result units that follow an input's unit system: after the person types an input in another
 * system, each named result field shows in that system's default ({ "out.force": "force" }).
 * The person can still pick the other system for a result afterwards.
 */
export function followInputSystem(
  next: Record<string, string>,
  inputUnit: string,
  fields: Record<string, keyof (typeof DEFAULT_UNITS)["metric"]>,
): void {
  const units = DEFAULT_UNITS[systemOf(inputUnit)];
  for (const [field, kind] of Object.entries(fields)) next[field] = units[kind];
}

const DECIMALS: Partial<Record<UnitCode, number>> = {
  mm: 3,
  um: 1,
  in: 4,
  thou: 2,
  m: 5,
  N: 0,
  kN: 2,
  lbf: 0,
  "N.m": 1,
  "ft.lbf": 1,
  "in.lbf": 0,
  MPa: 0,
  GPa: 1,
  ksi: 1,
  psi: 0,
  degC: 0,
  degF: 0,
};

/** Decimals shown for a value in this unit (tabular, so columns line up). */
export function decimalsFor(unit: UnitCode, extra = 0): number {
  return Math.max(0, (DECIMALS[unit] ?? 3) + extra);
}

/**
 * A number with a fixed count of decimals and thousands separators ("76,389"). The value is
 * first taken to 12 significant digits: the server (Node) and the browser compute a result with
 * engines whose sin, cos and atan2 may differ in the last bit, and a phase of exactly 7.5° came out
 * as 7.4999999999999 on one and 7.5000000000001 on the other, shown "7" and "8": the page's text
 * differed between the server's HTML and the browser's first render (React error #418).
 */
export function formatNumber(x: number, decimals: number): string {
  if (!Number.isFinite(x)) return "—";
  const snapped = Number(x.toPrecision(12));
  const v = Math.abs(snapped) < 0.5 * 10 ** -decimals ? 0 : snapped;
  return new Intl.NumberFormat("en-US", { minimumFractionDigits: decimals, maximumFractionDigits: decimals }).format(v);
}

/** Converts `value` from `from` to `to` and formats it (without the unit). */
export function formatIn(value: number, from: UnitCode, to: UnitCode, extraDecimals = 0): string {
  return formatNumber(convert(value, from, to), decimalsFor(to, extraDecimals));
}

/** Converts and formats with the unit label ("76.39 kN"). */
export function formatQ(value: number, from: UnitCode, to: UnitCode, extraDecimals = 0): string {
  return `${formatIn(value, from, to, extraDecimals)} ${unitLabel(to)}`;
}

/** Decimals of a number as it was typed (its shortest text): 88.006 → 3, 81 → 0, 2.5e-3 → 4. */
export function decimalsOf(x: number): number {
  if (!Number.isFinite(x)) return 0;
  const [mantissa, exp] = String(Math.abs(x)).split("e");
  const frac = mantissa.split(".")[1]?.length ?? 0;
  return Math.max(0, frac - Number(exp ?? 0));
}

/** Decimals that show a step of `step` (in the unit shown): 0.136 → 1, 0.0254 → 2, 1.36 → 0. */
function decimalsForStep(step: number): number {
  if (!(step > 0) || !Number.isFinite(step)) return 0;
  return Math.min(9, Math.max(0, Math.ceil(-Math.log10(step) - 1e-9)));
}

/**
 * A value typed in `from`, shown in `to` with the resolution it was measured with: one step of
 * its last typed digit, converted, decides the decimals (81 ft·lbf is 1.36 N·m a step, so
 * "110 N·m", not "109.8212538"), and never fewer than `atLeast` (the spec's own decimals, so a
 * reading lines up with the limits it is compared with). Only the text is rounded: the value
 * kept and checked stays exact. In the unit it was typed in, it reads as typed. `decimals` is
 * how many were typed when known (88.010 is stored as 88.01; app/lib/typed-number.ts).
 */
export function formatMeasured(typed: number, from: UnitCode, to: UnitCode, atLeast = 0, decimals?: number | null): string {
  const own = Math.max(decimalsOf(typed), decimals ?? 0);
  if (from === to) return formatNumber(typed, Math.max(own, atLeast));
  // A step as a difference, so temperatures (with an offset) convert their step, not a point.
  const step = Math.abs(convert(typed + 10 ** -own, from, to) - convert(typed, from, to));
  return formatNumber(convert(typed, from, to), Math.max(decimalsForStep(step), atLeast));
}

/** The decimals a spec is written with (the most of its min, max and nominal). */
export function specDecimals(s: { min?: number | null; max?: number | null; nominal?: number | null }): number {
  return Math.max(0, ...[s.min, s.max, s.nominal].filter((x): x is number => x != null).map(decimalsOf));
}

/** A value given in `from`, rounded for a form field in `to` (defaults in the person's units). */
export function fieldValue(value: number, from: UnitCode, to: UnitCode, extraDecimals = 1, keepZeros = false): string {
  const v = convert(value, from, to);
  const d = decimalsFor(to, extraDecimals);
  return keepZeros ? v.toFixed(d) : String(Number(v.toFixed(d)));
}

/**
 * Parses a typed number: digits with an optional decimal point (a comma is read as a decimal
 * point when there is no point), sign and exponent. Blank gives undefined; junk gives NaN.
 */
export function parseNumber(raw: string | undefined | null): number | undefined {
  if (raw == null) return undefined;
  let s = String(raw)
    .trim()
    .replace(/[\s\u00a0\u2009]/g, "")
    .replace(/\u2212/g, "-");
  if (s === "") return undefined;
  if (!s.includes(".") && /^[-+]?\d+,\d+$/.test(s)) s = s.replace(",", ".");
  if (!/^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(s)) return Number.NaN;
  return Number(s);
}

export { unitLabel };

/**
 * A unit field of a submitted form as a unit code: the form comes back to the page as sent, and
 * a value that is no unit code (a hand-made request) shows in the default unit instead of
 * failing the render.
 */
export function unitOr(v: string | undefined, fallback: UnitCode): UnitCode {
  return isUnitCode(v) ? v : fallback;
}
