/**
 * What the Clearances page shows of a result, worked out apart from how it is drawn: which
 * figure is judged and its verdict in words, the hot clearance's own caution, the markers and
 * band of the chart (the spec, else the shop guidance for ring gaps), the material choices,
 * and the edits that keep related fields in step.
 */
import {
  MATERIALS,
  OIL_CLEARANCE_RULE,
  RING_GAP_BAND_FACTOR,
  RING_GAP_FACTORS,
  toSI,
  type ClearanceResult,
  type UnitCode,
} from "~/lib/calc";
import type { ClearanceOutcome } from "./clearance-form";
import type { FormValues } from "./outcome";
import { followInputSystem, formatNumber } from "./units";

type Q = { value: number; unit: string };
type Input = { kind?: string; spec?: { min?: Q; max?: Q }; journal?: Q; bore?: Q; measuredGap?: Q };

/** A value on the clearance chart. */
export interface Marker {
  label: string;
  value_mm: number;
  tone: "cold" | "hot" | "bad";
}

export const HOT_CAUTION_TEXT: Record<NonNullable<ClearanceResult["hotCaution"]>, string> = {
  seize: "Hot clearance negative: the piston would seize",
  tight: "Hot clearance near zero: too tight to run",
};

const mmOf = (q?: Q) => (q ? toSI(q.value, q.unit as UnitCode) * 1000 : undefined);

/** What a clearance verdict judges, named in its words ("Cold clearance within spec"). */
export function judgedOf(kind: string | undefined, input: unknown): string {
  if (kind === "piston-to-wall") return "Cold clearance";
  if (kind === "bearing") return "Oil clearance";
  return (input as Input | undefined)?.measuredGap ? "Measured gap" : "Recommended gap";
}

export const isOutOfSpec = (r: ClearanceResult): boolean => r.verdict === "below" || r.verdict === "above";

/** The verdict and the hot caution in one line, for the strip that follows the form on a tablet. */
export function peekNote(outcome: ClearanceOutcome): string | undefined {
  const r = outcome.result;
  if (!r) return undefined;
  const out = isOutOfSpec(r);
  const judged = judgedOf(outcome.kind, outcome.input);
  return (
    [
      r.verdict ? `${judged} ${out ? `out of spec (${r.verdict})` : "within spec"}` : null,
      r.hotCaution ? HOT_CAUTION_TEXT[r.hotCaution] : null,
    ]
      .filter(Boolean)
      .join(" · ") || undefined
  );
}

/** The result in words and on the chart: what is judged and how, the markers, and the band they are judged against. */
export function clearanceView(outcome: ClearanceOutcome & { result: ClearanceResult }) {
  const r = outcome.result;
  const kind = outcome.kind;
  const input = (outcome.input ?? {}) as Input;
  const out = isOutOfSpec(r);
  const hotBad = r.hotCaution !== undefined;
  const judged = judgedOf(kind, input);
  const measured = input.measuredGap !== undefined;
  const markers: Marker[] = [];
  let band: { min_mm?: number; max_mm?: number } | undefined = input.spec
    ? { min_mm: mmOf(input.spec.min), max_mm: mmOf(input.spec.max) }
    : undefined;
  let bandLabel = "Spec";
  if (kind === "piston-to-wall") {
    markers.push({ label: "Cold", value_mm: r.clearance_mm, tone: out ? "bad" : "cold" });
    if (r.hotClearance_mm !== undefined) markers.push({ label: "Hot", value_mm: r.hotClearance_mm, tone: hotBad ? "bad" : "hot" });
  } else if (kind === "bearing") {
    markers.push({ label: "Oil clearance", value_mm: r.clearance_mm, tone: out ? "bad" : "cold" });
    markers.push({
      label: "Shop guidance, 0.001 in per in",
      value_mm: (mmOf(input.journal) ?? 0) * OIL_CLEARANCE_RULE.perInchOfDiameter,
      tone: "hot",
    });
  } else {
    markers.push({ label: "Recommended", value_mm: r.recommendedGap_mm!, tone: "hot" });
    if (measured) markers.push({ label: "Measured", value_mm: r.clearance_mm, tone: out ? "bad" : "cold" });
    if (!band) {
      band = { min_mm: r.recommendedGap_mm, max_mm: r.recommendedGap_mm! * RING_GAP_BAND_FACTOR };
      bandLabel = "Shop guidance band";
    }
  }
  const verdict = r.verdict
    ? `${out ? `${judged} out of spec: ${r.verdict} the ${r.verdict === "below" ? "minimum" : "maximum"}` : `${judged} within spec`}${kind === "ring-gap" && !input.spec ? " (against the shop guidance band)" : ""}`
    : undefined;
  return {
    kind,
    out,
    hotBad,
    measured,
    markers,
    band,
    bandLabel,
    verdict,
    hotCaution: r.hotCaution && HOT_CAUTION_TEXT[r.hotCaution],
    mainLabel: judged,
  };
}

/** The material choices: the ones usual for this part first, then the rest, then a typed coefficient. */
export function materialOptions(usual: typeof MATERIALS): { value: string; label: string }[] {
  const option = (m: (typeof MATERIALS)[number]) => ({ value: m.id, label: `${m.label}: ${formatNumber(m.alphaPerK * 1e6, 1)} µm/(m·K)` });
  return [
    ...usual.map(option),
    ...MATERIALS.filter((m) => !usual.includes(m)).map(option),
    { value: "custom", label: "Other: type its coefficient" },
  ];
}

export const materialSource = (id: string | undefined): string | undefined => MATERIALS.find((m) => m.id === id)?.source;

/** Keeps related fields in step: an application fills its ring-gap factor; clearances follow the unit system the parts were measured in. */
export function deriveClearance(next: FormValues, name: string, value: string): void {
  if (name === "application") {
    const f = RING_GAP_FACTORS.find((r) => r.application === value);
    if (f) next.gapPerBore = String(f.gapPerBore);
  }
  if (name === "gapPerBore") next.application = "custom";
  // Clearances show first in the system the parts were measured in.
  if (name === "bore.unit" || name === "journal.unit") followInputSystem(next, value, { "out.small": "small" });
}
