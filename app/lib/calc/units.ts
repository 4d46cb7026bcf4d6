/**
 * Units: the contract's ASCII unit codes, their kinds, display labels and the exact or
 * NIST SP 811 (2008 ed., Appendix B) conversion factors. Everything inside the module is SI.
 */
import { failWith } from "./errors";

/** The physical kinds a quantity can have. */
export type UnitKind = "length" | "force" | "torque" | "stress" | "temperature";

/** Every unit code the module accepts, by kind (ASCII, case-sensitive, as in the contract). */
export const UNIT_CODES = {
  length: ["m", "mm", "um", "in", "thou"],
  force: ["N", "kN", "lbf"],
  torque: ["N.m", "ft.lbf", "in.lbf"],
  stress: ["Pa", "kPa", "MPa", "GPa", "psi", "ksi", "bar"],
  temperature: ["degC", "degF", "K"],
} as const satisfies Record<UnitKind, readonly string[]>;

/** A length unit code. */
export type LengthUnit = (typeof UNIT_CODES.length)[number];
/** A force unit code. */
export type ForceUnit = (typeof UNIT_CODES.force)[number];
/** A torque unit code. */
export type TorqueUnit = (typeof UNIT_CODES.torque)[number];
/** A stress or pressure unit code. */
export type StressUnit = (typeof UNIT_CODES.stress)[number];
/** A temperature unit code. */
export type TemperatureUnit = (typeof UNIT_CODES.temperature)[number];
/** Any unit code of the contract. */
export type UnitCode = LengthUnit | ForceUnit | TorqueUnit | StressUnit | TemperatureUnit;

/** The SI unit each kind is held in inside the module. */
export const SI_UNIT: Record<UnitKind, UnitCode> = {
  length: "m",
  force: "N",
  torque: "N.m",
  stress: "Pa",
  temperature: "K",
};

// Exact definitions: 1 in = 0.0254 m (exact, NIST SP 811 B.8); 1 lbf = 4.4482216152605 N
// (exact from 1 lbm = 0.45359237 kg and g_n = 9.80665 m/s²; SP 811 B.8 rounds it to
// 4.448 222). Derived factors are computed from these, not rounded.
const INCH_M = 0.0254;
const LBF_N = 4.4482216152605;

interface UnitInfo {
  kind: UnitKind;
  /** Multiply a value in this unit by `factor` to get SI (not used for temperatures). */
  factor: number;
  /** Display label for the UI. */
  label: string;
  /** Plain-words name. */
  name: string;
}

const UNITS: Record<UnitCode, UnitInfo> = {
  m: { kind: "length", factor: 1, label: "m", name: "metre" },
  mm: { kind: "length", factor: 1e-3, label: "mm", name: "millimetre" },
  um: { kind: "length", factor: 1e-6, label: "µm", name: "micrometre" },
  in: { kind: "length", factor: INCH_M, label: "in", name: "inch" },
  thou: { kind: "length", factor: INCH_M / 1000, label: "thou", name: "thousandth of an inch (mil)" },
  N: { kind: "force", factor: 1, label: "N", name: "newton" },
  kN: { kind: "force", factor: 1e3, label: "kN", name: "kilonewton" },
  lbf: { kind: "force", factor: LBF_N, label: "lbf", name: "pound-force" },
  "N.m": { kind: "torque", factor: 1, label: "N·m", name: "newton metre" },
  "ft.lbf": { kind: "torque", factor: 0.3048 * LBF_N, label: "ft·lbf", name: "foot pound-force" },
  "in.lbf": { kind: "torque", factor: INCH_M * LBF_N, label: "in·lbf", name: "inch pound-force" },
  Pa: { kind: "stress", factor: 1, label: "Pa", name: "pascal" },
  kPa: { kind: "stress", factor: 1e3, label: "kPa", name: "kilopascal" },
  MPa: { kind: "stress", factor: 1e6, label: "MPa", name: "megapascal" },
  GPa: { kind: "stress", factor: 1e9, label: "GPa", name: "gigapascal" },
  psi: { kind: "stress", factor: LBF_N / (INCH_M * INCH_M), label: "psi", name: "pound-force per square inch" },
  ksi: { kind: "stress", factor: (1000 * LBF_N) / (INCH_M * INCH_M), label: "ksi", name: "kilopound-force per square inch" },
  bar: { kind: "stress", factor: 1e5, label: "bar", name: "bar" },
  degC: { kind: "temperature", factor: 1, label: "°C", name: "degree Celsius" },
  degF: { kind: "temperature", factor: 5 / 9, label: "°F", name: "degree Fahrenheit" },
  K: { kind: "temperature", factor: 1, label: "K", name: "kelvin" },
};

