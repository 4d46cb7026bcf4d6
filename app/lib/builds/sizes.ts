import { fromSI, unitLabel, type UnitCode } from "~/lib/calc/units";
import { formatMeasured } from "~/lib/calc-ui/units";
import { typedText } from "~/lib/typed-number";

// A build's bore and stroke as they were typed, and in the other system at the equivalent
// resolution ("86.00 mm (3.3858 in)"). Pure: shared by the pages, the sheet and the API.

type Stored = { m: number | null; unit: string | null; decimals: number | null };

/** The number as typed, for the edit form ("86.00"), or "". */
export function sizeFieldText(s: Stored): string {
  if (s.m == null || !s.unit) return "";
  return typedText(fromSI(s.m, s.unit as UnitCode), s.decimals);
}

/** "86.00 mm (3.3858 in)", or null when not given. */
export function sizeText(s: Stored): string | null {
  if (s.m == null || !s.unit) return null;
  const unit = s.unit as UnitCode;
  const other: UnitCode = unit === "mm" ? "in" : "mm";
  const typed = fromSI(s.m, unit);
  return `${formatMeasured(typed, unit, unit, 0, s.decimals)} ${unitLabel(unit)} (${formatMeasured(typed, unit, other, 0, s.decimals)} ${unitLabel(other)})`;
}

export const boreOf = (b: { boreM: number | null; boreUnit: string | null; boreDecimals: number | null }): Stored => ({
  m: b.boreM,
  unit: b.boreUnit,
  decimals: b.boreDecimals,
});

export const strokeOf = (b: { strokeM: number | null; strokeUnit: string | null; strokeDecimals: number | null }): Stored => ({
  m: b.strokeM,
  unit: b.strokeUnit,
  decimals: b.strokeDecimals,
});
