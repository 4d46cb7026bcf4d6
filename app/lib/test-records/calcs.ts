/**
 * Running the calc module on a record's readings (pure): bore distortion from a bore spec's
 * diameters at their depths and angles, and piston-to-wall from a bore and a piston reading.
 * Where a diameter was taken comes from the reading's position fields (cylinder, depth below the
 * deck, angle: app/lib/recordings/positions.ts), never from its note, which stays the
 * inspector's words.
 */
import { ZodError } from "zod";
import { calculateClearance, calculateDistortion, type ClearanceResult, type DistortionResult } from "~/lib/calc";
import { depthEntered, type DepthUnit, type Position } from "~/lib/recordings/positions";
import type { SpecLimits } from "./verdict";

export type StoredReading = { id: string; specId: string; valueEntered: number; unitEntered: string; note: string } & Partial<Position>;

export const isBoreSpec = (s: SpecLimits) => s.quantity === "length" && /bore/i.test(s.label) && !/clearance|wall|gap/i.test(s.label);
export const isPistonSpec = (s: SpecLimits) => s.quantity === "length" && /piston/i.test(s.label) && !/clearance|wall/i.test(s.label);
export const isClearanceSpec = (s: SpecLimits) =>
  s.quantity === "length" && /clearance|to-wall|to wall/i.test(s.label) && (s.min != null || s.max != null);

/** Bore distortion needs a circle at a depth at least: three diameters. */
export const MIN_DISTORTION_READINGS = 3;

/** One Bore distortion a record offers: a bore spec's readings of one cylinder (null: no cylinder given). */
export type BoreGroup<R extends StoredReading> = { spec: SpecLimits; cylinder: number | null; label: string | null; readings: R[] };

/** "cyl 3", or null for the readings without a cylinder. */
export const cylinderLabel = (c: number | null) => (c == null ? null : `cyl ${c}`);

/**
 * The Bore distortion runs a record's readings allow: per bore spec, its readings grouped by
 * their cylinder field (a group is named only when the spec has several), each with three or
 * more diameters.
 */
export function boreGroups<R extends StoredReading>(specs: SpecLimits[], readings: R[]): BoreGroup<R>[] {
  const out: BoreGroup<R>[] = [];
  for (const spec of specs.filter(isBoreSpec)) {
    const mine = readings.filter((r) => r.specId === spec.id);
    const cylinders = [...new Set(mine.map((r) => r.cylinder ?? null))].sort((a, b) => (a ?? Infinity) - (b ?? Infinity));
    for (const c of cylinders) {
      const rs = mine.filter((r) => (r.cylinder ?? null) === c);
      if (rs.length >= MIN_DISTORTION_READINGS)
        out.push({ spec, cylinder: c, label: cylinders.length > 1 ? (cylinderLabel(c) ?? "no cylinder given") : null, readings: rs });
    }
  }
  return out;
}

/** A depth and an angle typed on the record page for a reading filed without them. */
export type TypedPlace = { depth?: { value: number; unit: DepthUnit } | null; angleDeg?: number | null };

/**
 * Where each diameter was taken: its own position fields first (the record), then what was
 * typed for a reading filed without them. Readings still lacking a depth or an angle are named.
 */
export function distortionPlaces(readings: StoredReading[], typed: Map<string, TypedPlace>) {
  const places = new Map<string, { depth: { value: number; unit: DepthUnit }; angleDeg: number }>();
  const missing: { id: string; depth: boolean; angle: boolean }[] = [];
  for (const r of readings) {
    const depth = depthEntered({ depthM: r.depthM ?? null, depthUnit: r.depthUnit ?? null }) ?? typed.get(r.id)?.depth ?? null;
    const angleDeg = r.angleDeg ?? typed.get(r.id)?.angleDeg ?? null;
    if (depth && angleDeg != null) places.set(r.id, { depth, angleDeg });
    else missing.push({ id: r.id, depth: !depth, angle: angleDeg == null });
  }
  return { places, missing };
}

export type CalcOutcome<T> = { ok: true; input: unknown; result: T } | { ok: false; errors: Record<string, string> };

function issuesOf(err: unknown): Record<string, string> {
  if (err instanceof ZodError) {
    const out: Record<string, string> = {};
    for (const i of err.issues) out[`calc.${i.path.join(".")}`] ??= i.message;
    out.calc ??= err.issues[0]?.message ?? "The calculator refused these readings.";
    return out;
  }
  throw err;
}

/** The calculator's input: each diameter at its depth (in the unit typed) and angle. */
export function distortionInput(
  readings: StoredReading[],
  places: Map<string, { depth: { value: number; unit: DepthUnit }; angleDeg: number }>,
  reference: { value: number; unit: string } | null,
) {
  return {
    mode: "diametral" as const,
    readings: readings.map((r) => ({
      depth: places.get(r.id)!.depth,
      angleDeg: places.get(r.id)!.angleDeg,
      diameter: { value: r.valueEntered, unit: r.unitEntered },
    })),
    ...(reference ? { reference } : {}),
  };
}

export function runDistortion(
  readings: StoredReading[],
  places: Map<string, { depth: { value: number; unit: DepthUnit }; angleDeg: number }>,
  reference: { value: number; unit: string } | null,
): CalcOutcome<DistortionResult> {
  const input = distortionInput(readings, places, reference);
  try {
    return { ok: true, input, result: calculateDistortion(input as Parameters<typeof calculateDistortion>[0]) };
  } catch (err) {
    return { ok: false, errors: issuesOf(err) };
  }
}

export function runPistonToWall(bore: StoredReading, piston: StoredReading, spec: SpecLimits | null): CalcOutcome<ClearanceResult> {
  const input = {
    kind: "piston-to-wall" as const,
    bore: { value: bore.valueEntered, unit: bore.unitEntered },
    piston: { value: piston.valueEntered, unit: piston.unitEntered },
    ...(spec && (spec.min != null || spec.max != null)
      ? {
          spec: {
            ...(spec.min != null ? { min: { value: spec.min, unit: spec.unit } } : {}),
            ...(spec.max != null ? { max: { value: spec.max, unit: spec.unit } } : {}),
          },
        }
      : {}),
  };
  try {
    return { ok: true, input, result: calculateClearance(input as Parameters<typeof calculateClearance>[0]) };
  } catch (err) {
    return { ok: false, errors: issuesOf(err) };
  }
}
