// Unit text for test-record pages. Kept apart from parts.tsx so that pages listing records
// (the procedure read page, the shop floor) do not ship the calc module.
import { isUnitCode, unitLabel, type UnitCode } from "~/lib/calc";
import { formatMeasured, specDecimals } from "~/lib/calc-ui/units";
import { typedText } from "~/lib/typed-number";
import { fmtNum } from "./parts";

export function unitText(u: string): string {
  try {
    return unitLabel(u as UnitCode) ?? u;
  } catch {
    return u;
  }
}

export function limitsText(s: { min: number | null; max: number | null; nominal?: number | null; unit: string }): string {
  const u = unitText(s.unit);
  if (s.min != null && s.max != null) return `${fmtNum(s.min)} – ${fmtNum(s.max)} ${u}`;
  if (s.min != null) return `≥ ${fmtNum(s.min)} ${u}`;
  if (s.max != null) return `≤ ${fmtNum(s.max)} ${u}`;
  return s.nominal != null ? `nominal ${fmtNum(s.nominal)} ${u} (no limit)` : "no limit";
}

/**
 * A reading converted into its spec's unit, at the resolution it was typed with (or the spec's,
 * whichever is finer), with the unit: "110 N·m" for 81 ft·lbf. The exact value stays stored.
 */
export function inSpecUnitText(
  r: { valueEntered: number; valueDecimals?: number | null; unitEntered: string },
  s: { unit: string; min: number | null; max: number | null; nominal?: number | null },
): string {
  if (!isUnitCode(r.unitEntered) || !isUnitCode(s.unit)) return "—";
  return `${formatMeasured(r.valueEntered, r.unitEntered, s.unit, specDecimals(s), r.valueDecimals)} ${unitText(s.unit)}`;
}

/** A reading in the unit it was typed in, at the resolution typed: "88.010 mm". */
export function typedReadingText(r: { valueEntered: number; valueDecimals?: number | null; unitEntered: string }): string {
  const shown = isUnitCode(r.unitEntered)
    ? formatMeasured(r.valueEntered, r.unitEntered, r.unitEntered, 0, r.valueDecimals)
    : typedText(r.valueEntered, r.valueDecimals);
  return `${shown} ${unitText(r.unitEntered)}`;
}
