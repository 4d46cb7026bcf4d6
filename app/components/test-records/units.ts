// Unit text for test-record pages. Kept apart from parts.tsx so that pages listing records
// (the procedure read page, the shop floor) do not ship the calc module.
import { unitLabel, type UnitCode } from "~/lib/calc";
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

