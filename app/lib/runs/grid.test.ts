import { evaluate } from "mathjs";
import { describe, expect, it } from "vitest";
import { calculateDistortion } from "~/lib/calc";
import { runCalculator } from "~/lib/procedures/calc-presets";
import { entrySchema, gridOf, latestAtPlaces, latestByPlace, parsePlaceKey, placeKey, placesBySpec } from "./entries";
import { distortionGrid, gridCells, prefillDistortion, stepGrid, takesGrid } from "./grid";
import type { RunCalculator } from "./steps";

const preset = {
  mode: "diametral",
  reference: { value: 88.0, unit: "mm" as const },
  compareTo: { readings: [{ depth: { value: 10, unit: "mm" }, angleDeg: 0, diameter: { value: 88.5, unit: "mm" } }] },
  readings: [0, 45, 90, 135].flatMap((a) =>
    [50, 10].map((d) => ({ depth: { value: d, unit: "mm" }, angleDeg: a, diameter: { value: 88.005, unit: "mm" } })),
  ),
};
const calc: RunCalculator = { kind: "distortion", title: "Cylinder 2, plate fitted", preset };

describe("the distortion grid a step asks for", () => {
  it("is the preset's depths (shallowest first) by its angles", () => {
    expect(distortionGrid(calc)).toEqual({
      depths: [
        { value: 10, unit: "mm" },
        { value: 50, unit: "mm" },
      ],
      angles: [0, 45, 90, 135],
    });
    expect(gridCells(distortionGrid(calc)!, 3)).toHaveLength(8);
    expect(gridCells(distortionGrid(calc)!, 3)[1].place).toEqual({ cylinder: 3, depth: { value: 10, unit: "mm" }, angle: 45 });
  });

  it("is none for a radial preset, another calculator or a preset without readings", () => {
    expect(distortionGrid({ ...calc, preset: { ...preset, mode: "radial" } })).toBeNull();
    expect(distortionGrid({ kind: "clearance", title: "t", preset: {} })).toBeNull();
    expect(distortionGrid({ ...calc, preset: { mode: "diametral" } })).toBeNull();
    expect(stepGrid([{ kind: "preload", title: "p", preset: {} }, calc])?.calculator).toBe(calc);
  });

  it("is asked of a bore diameter measured per cylinder, not of a piston, an out-of-round or a torque", () => {
    expect(takesGrid({ quantity: "length", label: "Bore diameter, plate fitted" })).toBe(true);
    expect(takesGrid({ quantity: "length", label: "Piston skirt diameter" })).toBe(false);
    expect(takesGrid({ quantity: "length", label: "Out-of-round at any depth" })).toBe(false);
    expect(takesGrid({ quantity: "torque", label: "Head stud final torque" })).toBe(false);
  });
});

describe("a cylinder's distortion from the diameters typed in its grid", () => {
  // Diameters at 10 mm down at 0°, 45°, 90°, 135°, and at 50 mm down, in mm.
  const top = [88.006, 88.012, 88.009, 88.003];
  const low = [88.004, 88.008, 88.007, 88.001];
  const grid = distortionGrid(calc)!;
  const readings = gridCells(grid, 2).map((c) => ({
    depth: c.depth,
    angle: c.angle,
    value: (c.depth.value === 10 ? top : low)[grid.angles.indexOf(c.angle)],
    unit: "mm" as const,
  }));

  it("is the calc module's own result for the same inputs (no formula of its own)", () => {
    const out = prefillDistortion(calc, "Bore diameter, Cyl 2", readings, 8);
    const direct = calculateDistortion({
      mode: "diametral",
      reference: preset.reference,
      readings: readings.map((r) => ({ depth: r.depth, angleDeg: r.angle, diameter: { value: r.value, unit: r.unit } })),
    });
    expect(out.outcome).toEqual(
      runCalculator("distortion", { mode: "diametral", reference: preset.reference, readings: out.calculator.preset.readings }),
    );
    expect(out.outcome.ok && out.outcome.rows[0]).toEqual({
      label: "Out-of-round at 10 mm",
      value: `${Number((direct.levels[0].outOfRound_mm * 1000).toFixed(1))} µm`,
    });
    expect(out.filled).toEqual([{ input: "Diameters (8 of 8)", from: "Bore diameter, Cyl 2" }]);
    // The procedure's example comparison is not this bore's: it is dropped.
    expect(out.calculator.preset).not.toHaveProperty("compareTo");
  });

  it("reads out-of-round and taper as mathjs computes them from the same diameters", () => {
    const direct = calculateDistortion({
      mode: "diametral",
      readings: readings.map((r) => ({ depth: r.depth, angleDeg: r.angle, diameter: { value: r.value, unit: r.unit } })),
    });
    // Source: mathjs evaluates max − min per depth (out-of-round of a two-point gauge) and the spread of the means (taper).
    expect(direct.levels[0].outOfRound_mm).toBeCloseTo(
      evaluate("max(88.006, 88.012, 88.009, 88.003) - min(88.006, 88.012, 88.009, 88.003)"),
      9,
    );
    expect(direct.levels[1].outOfRound_mm).toBeCloseTo(
      evaluate("max(88.004, 88.008, 88.007, 88.001) - min(88.004, 88.008, 88.007, 88.001)"),
      9,
    );
    expect(direct.taper_mm).toBeCloseTo(evaluate("mean(88.006, 88.012, 88.009, 88.003) - mean(88.004, 88.008, 88.007, 88.001)"), 9);
  });

  it("asks for the diameters before any is typed, and says how many are in", () => {
    expect(prefillDistortion(calc, "Bore", [], 8).outcome).toEqual({
      ok: false,
      message: "Type this cylinder's diameters to see its distortion.",
    });
    expect(prefillDistortion(calc, "Bore", readings.slice(0, 3), 8).filled[0].input).toBe("Diameters (3 of 8)");
  });
});

