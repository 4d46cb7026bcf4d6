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
export const DEFAULT_UNITS: Record<UnitSystem, { length: UnitCode; small: UnitCode; torque: UnitCode; force: UnitCode; temperature: UnitCode; stress: UnitCode; modulus: UnitCode }> = {
  metric: { length: "mm", small: "mm", torque: "N.m", force: "kN", temperature: "degC", stress: "MPa", modulus: "GPa" },
  inch: { length: "in", small: "thou", torque: "ft.lbf", force: "lbf", temperature: "degF", stress: "ksi", modulus: "ksi" },
};

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

/** A number with a fixed count of decimals and thousands separators ("76,389"). */
export function formatNumber(x: number, decimals: number): string {
  if (!Number.isFinite(x)) return "—";
  const v = Math.abs(x) < 0.5 * 10 ** -decimals ? 0 : x;
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
  let s = String(raw).trim().replace(/[\s\u00a0\u2009]/g, "").replace(/\u2212/g, "-");
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
