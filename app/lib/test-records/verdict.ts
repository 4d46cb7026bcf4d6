/**
 * The verdict of a test record: each reading against its spec (within / below / above), each
 * spec over its readings, and the record over its specs. Pure (no database), shared by the
 * server and the form's live preview. Units are converted with the calc module; limits are
 * inclusive; a spec may have only a min or only a max; a spec without readings is
 * "not measured" and never counts as passed.
 */
import { convert, unitKind, type UnitKind } from "~/lib/calc";
import { placeLabel, placeOf, type Place, type RunPlaceField } from "~/lib/runs/entries";

import type { ReadingVerdict, RecordVerdict, SpecVerdict } from "./labels";
export type { ReadingVerdict, RecordVerdict, SpecVerdict } from "./labels";
export { recordVerdictText, specVerdictText } from "./labels";

export type SpecLimits = {
  id: string;
  label: string;
  quantity: string;
  /** The spec's own (entered) unit code; min/max/nominal are in it. */
  unit: string;
  min: number | null;
  max: number | null;
  nominal?: number | null;
};

/** `position`: where it was measured; a reading at a place a run left empty fills that place. */
export type ReadingInput = { value: number; unit: string; position?: Place | null };

/** A place (cylinder, main journal, stud) a run offered for a spec and left without a value. */
export type MissingPlace = { specId: string } & Place;

/**
 * The places still empty once these readings are in: a reading of the spec at the place fills it.
 * A reading taken at a depth and an angle (one cell of a Bore distortion grid) does not: a missing
 * place names no depth or angle, so a cylinder kept missing beside its grid readings is one whose
 * grid a run left half filled, and only a value for the cylinder itself fills it.
 */
export function openPlaces<T extends MissingPlace>(places: T[], readingsBySpec: Record<string, ReadingInput[]>): T[] {
  return places.filter((p) => {
    const at = placeOf(p);
    return at && !(readingsBySpec[p.specId] ?? []).some((r) => r.position?.[at.field] === at.n && r.position?.depthM == null);
  });
}

/**
 * A spec's readings in their order with each place left empty among them where its number falls
 * (stud 2 between studs 1 and 3), for the tables and the amend form that list them.
 */
export function withEmptyPlaces<R extends Place, P extends { field: RunPlaceField; n: number }>(
  readings: R[],
  empty: P[],
): ({ r: R } | { place: P })[] {
  const items: ({ r: R } | { place: P })[] = readings.map((r) => ({ r }));
  for (const place of empty) {
    const at = items.findIndex((x) => "r" in x && (x.r[place.field] ?? -1) > place.n);
    items.splice(at < 0 ? items.length : at, 0, { place });
  }
  return items;
}

/** "Cyl 3", as the run screen names the place. */
export function missingPlaceLabel(p: Place): string {
  const at = placeOf(p);
  return at ? placeLabel(at.field, at.n) : "";
}

/** A place left empty, with its field and number named as well, and its words ("Cyl 3"). */
export type MissingPlaceView = {
  specId: string;
  fastener: number | null;
  cylinder: number | null;
  journal: number | null;
  field: RunPlaceField;
  n: number;
  label: string;
};

export class VerdictInputError extends Error {
  constructor(
    message: string,
    readonly field: "value" | "unit",
  ) {
    super(message);
  }
}

/**
 * Rounding slack for inclusive bounds: a reading typed in another unit converts with a few
 * ulps of error (0.0254 mm is 1 thou, but 1 thou converted back may be 0.0254000000000001).
 */
function slack(bound: number): number {
  return Math.max(Math.abs(bound), 1) * 1e-9;
}

