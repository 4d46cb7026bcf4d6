/**
 * Bore distortion: per-depth mean, min, max and out-of-round, whole-bore taper, and the
 * Fourier orders of the bore's shape around the circumference, for a two-point bore gauge
 * (diametral mode) or radial readings; optionally compared with another state (e.g. free
 * versus torque plate).
 */
import type { z } from "zod";
import { type boreReadingSchema, distortionInputSchema, type DistortionInput } from "./schemas";
import { toSI, type UnitCode } from "./units";

/** One Fourier order of the radial deviation r(θ) = R0 + Σ A_k·cos(k·(θ − φ_k)). */
export interface BoreOrder {
  order: number;
  /** A_k ≥ 0, the radial amplitude of the order. */
  radialAmplitude_mm: number;
  /** φ_k in degrees, in [0°, 360°/k), in the direction the readings' angles go. */
  phaseDeg: number;
}

/** The figures of one depth (a "level"). */
export interface BoreLevel {
  depth_mm: number;
  meanDiameter_mm: number;
  minDiameter_mm: number;
  maxDiameter_mm: number;
  /** Max minus min diameter at this depth. */
  outOfRound_mm: number;
  /** Resolvable orders (even orders only in diametral mode). */
  orders: BoreOrder[];
}

/** The analysis of one measured state of a bore. */
export interface BoreStateResult {
  /** Levels sorted from the shallowest to the deepest. */
  levels: BoreLevel[];
  /** Largest minus smallest mean diameter over the levels. */
  taper_mm: number;
  /** Mean diameter at the shallowest level minus the mean at the deepest (signed). */
  taperTopToBottom_mm: number;
  warnings: string[];
}

/** Differences (this state minus the compared state) of the same figures. */
export interface DistortionDifference {
  taper_mm: number;
  taperTopToBottom_mm: number;
  /** Levels at depths present in both states. */
  levels: {
    depth_mm: number;
    meanDiameter_mm: number;
    minDiameter_mm: number;
    maxDiameter_mm: number;
    outOfRound_mm: number;
    /** Amplitude differences for orders resolved in both states. */
    orders: { order: number; radialAmplitude_mm: number }[];
  }[];
}

/** Result of calculateDistortion. */
export interface DistortionResult extends BoreStateResult {
  /** The compared state analysed the same way (only with compareTo). */
  compared?: BoreStateResult;
  /** This state minus the compared state (only with compareTo). */
  difference?: DistortionDifference;
}

/** Why a two-point bore gauge cannot see odd orders, for the calculator page. */
export const TWO_POINT_GAUGE_NOTE =
  "A two-point bore gauge reads D(θ) = r(θ) + r(θ + 180°). For an odd order k, cos(k(θ + 180° − φ)) = −cos(k(θ − φ)), so the two sides cancel: a three-lobed (order 3) bore reads the same diameter at every angle. Only even orders (2, 4, …) can be seen; radial readings about a fixed centre are needed for odd ones.";

type Mode = "diametral" | "radial";
interface RawReading {
  depth_mm: number;
  angleDeg: number;
  value_mm: number;
}

const ANGLE_TOL_DEG = 0.01;
const MAX_ORDER = 24;

function fmtMm(x: number): string {
  return `${Number(x.toPrecision(6))} mm`;
}

/** Equally spaced over `period`? (sorted distinct angles in [0, period)) */
function equallySpaced(angles: number[], period: number): boolean {
  const n = angles.length;
  if (n < 2) return false;
  const step = period / n;
  for (let i = 0; i < n; i++) {
    const next = i + 1 < n ? angles[i + 1] : angles[0] + period;
    if (Math.abs(next - angles[i] - step) > ANGLE_TOL_DEG) return false;
  }
  return true;
}

/** Cosine and sine coefficients of harmonic `h` of samples y at angles (radians), equally spaced over the full period. */
function harmonic(theta: number[], y: number[], h: number): { c: number; s: number } {
  let c = 0;
  let s = 0;
  for (let j = 0; j < y.length; j++) {
    c += y[j] * Math.cos(h * theta[j]);
    s += y[j] * Math.sin(h * theta[j]);
  }
  return { c: (2 / y.length) * c, s: (2 / y.length) * s };
}

function phaseOf(c: number, s: number, k: number, amplitude: number, scale: number): number {
  if (!(amplitude > 1e-12 * Math.max(1, scale))) return 0;
  const period = 360 / k;
  let phi = ((Math.atan2(s, c) * 180) / Math.PI / k) % period;
  if (phi < 0) phi += period;
  if (phi >= period - 1e-9) phi = 0;
  return phi;
}

