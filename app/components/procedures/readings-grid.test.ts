import { describe, expect, it } from "vitest";
import { readingsGrid } from "./CalculatorWidget";

const mm = (value: number) => ({ value, unit: "mm" });
const diametral = [0, 45, 90, 135].flatMap((a, i) => [10, 50].map((d) => ({ depth: mm(d), angleDeg: a, diameter: mm(88 + i / 1000) })));

describe("readingsGrid (the Bore distortion block's depth × angle table)", () => {
  it("lays diametral readings out by depth and angle", () => {
    const g = readingsGrid(diametral, "diameter")!;
    expect(g.depths).toEqual([10, 50]);
    expect(g.angles).toEqual([0, 45, 90, 135]);
    expect(g.unit).toBe("mm");
    expect(g.depthUnit).toBe("mm");
    expect(g.values[g.cells.get("50|90")!]).toBeCloseTo(88.002, 9);
  });

  it("shows the value the calculation uses: radius in radial mode, even when diameters are there too", () => {
    const both = diametral.map((r) => ({ ...r, radius: mm(r.diameter.value / 2) }));
    expect(readingsGrid(both, "radius")!.field).toBe("radius");
    expect(readingsGrid(both, "radius")!.values[0]).toBeCloseTo(44, 9);
    expect(readingsGrid(both, "diameter")!.values[0]).toBeCloseTo(88, 9);
    expect(readingsGrid(diametral, "radius")).toBeNull(); // radial mode without radii: the plain list
  });

  it("falls back to the plain list for mixed units, two readings in one cell, or missing angles", () => {
    expect(readingsGrid([...diametral.slice(1), { ...diametral[0], diameter: { value: 3.46, unit: "[in_i]" } }], "diameter")).toBeNull();
    expect(readingsGrid([...diametral.slice(1), { ...diametral[0], depth: { value: 10, unit: "[in_i]" } }], "diameter")).toBeNull();
    expect(readingsGrid([...diametral, diametral[0]], "diameter")).toBeNull();
    expect(readingsGrid([{ depth: mm(10), diameter: mm(88) }], "diameter")).toBeNull();
    expect(readingsGrid([], "diameter")).toBeNull();
    expect(readingsGrid(undefined, "diameter")).toBeNull();
  });

  it("keeps readings without a depth in one row", () => {
    const g = readingsGrid(
      [0, 60, 120].map((a) => ({ angleDeg: a, diameter: mm(88) })),
      "diameter",
    )!;
    expect(g.depths).toEqual([null]);
    expect(g.angles).toEqual([0, 60, 120]);
  });
});