export function readingVerdict(spec: SpecLimits, reading: ReadingInput): { verdict: ReadingVerdict; valueInSpecUnit: number } {
  if (typeof reading.value !== "number" || !Number.isFinite(reading.value)) throw new VerdictInputError("Enter a number.", "value");
  const kind = unitKind(reading.unit);
  if (!kind) throw new VerdictInputError(`“${reading.unit}” is not a unit Benchreel knows.`, "unit");
  if (kind !== (spec.quantity as UnitKind) || unitKind(spec.unit) !== kind) {
    throw new VerdictInputError(`${spec.label} is a ${spec.quantity} spec; ${reading.unit} is a ${kind} unit.`, "unit");
  }
  const v = convert(reading.value, reading.unit, spec.unit);
  if (spec.min == null && spec.max == null) return { verdict: "unchecked", valueInSpecUnit: v };
  if (spec.min != null && v < spec.min - slack(spec.min)) return { verdict: "below", valueInSpecUnit: v };
  if (spec.max != null && v > spec.max + slack(spec.max)) return { verdict: "above", valueInSpecUnit: v };
  return { verdict: "within", valueInSpecUnit: v };
}

export function specVerdict(verdicts: ReadingVerdict[]): SpecVerdict {
  if (!verdicts.length) return "not-measured";
  if (verdicts.some((v) => v === "below" || v === "above")) return "out";
  if (verdicts.every((v) => v === "unchecked")) return "unchecked";
  return "within";
}

export type EvaluatedSpec = {
  spec: SpecLimits;
  readings: { value: number; unit: string; verdict: ReadingVerdict; valueInSpecUnit: number }[];
  verdict: SpecVerdict;
  /** Places a run offered for this spec and left empty while others of it were measured. */
  emptyPlaces: number;
};

export type Evaluation = {
  specs: EvaluatedSpec[];
  /** null when nothing at all was measured: such a record cannot be filed. "incomplete" when a spec was left unmeasured. */
  verdict: RecordVerdict | null;
  notMeasured: SpecLimits[];
  /** Places left empty of specs measured elsewhere (a spec with no reading at all is in notMeasured instead). */
  missingPlaces: MissingPlaceView[];
  counts: { within: number; out: number; notMeasured: number; missingPlaces: number };
};

/**
 * The record: "within" only when every spec was measured, at every place a run offered, and
 * each is within (or has no limit); any reading outside its limits makes it "out"; otherwise a
 * spec left without readings, or a place left empty (`missingPlaces`, kept with the record's
 * version), makes it "incomplete". What is missing is listed, never silently passed.
 */
export function evaluateRecord(
  specs: SpecLimits[],
  readingsBySpec: Record<string, ReadingInput[]>,
  missingPlaces: MissingPlace[] = [],
): Evaluation {
  const evaluated: EvaluatedSpec[] = specs.map((spec) => {
    const rs = (readingsBySpec[spec.id] ?? []).map((r) => ({ value: r.value, unit: r.unit, ...readingVerdict(spec, r) }));
    return { spec, readings: rs, verdict: specVerdict(rs.map((r) => r.verdict)), emptyPlaces: 0 };
  });
  const measured = evaluated.filter((e) => e.verdict !== "not-measured");
  const out = evaluated.filter((e) => e.verdict === "out").length;
  const notMeasured = evaluated.filter((e) => e.verdict === "not-measured").map((e) => e.spec);
  const order = new Map(specs.map((s, i) => [s.id, i]));
  const places = openPlaces(missingPlaces, readingsBySpec)
    .filter((p) => measured.some((e) => e.spec.id === p.specId))
    .map((p) => {
      const at = placeOf(p)!;
      const where = { fastener: null, cylinder: null, journal: null, [at.field]: at.n };
      return { specId: p.specId, ...where, field: at.field, n: at.n, label: placeLabel(at.field, at.n) };
    })
    .sort((a, b) => (order.get(a.specId) ?? 0) - (order.get(b.specId) ?? 0) || a.n - b.n);
  for (const e of evaluated) e.emptyPlaces = places.filter((p) => p.specId === e.spec.id).length;
  const missing = notMeasured.length + places.length;
  return {
    specs: evaluated,
    verdict: measured.length === 0 ? null : out > 0 ? "out" : missing > 0 ? "incomplete" : "within",
    notMeasured,
    missingPlaces: places,
    counts: {
      within: evaluated.filter((e) => e.verdict === "within").length,
      out,
      notMeasured: notMeasured.length,
      missingPlaces: places.length,
    },
  };
}