describe("a grid reading's place", () => {
  const entry = (position: unknown) => ({
    key: "k-12345678",
    specKey: "bore",
    position,
    value: 88.006,
    unit: "mm",
    typedAt: "2026-12-03T10:00:00Z",
  });

  it("keys by spec, cylinder, depth and angle, the same typed in mm or stored in metres", () => {
    const typed = placeKey("bore", { cylinder: 3, depth: { value: 10, unit: "mm" }, angle: 45 });
    expect(typed).toBe(placeKey("bore", { cylinder: 3, depthM: 0.01, depthUnit: "mm", angleDeg: 45 }));
    expect(typed).not.toBe(placeKey("bore", { cylinder: 3 }));
    expect(parsePlaceKey(typed)).toEqual({ specKey: "bore", place: { cylinder: 3, depthM: 0.01, angleDeg: 45 } });
    expect(gridOf({ cylinder: 1, depth: { value: 1, unit: "in" }, angle: 0 })).toEqual({ depthM: 0.0254, depthUnit: "in", angleDeg: 0 });
  });

  it("names depth and angle together, in a cylinder, within a bore", () => {
    expect(entrySchema.safeParse(entry({ cylinder: 3, depth: { value: 10, unit: "mm" }, angle: 45 })).success).toBe(true);
    expect(entrySchema.safeParse(entry({ cylinder: 3, depth: { value: 10, unit: "mm" } })).success).toBe(false);
    expect(entrySchema.safeParse(entry({ cylinder: 3, angle: 45 })).success).toBe(false);
    expect(entrySchema.safeParse(entry({ depth: { value: 10, unit: "mm" }, angle: 45 })).success).toBe(false);
    expect(entrySchema.safeParse(entry({ fastener: 3, depth: { value: 10, unit: "mm" }, angle: 45 })).success).toBe(false);
    expect(entrySchema.safeParse(entry({ cylinder: 3, depth: { value: 2, unit: "m" }, angle: 45 })).success).toBe(false);
    expect(entrySchema.safeParse(entry({ cylinder: 3, depth: { value: 2000, unit: "mm" }, angle: 45 })).success).toBe(false);
    expect(entrySchema.safeParse(entry({ cylinder: 3, depth: { value: 10, unit: "mm" }, angle: 400 })).success).toBe(false);
  });

  it("counts a cylinder read only in its grid as measured, and files its readings shallowest first", () => {
    const at = (cylinder: number, depthM: number | null, angleDeg: number | null, n: number) => ({
      specKey: "bore",
      cylinder,
      depthM,
      depthUnit: depthM == null ? null : "mm",
      angleDeg,
      valueEntered: 88 + n / 1000,
      typedAt: "2026-12-03T10:00:00Z",
      receivedOrder: n,
    });
    const latest = latestByPlace([at(1, 0.05, 0, 1), at(1, 0.01, 90, 2), at(1, 0.01, 0, 3), at(1, 0.01, 0, 4), at(2, null, null, 5)]);
    const [places] = placesBySpec(
      [{ key: "bore", quantity: "length", label: "Bore diameter" }],
      { cylinders: 3, mainJournals: null },
      latest,
    );
    expect(places.missing).toEqual([3]);
    expect(latestAtPlaces(latest, "bore", "cylinder", [1, 2, 3]).map((e) => e.receivedOrder)).toEqual([4, 2, 1, 5]);
  });
});
