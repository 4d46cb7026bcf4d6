import { convert, unitKind, unitLabel, type UnitCode, type UnitKind } from "~/lib/calc";
import { formatMeasured } from "~/lib/calc-ui/units";

/** The unit in the other system that a reader of that system would use. */
const COUNTERPART: Record<UnitKind, { metric: UnitCode; inch: UnitCode }> = {
  length: { metric: "mm", inch: "in" },
  force: { metric: "kN", inch: "lbf" },
  torque: { metric: "N.m", inch: "ft.lbf" },
  stress: { metric: "MPa", inch: "psi" },
  temperature: { metric: "degC", inch: "degF" },
};
const INCH_UNITS = new Set(["in", "thou", "lbf", "ft.lbf", "in.lbf", "psi", "ksi", "degF"]);

export function isInchUnit(unit: string): boolean {
  return INCH_UNITS.has(unit);
}

/** Four significant figures, trailing zeros kept for inch lengths under 1 (0.0030 in). */
export function formatNumber(value: number, unit: string): string {
  if (!Number.isFinite(value)) return "—";
  if (unit === "in" && Math.abs(value) < 1) return value.toFixed(4);
  if (unit === "mm" && Math.abs(value) < 10) return value.toFixed(3);
  const abs = Math.abs(value);
  const digits = abs >= 1000 ? 0 : abs >= 100 ? 1 : abs >= 10 ? 2 : 3;
  return value.toFixed(digits);
}

export function otherUnit(unit: string): UnitCode | null {
  const kind = unitKind(unit);
  if (!kind) return null;
  return isInchUnit(unit) ? COUNTERPART[kind].metric : COUNTERPART[kind].inch;
}

const label = (u: string) => {
  try {
    return unitLabel(u as UnitCode);
  } catch {
    return u;
  }
};

/**
 * "110 N·m (81.1 ft·lbf)": a reading as it was typed (`decimals`: the digits typed, so 88.010
 * stays 88.010) and in the other system at the same resolution, by the one formatter of shown
 * numbers. Without thousands separators: a person searching types 11465, not 11,465.
 */
export function bothSystems(value: number, unit: string, decimals?: number | null): string {
  const plain = (s: string) => s.replace(/,/g, "");
  const other = otherUnit(unit);
  const first = `${plain(formatMeasured(value, unit as UnitCode, unit as UnitCode, 0, decimals))} ${label(unit)}`;
  if (!other) return first;
  return `${first} (${plain(formatMeasured(value, unit as UnitCode, other, 0, decimals))} ${label(other)})`;
}

/** "0.0030–0.0035 in (0.076–0.089 mm)" for a spec's limits. */
export function limitsBothSystems(spec: { min: number | null; max: number | null; nominal: number | null; unit: string }): string {
  const other = otherUnit(spec.unit);
  const fmt = (u: string, conv: (v: number) => number) => {
    const f = (v: number) => formatNumber(conv(v), u);
    if (spec.min != null && spec.max != null) return `${f(spec.min)}–${f(spec.max)} ${label(u)}`;
    if (spec.min != null) return `min ${f(spec.min)} ${label(u)}`;
    if (spec.max != null) return `max ${f(spec.max)} ${label(u)}`;
    if (spec.nominal != null) return `${f(spec.nominal)} ${label(u)}`;
    return "";
  };
  const first = fmt(spec.unit, (v) => v);
  if (!other || !first) return first;
  return `${first} (${fmt(other, (v) => convert(v, spec.unit, other))})`;
}
