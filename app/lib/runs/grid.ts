/**
 * A step's Bore distortion grid on a run: where a step holds a bore diameter measured per
 * cylinder and embeds a Bore distortion calculator, the run asks, cylinder by cylinder, for a
 * diameter at each of the calculator preset's depths and angles, and runs that cylinder's
 * readings through the blocks' own `runCalculator` (app/lib/calc), so the run shows the numbers
 * the calculator page and the build page would for the same diameters. Pure: the run screen
 * recomputes as a number is typed.
 */
import { toSI } from "~/lib/calc";
import { runCalculator } from "~/lib/procedures/calc-presets";
import { DEPTH_UNITS, type DepthUnit, positionFieldsForSpec } from "~/lib/recordings/positions";
import type { Place } from "./entries";
import type { Prefilled } from "./prefill";
import type { RunCalculator, RunStep } from "./steps";

export type GridDepth = { value: number; unit: DepthUnit };
export type DistortionGrid = { depths: GridDepth[]; angles: number[] };

const isDepth = (d: unknown): d is GridDepth =>
  typeof d === "object" &&
  d != null &&
  Number.isFinite((d as GridDepth).value) &&
  (DEPTH_UNITS as readonly string[]).includes((d as GridDepth).unit);

/**
 * The depths (shallowest first) and angles (from 0°) of a Bore distortion preset's readings,
 * or null for another calculator, or one read radially (a radius about a fixed centre is not
 * the diameter a bore gauge gives).
 */
export function distortionGrid(calculator: RunCalculator): DistortionGrid | null {
  if (calculator.kind !== "distortion") return null;
  const preset = calculator.preset as { mode?: unknown; readings?: unknown };
  if (preset.mode != null && preset.mode !== "diametral") return null;
  if (!Array.isArray(preset.readings)) return null;
  const depths = new Map<number, GridDepth>();
  const angles = new Set<number>();
  for (const r of preset.readings as { depth?: unknown; angleDeg?: unknown }[]) {
    if (!isDepth(r?.depth) || typeof r.angleDeg !== "number" || !Number.isFinite(r.angleDeg)) continue;
    depths.set(toSI(r.depth.value, r.depth.unit), { value: r.depth.value, unit: r.depth.unit });
    angles.add(r.angleDeg);
  }
  if (!depths.size || !angles.size) return null;
  return { depths: [...depths].sort((a, b) => a[0] - b[0]).map(([, d]) => d), angles: [...angles].sort((a, b) => a - b) };
}

/** Whether a spec is read in a grid: a bore diameter measured per cylinder at a depth and an angle. */
export const takesGrid = (spec: { quantity: string; label: string }) => {
  const fields = positionFieldsForSpec(spec);
  return fields.includes("cylinder") && fields.includes("depth") && fields.includes("angle");
};

/** The step's grid for its bore specs: that of its first Bore distortion calculator that has one. */
export function stepGrid(calculators: RunCalculator[]): { calculator: RunCalculator; grid: DistortionGrid } | null {
  for (const calculator of calculators) {
    const grid = distortionGrid(calculator);
    if (grid) return { calculator, grid };
  }
  return null;
}

/** Each cell of a cylinder's grid with its place: depths down, angles across. */
export function gridCells(grid: DistortionGrid, cylinder: number): { depth: GridDepth; angle: number; place: Place }[] {
  return grid.depths.flatMap((depth) => grid.angles.map((angle) => ({ depth, angle, place: { cylinder, depth, angle } })));
}

export type GridReading = { depth: GridDepth; angle: number; value: number; unit: string };

/**
 * The Bore distortion calculator on one cylinder's typed diameters: the preset's mode and
 * reference kept, its example readings replaced by the typed ones (and its comparison with
 * another state dropped: that state is the procedure's example, not this bore).
 */
export function prefillDistortion(calculator: RunCalculator, from: string, readings: GridReading[], cells: number): Prefilled {
  const { compareTo: _example, readings: _presetReadings, ...rest } = calculator.preset;
  const preset = {
    ...rest,
    mode: "diametral",
    readings: readings.map((r) => ({ depth: r.depth, angleDeg: r.angle, diameter: { value: r.value, unit: r.unit } })),
  };
  const filled = [{ input: `Diameters (${readings.length} of ${cells})`, from }];
  if (!readings.length)
    return {
      calculator: { ...calculator, preset },
      filled: [],
      outcome: { ok: false, message: "Type this cylinder's diameters to see its distortion." },
    };
  return { calculator: { ...calculator, preset }, filled, outcome: runCalculator("distortion", preset) };
}

/**
 * For each bore spec read in a step's Bore distortion grid, the cells of one cylinder's grid
 * (depths × angles): what finishing a run needs to tell a full grid from a half-filled one.
 */
export function gridCellsBySpec(
  steps: Pick<RunStep, "specKeys" | "calculators">[],
  specs: { key: string; quantity: string; label: string }[],
): Map<string, number> {
  const byKey = new Map(specs.map((s) => [s.key, s]));
  const out = new Map<string, number>();
  for (const st of steps) {
    const g = stepGrid(st.calculators);
    if (!g) continue;
    for (const k of st.specKeys) {
      const s = byKey.get(k);
      if (s && takesGrid(s) && !out.has(k)) out.set(k, g.grid.depths.length * g.grid.angles.length);
    }
  }
  return out;
}
