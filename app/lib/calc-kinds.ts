/**
 * The calculators Benchreel has, in one place: their ids, their names and the caution every
 * place that shows a calculated number carries (calculator pages, procedure calculator blocks,
 * test records, the nut-factor chart). Plain data, no math, so any page can import it cheaply.
 */
export const CALC_KINDS = ["preload", "distortion", "clearance"] as const;
export type CalcKind = (typeof CALC_KINDS)[number];

export const CALC_CAUTION =
  "Estimates for planning and checking. The fastener maker's and the engine maker's published values take precedence; follow local codes and licensed practice.";

const LABELS: Record<CalcKind, string> = { preload: "Preload", distortion: "Bore distortion", clearance: "Clearances" };

export function calcLabel(kind: CalcKind | undefined): string {
  return kind ? LABELS[kind] : "Calculator";
}

/** Where each calculator's page is. */
export const calcPath = (kind: CalcKind): string => `/calculators/${kind}`;
