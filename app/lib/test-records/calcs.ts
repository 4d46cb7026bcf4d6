/**
 * Running the calc module on a record's readings (pure): bore distortion from a bore spec's
 * diameters at their depths and angles, and piston-to-wall from a bore and a piston reading.
 */
import { ZodError } from "zod";
import { calculateClearance, calculateDistortion, type ClearanceResult, type DistortionResult } from "~/lib/calc";
import type { SpecLimits } from "./verdict";

export type StoredReading = { id: string; specId: string; valueEntered: number; unitEntered: string; note: string };

/** "cyl 2, 20 mm down, 90°" → { depthMm: 20, angleDeg: 90 } (either may be missing). */
export function positionFromNote(note: string): { depthMm: number | null; angleDeg: number | null } {
  const depth = /(\d+(?:[.,]\d+)?)\s*mm\b/i.exec(note);
  const angle = /(-?\d+(?:[.,]\d+)?)\s*(?:°|deg\b|degrees?\b)/i.exec(note);
  const num = (m: RegExpExecArray | null) => (m ? Number(m[1].replace(",", ".")) : null);
  return { depthMm: num(depth), angleDeg: num(angle) };
}

/** What a reading's note says besides its position: "cyl 2, 20 mm down, 90°" → "cyl 2". */
export function groupOfNote(note: string): string {
  return note
    .replace(/(\d+(?:[.,]\d+)?)\s*mm\b(\s*(down|deep|below( the)? deck))?/gi, "")
    .replace(/(-?\d+(?:[.,]\d+)?)\s*(?:°|deg\b|degrees?\b)/gi, "")
    .replace(/[\s,;·–-]+$/g, "")
    .replace(/^[\s,;·–-]+/g, "")
    .replace(/\s*[,;]\s*[,;]\s*/g, ", ")
    .trim();
}

export const isBoreSpec = (s: SpecLimits) => s.quantity === "length" && /bore/i.test(s.label) && !/clearance|wall|gap/i.test(s.label);
export const isPistonSpec = (s: SpecLimits) => s.quantity === "length" && /piston/i.test(s.label) && !/clearance|wall/i.test(s.label);
export const isClearanceSpec = (s: SpecLimits) => s.quantity === "length" && /clearance|to-wall|to wall/i.test(s.label) && (s.min != null || s.max != null);

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

export function runDistortion(readings: StoredReading[], positions: Map<string, { depthMm: number; angleDeg: number }>, reference: { value: number; unit: string } | null): CalcOutcome<DistortionResult> {
  const input = {
    mode: "diametral" as const,
    readings: readings.map((r) => ({
      depth: { value: positions.get(r.id)!.depthMm, unit: "mm" },
      angleDeg: positions.get(r.id)!.angleDeg,
      diameter: { value: r.valueEntered, unit: r.unitEntered },
    })),
    ...(reference ? { reference } : {}),
  };
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
      ? { spec: { ...(spec.min != null ? { min: { value: spec.min, unit: spec.unit } } : {}), ...(spec.max != null ? { max: { value: spec.max, unit: spec.unit } } : {}) } }
      : {}),
  };
  try {
    return { ok: true, input, result: calculateClearance(input as Parameters<typeof calculateClearance>[0]) };
  } catch (err) {
    return { ok: false, errors: issuesOf(err) };
  }
}