/** Unit codes per kind with their display labels, for unit selectors in the UI. */
export const UNIT_OPTIONS: Record<UnitKind, { code: UnitCode; label: string; name: string }[]> = {
  length: UNIT_CODES.length.map((code) => ({ code, label: UNITS[code].label, name: UNITS[code].name })),
  force: UNIT_CODES.force.map((code) => ({ code, label: UNITS[code].label, name: UNITS[code].name })),
  torque: UNIT_CODES.torque.map((code) => ({ code, label: UNITS[code].label, name: UNITS[code].name })),
  stress: UNIT_CODES.stress.map((code) => ({ code, label: UNITS[code].label, name: UNITS[code].name })),
  temperature: UNIT_CODES.temperature.map((code) => ({ code, label: UNITS[code].label, name: UNITS[code].name })),
};

/** Display label of a unit code ("N.m" → "N·m", "um" → "µm"). */
export function unitLabel(code: UnitCode): string {
  return UNITS[code].label;
}

/** True when `code` is one of the contract's unit codes. */
export function isUnitCode(code: unknown): code is UnitCode {
  return typeof code === "string" && Object.hasOwn(UNITS, code);
}

/** The kind of a unit code, or undefined for an unknown code. */
export function unitKind(code: string): UnitKind | undefined {
  return isUnitCode(code) ? UNITS[code].kind : undefined;
}

/** Value in `unit` → SI value (m, N, N·m, Pa, K). Temperatures are affine. No validation. */
export function toSI(value: number, unit: UnitCode): number {
  switch (unit) {
    case "degC":
      return value + 273.15;
    case "degF":
      return ((value + 459.67) * 5) / 9;
    default:
      return value * UNITS[unit].factor;
  }
}

/** SI value (m, N, N·m, Pa, K) → value in `unit`. Temperatures are affine. No validation. */
export function fromSI(value: number, unit: UnitCode): number {
  switch (unit) {
    case "degC":
      return value - 273.15;
    case "degF":
      return (value * 9) / 5 - 459.67;
    default:
      return value / UNITS[unit].factor;
  }
}

/**
 * Converts `value` from one unit code to another of the same kind (temperatures affine:
 * degC, degF, K). Throws a ZodError on an unknown code, on units of different kinds, on
 * a non-finite value or result, or on a temperature below absolute zero.
 */
export function convert(value: number, fromUnit: string, toUnit: string): number {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    failWith(["value"], "value must be a finite number");
  }
  if (!isUnitCode(fromUnit)) failWith(["fromUnit"], `unknown unit code "${String(fromUnit)}"`);
  if (!isUnitCode(toUnit)) failWith(["toUnit"], `unknown unit code "${String(toUnit)}"`);
  const from = UNITS[fromUnit as UnitCode];
  const to = UNITS[toUnit as UnitCode];
  if (from.kind !== to.kind) {
    failWith(["toUnit"], `cannot convert ${from.kind} (${fromUnit}) to ${to.kind} (${toUnit})`);
  }
  const si = toSI(value, fromUnit as UnitCode);
  // Thermodynamic temperature cannot be negative: 0 K = −273.15 °C = −459.67 °F (SI Brochure,
  // 9th ed., 2.3.4, Table 4, t/°C = T/K − 273.15; NIST SP 811 (2008), 4.2.1.1 and B.8). A colder
  // value is a typing error, not a temperature, even when nothing is converted.
  if (from.kind === "temperature" && si < 0) {
    failWith(["value"], `temperature below absolute zero (0 K = −273.15 °C = −459.67 °F): ${value} ${from.label}`);
  }
  if (fromUnit === toUnit) return value;
  const out = fromSI(si, toUnit as UnitCode);
  if (!Number.isFinite(out)) failWith(["value"], "conversion overflows");
  return out;
}