function analyseLevel(depth_mm: number, readings: RawReading[], mode: Mode, notes: Map<string, number[]>): BoreLevel {
  const period = mode === "diametral" ? 180 : 360;
  // Distinct angles (normalised into [0, period)); repeats at one angle are averaged.
  const byAngle = new Map<number, { angle: number; sum: number; n: number }>();
  for (const r of readings) {
    let a = ((r.angleDeg % period) + period) % period;
    if (a >= period - 1e-9) a = 0;
    const key = Math.round(a * 1e6);
    const e = byAngle.get(key);
    if (e) {
      e.sum += r.value_mm;
      e.n += 1;
    } else byAngle.set(key, { angle: a, sum: r.value_mm, n: 1 });
  }
  const pts = [...byAngle.values()].sort((x, y) => x.angle - y.angle).map((e) => ({ angle: e.angle, v: e.sum / e.n }));
  const angles = pts.map((p) => p.angle);
  const values = pts.map((p) => p.v);
  const n = pts.length;
  const theta = angles.map((a) => (a * Math.PI) / 180);
  const note = (msg: string) => {
    const list = notes.get(msg) ?? [];
    list.push(depth_mm);
    notes.set(msg, list);
  };
  if (readings.length > n) note("Repeated readings at the same angle were averaged");

  const spaced = equallySpaced(angles, period);
  const orders: BoreOrder[] = [];
  const mean = values.reduce((a, b) => a + b, 0) / n;

  if (!spaced) {
    note(
      n < 2
        ? `Only one angle was read, so no order can be resolved`
        : `The angles are not equally spaced over ${period}°, so the orders are left out`,
    );
  } else if (mode === "diametral") {
    // D(θ) = 2R0 + Σ_even 2A_k cos(k(θ − φ_k)); order k needs k + 1 angles over 180°.
    for (let k = 2; k <= Math.min(n - 1, MAX_ORDER); k += 2) {
      const { c, s } = harmonic(theta, values, k);
      const amp = Math.hypot(c, s) / 2;
      orders.push({ order: k, radialAmplitude_mm: amp, phaseDeg: phaseOf(c, s, k, amp, mean) });
    }
    for (const k of [2, 4]) {
      if (k > n - 1) note(`Order ${k} cannot be resolved with ${n} angles over 180° (it needs ${k + 1}); it is left out`);
    }
  } else {
    // r(θ) = R0 + Σ A_k cos(k(θ − φ_k)); order k needs 2k + 1 angles over 360°.
    for (let k = 1; 2 * k + 1 <= n && k <= MAX_ORDER; k++) {
      const { c, s } = harmonic(theta, values, k);
      const amp = Math.hypot(c, s);
      orders.push({ order: k, radialAmplitude_mm: amp, phaseDeg: phaseOf(c, s, k, amp, mean) });
    }
    for (const k of [2, 3, 4]) {
      if (2 * k + 1 > n) note(`Order ${k} cannot be resolved with ${n} angles over 360° (it needs ${2 * k + 1}); it is left out`);
    }
  }

  // Diameters at this depth.
  let diameters: number[];
  let meanDiameter: number;
  if (mode === "diametral") {
    diameters = values;
    meanDiameter = mean;
  } else {
    meanDiameter = 2 * mean;
    const pairs: number[] = [];
    for (const p of pts) {
      if (p.angle >= 180 - 1e-9) continue;
      const opp = pts.find((q) => Math.abs(q.angle - (p.angle + 180)) < 1e-6);
      if (opp) pairs.push(p.v + opp.v);
    }
    if (pairs.length > 0 && pairs.length * 2 === n) diameters = pairs;
    else if (pairs.length > 0) {
      diameters = pairs;
      note("Some radial readings have no reading opposite them; min and max diameter use the opposite pairs only");
    } else if (spaced) {
      // No opposite readings: the diameter from the fitted profile, in which only even orders survive.
      diameters = angles.map((a) => {
        let d = meanDiameter;
        for (const o of orders)
          if (o.order % 2 === 0) d += 2 * o.radialAmplitude_mm * Math.cos((o.order * (a - o.phaseDeg) * Math.PI) / 180);
        return d;
      });
      note("No radial reading has one opposite it; min and max diameter come from the fitted profile");
    } else {
      diameters = values.map((r) => 2 * r);
      note("No radial reading has one opposite it; min and max diameter are twice the min and max radius");
    }
  }
  let lo = diameters[0];
  let hi = diameters[0];
  for (const d of diameters) {
    if (d < lo) lo = d;
    if (d > hi) hi = d;
  }
  return {
    depth_mm,
    meanDiameter_mm: meanDiameter,
    minDiameter_mm: lo,
    maxDiameter_mm: hi,
    outOfRound_mm: hi - lo,
    orders,
  };
}

