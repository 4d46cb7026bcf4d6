/**
 * What the Bore distortion page shows of a result, worked out apart from how it is drawn: the
 * measured deviations from round per depth, the circle the plots are drawn against, the
 * exaggeration factor, the shape along the bore in words, and the edits that keep related
 * fields in step (result units following the readings, angles following the gauge).
 */
import { convert, toSI, unitLabel, type BoreLevel, type UnitCode } from "~/lib/calc";
import { DEFAULT_ANGLES, profileShape, resultUnitsOfReadings, type DistortionOutcome } from "./distortion-form";
import type { FormValues } from "./outcome";
import { decimalsOf, formatIn, formatNumber, unitOr } from "./units";

export interface LevelDots {
  depth_mm: number;
  /** Deviation from the level's mean radius (mm) at each angle, over the full circle. */
  dots: { angleDeg: number; dev_mm: number }[];
}

/** How depths are shown: in the unit they were typed in, with as many decimals as were typed. */
export interface DepthDisplay {
  unit: UnitCode;
  decimals: number;
}

/** A depth (computed in mm) in the unit it was typed in, without the unit: "0.472". */
export function depthValue(depth_mm: number, d: DepthDisplay): string {
  return formatNumber(convert(depth_mm, "mm", d.unit), d.decimals);
}

/** A "nice" exaggeration factor (1, 2 or 5 × 10^n) that makes the largest deviation about a quarter of the radius. */
export function exaggerationFor(maxDev_mm: number, radius_mm: number): number {
  if (!(maxDev_mm > 0)) return 1;
  const raw = (0.28 * radius_mm) / maxDev_mm;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const pick = [5, 2, 1].map((m) => m * mag).find((f) => f <= raw) ?? mag;
  return Math.max(1, pick);
}

/** The fitted radial deviation Σ A_k·cos(k·(θ − φ_k)) at angle θ (degrees). */
export function fittedDev(level: BoreLevel, angleDeg: number): number {
  let d = 0;
  for (const o of level.orders) d += o.radialAmplitude_mm * Math.cos((o.order * (angleDeg - o.phaseDeg) * Math.PI) / 180);
  return d;
}

type Q = { value: number; unit: string };
type Reading = { depth: Q; angleDeg: number; diameter?: Q; radius?: Q };
type Input = { mode: string; reference?: Q; readings: Reading[]; compareTo?: { readings: Reading[] } };

const mmOf = (q: Q) => toSI(q.value, q.unit as UnitCode) * 1000;

/** Measured deviations from the level's mean radius, on the full circle (diametral readings show at θ and θ + 180°). */
export function levelDots(input: unknown, which: "main" | "compare", levels: BoreLevel[]): LevelDots[] {
  const inp = input as Input;
  const readings = which === "main" ? inp.readings : (inp.compareTo?.readings ?? []);
  const radial = inp.mode === "radial";
  return levels.map((l) => {
    const dots: LevelDots["dots"] = [];
    for (const r of readings) {
      if (Math.abs(mmOf(r.depth) - l.depth_mm) > 1e-6) continue;
      const v = mmOf(radial ? r.radius! : r.diameter!);
      if (radial) dots.push({ angleDeg: r.angleDeg, dev_mm: v - l.meanDiameter_mm / 2 });
      else {
        const dev = (v - l.meanDiameter_mm) / 2;
        dots.push({ angleDeg: r.angleDeg, dev_mm: dev }, { angleDeg: r.angleDeg + 180, dev_mm: dev });
      }
    }
    return { depth_mm: l.depth_mm, dots };
  });
}

/** A signed deviation in `su` ("+3.0"; a value that rounds to zero has no sign). */
export function signedIn(mm: number, su: UnitCode): string {
  const s = formatIn(mm, "mm", su);
  return mm > 0 && !/^0(\.0*)?$/.test(s) ? `+${s}` : s;
}

/** The change of largest size, with its sign. */
export function largestChange(xs: number[]): number {
  return xs.reduce((a, x) => (Math.abs(x) > Math.abs(a) ? x : a), 0);
}

/** The shape along the bore in words, its bulge in `su`. */
export function shapeText(levels: BoreLevel[], su: UnitCode): string {
  const shape = profileShape(levels);
  if (shape.shape === "unknown") return "Shape along the bore needs three depths";
  if (shape.shape === "straight") return "Straight (no barrel or hourglass)";
  return `${shape.shape === "barrel" ? "Barrel" : "Hourglass"}: middle ${formatIn(Math.abs(shape.bulge_mm), "mm", su)} ${unitLabel(su)} ${shape.bulge_mm > 0 ? "wide" : "narrow"} of the straight line`;
}

/** A reading cell's name for an error message: "45 deep, 90°". */
export function cellName(key: string, o: Pick<DistortionOutcome, "depths" | "angles">): string {
  const [, i, j] = key.split(".").map(Number);
  return `${o.depths[i]} deep, ${o.angles[j]}°`;
}

/**
 * Everything the result view draws besides the result itself: the labels of the two states,
 * the result units, the reference circle (the nominal bore, else the mean of the level means),
 * the measured dots per depth and the exaggeration that makes them visible.
 */
export function distortionView(outcome: DistortionOutcome, values: FormValues) {
  const r = outcome.result;
  const su = unitOr(values["out.small"], "um");
  const lu = unitOr(values["out.length"], "mm");
  const mainLabel = values["label.main"]?.trim() || "Measured";
  const compareLabel = values["label.compare"]?.trim() || "Compared";
  const depth: DepthDisplay = { unit: unitOr(values["depth.unit"], "mm"), decimals: Math.max(0, ...outcome.depths.map(decimalsOf)) };
  const base = { su, lu, mainLabel, compareLabel, depth };
  if (!r) return { ...base, plot: undefined };
  const ref = (outcome.input as Input | undefined)?.reference;
  const reference_mm = ref ? mmOf(ref) : r.levels.reduce((a, l) => a + l.meanDiameter_mm, 0) / r.levels.length;
  const dots = levelDots(outcome.input, "main", r.levels);
  const comparedDots = r.compared ? levelDots(outcome.input, "compare", r.compared.levels) : [];
  const maxDev_mm = Math.max(
    ...[...dots, ...comparedDots].flatMap((d) => d.dots.map((p) => Math.abs(p.dev_mm))),
    ...[...r.levels, ...(r.compared?.levels ?? [])].map((l) => l.outOfRound_mm / 2),
    0,
  );
  const plot = { reference_mm, dots, comparedDots, factor: exaggerationFor(maxDev_mm, reference_mm / 2), shape: shapeText(r.levels, su) };
  return { ...base, plot };
}

/** The worst out-of-round of a state's levels (mm). */
export const worstOutOfRound = (levels: BoreLevel[]): number => Math.max(...levels.map((l) => l.outOfRound_mm));

/**
 * Keeps related fields in step as one types: results follow the readings' unit system, and
 * switching the gauge swaps the angle list when it is still the other gauge's default.
 */
export function deriveDistortion(next: FormValues, name: string, value: string, previous: FormValues): void {
  if (name === "reading.unit") Object.assign(next, resultUnitsOfReadings(next));
  if (name === "mode") {
    const other = value === "radial" ? DEFAULT_ANGLES.diametral : DEFAULT_ANGLES.radial;
    if (previous.angles?.replace(/\s/g, "") === other.replace(/\s/g, ""))
      next.angles = value === "radial" ? DEFAULT_ANGLES.radial : DEFAULT_ANGLES.diametral;
  }
}
