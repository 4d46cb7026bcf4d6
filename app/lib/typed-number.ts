/**
 * The resolution a number was typed with. A stored double forgets trailing zeros (88.010 is
 * 88.01), yet the zero says the gauge read to a thousandth; so a reading keeps how many decimals
 * were typed beside its value (`value_decimals`, migration 0026) and is shown with them
 * (`formatMeasured` of app/lib/calc-ui/units.ts). Pure: safe in the browser.
 */

import { decimalsOf } from "~/lib/calc-ui/units";

/** Most decimals kept: past a nanometre in millimetres nothing a shop measures is that fine. */
export const MAX_TYPED_DECIMALS = 12;

/**
 * Decimals of a number as typed: "88.010" → 3, "88,010" → 3 (a decimal comma), "81" → 0,
 * "2.50e-3" → 5. Null for text that is not a plain number.
 */
export function typedDecimals(text: string): number | null {
  const m = /^\s*[-+]?(\d*)(?:[.,](\d*))?(?:e([-+]?\d+))?\s*$/i.exec(text);
  if (!m || (m[1] === "" && !m[2])) return null;
  const decimals = (m[2]?.length ?? 0) - Number(m[3] ?? 0);
  return Math.min(MAX_TYPED_DECIMALS, Math.max(0, decimals));
}

/** The best guess for a number whose typed text is lost: as it reads (88.01 → 2). */
export function guessedDecimals(value: number): number {
  return Math.min(MAX_TYPED_DECIMALS, decimalsOf(value));
}

/** A stored reading as it was typed, for a form field: 88.01 with 3 decimals → "88.010". */
export function typedText(value: number, decimals: number | null | undefined): string {
  if (!Number.isFinite(value)) return "";
  // A value with more digits than the decimals given (a hand-made row) keeps its digits.
  const own = decimalsOf(value);
  const d = decimals == null ? own : Math.max(own, Math.min(MAX_TYPED_DECIMALS, decimals));
  return value.toFixed(d);
}