function analyseState(
  mode: Mode,
  readings: z.output<typeof boreReadingSchema>[],
  reference: { value: number; unit: UnitCode } | undefined,
): BoreStateResult {
  const raw: RawReading[] = readings.map((r) => {
    const q = (mode === "radial" ? r.radius : r.diameter)!;
    return {
      depth_mm: toSI(r.depth.value, r.depth.unit) * 1000,
      angleDeg: r.angleDeg,
      value_mm: toSI(q.value, q.unit) * 1000,
    };
  });
  const groups = new Map<number, { depth: number; items: RawReading[] }>();
  for (const r of raw) {
    const key = Math.round(r.depth_mm * 1e6);
    const g = groups.get(key);
    if (g) g.items.push(r);
    else groups.set(key, { depth: r.depth_mm, items: [r] });
  }
  const notes = new Map<string, number[]>();
  const levels = [...groups.values()].sort((a, b) => a.depth - b.depth).map((g) => analyseLevel(g.depth, g.items, mode, notes));

  const warnings: string[] = [];
  for (const [msg, depths] of notes) {
    warnings.push(`${msg} (depth${depths.length > 1 ? "s" : ""} ${depths.map((d) => Number(d.toPrecision(6))).join(", ")} mm).`);
  }
  const means = levels.map((l) => l.meanDiameter_mm);
  const taper_mm = Math.max(...means) - Math.min(...means);
  const taperTopToBottom_mm = means[0] - means[means.length - 1];
  if (levels.length < 2) warnings.push("Readings at one depth only: taper needs two or more depths (reported as 0).");
  if (reference) {
    const ref_mm = toSI(reference.value, reference.unit) * 1000;
    for (const l of levels) {
      if (Math.abs(l.meanDiameter_mm - ref_mm) > 0.02 * ref_mm) {
        warnings.push(
          `The mean diameter at ${fmtMm(l.depth_mm)} (${fmtMm(l.meanDiameter_mm)}) is more than 2 % away from the reference bore (${fmtMm(ref_mm)}); check the units${mode === "radial" ? " (radial mode takes radii)" : ""}.`,
        );
        break;
      }
    }
  }
  return { levels, taper_mm, taperTopToBottom_mm, warnings };
}

/**
 * Bore distortion by depth (mean, min, max, out-of-round, Fourier orders) and over the bore
 * (taper, top-to-bottom taper), with differences against `compareTo`. Throws the ZodError on
 * invalid input.
 */
export function calculateDistortion(input: DistortionInput): DistortionResult {
  const v = distortionInputSchema.parse(input);
  const main = analyseState(v.mode, v.readings, v.reference);
  const result: DistortionResult = { ...main, warnings: [...main.warnings] };
  if (v.compareTo) {
    const other = analyseState(v.compareTo.mode ?? v.mode, v.compareTo.readings, v.compareTo.reference ?? v.reference);
    result.compared = other;
    for (const w of other.warnings) result.warnings.push(`Compared state: ${w}`);
    const levels: DistortionDifference["levels"] = [];
    let unmatched = 0;
    for (const l of main.levels) {
      const o = other.levels.find((x) => Math.abs(x.depth_mm - l.depth_mm) < 1e-6);
      if (!o) {
        unmatched++;
        continue;
      }
      levels.push({
        depth_mm: l.depth_mm,
        meanDiameter_mm: l.meanDiameter_mm - o.meanDiameter_mm,
        minDiameter_mm: l.minDiameter_mm - o.minDiameter_mm,
        maxDiameter_mm: l.maxDiameter_mm - o.maxDiameter_mm,
        outOfRound_mm: l.outOfRound_mm - o.outOfRound_mm,
        orders: l.orders
          .filter((a) => o.orders.some((b) => b.order === a.order))
          .map((a) => ({
            order: a.order,
            radialAmplitude_mm: a.radialAmplitude_mm - o.orders.find((b) => b.order === a.order)!.radialAmplitude_mm,
          })),
      });
    }
    unmatched += other.levels.filter((o) => !main.levels.some((l) => Math.abs(o.depth_mm - l.depth_mm) < 1e-6)).length;
    if (unmatched > 0)
      result.warnings.push(
        `${unmatched} level${unmatched > 1 ? "s have" : " has"} no reading at the same depth in the other state and ${unmatched > 1 ? "are" : "is"} left out of the differences.`,
      );
    result.difference = {
      taper_mm: main.taper_mm - other.taper_mm,
      taperTopToBottom_mm: main.taperTopToBottom_mm - other.taperTopToBottom_mm,
      levels,
    };
  }
  return result;
}
