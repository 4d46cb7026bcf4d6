import { describe, expect, it } from "vitest";
import { boreGroups, distortionInput, distortionPlaces, runDistortion, runPistonToWall, type StoredReading } from "./calcs";

const BORE = { id: "bore", label: "Bore diameter", quantity: "length", unit: "mm", min: 88.0, max: 88.012, nominal: 88.006 };

/** A filed bore reading at cylinder, depth (mm) and angle, with a note that is only words. */
const at = (
  i: number,
  cylinder: number | null,
  depthMm: number | null,
  angleDeg: number | null,
  value: number,
  note = "",
): StoredReading => ({
  id: `r${i}`,
  specId: "bore",
  valueEntered: value,
  unitEntered: "mm",
  note,
  cylinder,
  depthM: depthMm == null ? null : depthMm / 1000,
  depthUnit: depthMm == null ? null : "mm",
  angleDeg,
});

describe("calculators on a record's readings", () => {
  it("takes each diameter's depth and angle from its position fields, never from its note", () => {
    // The note says 12 mm and 45°: words of the inspector, not where the gauge sat.
    const rows = [at(0, 1, 10, 0, 88.01, "12 mm feeler, 45°"), at(1, 1, 10, 90, 88.0), at(2, 1, 60, 0, 88.004, "plate on")];
    const { places, missing } = distortionPlaces(rows, new Map());
    expect(missing).toEqual([]);
    const input = distortionInput(rows, places, null);
    expect(input.readings.map((r) => [r.depth, r.angleDeg])).toEqual([
      [{ value: 10, unit: "mm" }, 0],
      [{ value: 10, unit: "mm" }, 90],
      [{ value: 60, unit: "mm" }, 0],
    ]);
  });

  it("keeps a depth typed in inches in inches, and asks only for what a reading lacks", () => {
    const inch: StoredReading = { ...at(0, 2, null, 0, 3.465), unitEntered: "in", depthM: 0.0254, depthUnit: "in" };
    const bare = at(1, 2, null, null, 88.0, "10 mm, 90°");
    const { places, missing } = distortionPlaces([inch, bare], new Map([["r1", { angleDeg: 90 }]]));
    expect(places.get("r0")).toEqual({ depth: { value: 1, unit: "in" }, angleDeg: 0 });
    // The note's "10 mm" is not taken for a depth.
    expect(missing).toEqual([{ id: "r1", depth: true, angle: false }]);
  });

  it("offers one run per cylinder of a bore spec, each with three diameters or more", () => {
    const rows = [
      at(0, 1, 10, 0, 88.01),
      at(1, 1, 10, 90, 88.0),
      at(2, 1, 60, 0, 88.004),
      at(3, 2, 10, 0, 88.0),
      at(4, 2, 10, 90, 88.0),
      at(5, 2, 60, 0, 88.0),
      at(6, 3, 10, 0, 88.0),
    ];
    const groups = boreGroups([BORE], rows);
    expect(groups.map((g) => [g.cylinder, g.label, g.readings.length])).toEqual([
      [1, "cyl 1", 3],
      [2, "cyl 2", 3],
    ]);
    expect(boreGroups([BORE], rows.slice(0, 3)).map((g) => g.label)).toEqual([null]);
  });

  it("runs bore distortion on the diameters and piston-to-wall on a bore and a piston reading", () => {
    // Two levels, four angles over 180°: an oval of 0.010 mm at 10 mm, round at 60 mm.
    const rows = [
      [10, 0, 88.01],
      [10, 45, 88.005],
      [10, 90, 88.0],
      [10, 135, 88.005],
      [60, 0, 88.004],
      [60, 45, 88.004],
      [60, 90, 88.004],
      [60, 135, 88.004],
    ].map(([d, a, v], i) => at(i, 1, d, a, v));
    const d = runDistortion(rows, distortionPlaces(rows, new Map()).places, { value: 88, unit: "mm" });
    expect(d.ok).toBe(true);
    if (d.ok) {
      // Out-of-round is the largest minus the smallest diameter at a depth (two-point gauge):
      // 88.010 − 88.000 at 10 mm, 0 at 60 mm; taper the difference of the level means.
      expect(d.result.levels.map((l) => Number(l.outOfRound_mm.toFixed(6)))).toEqual([0.01, 0]);
      expect(d.result.taper_mm).toBeCloseTo(0.001, 9);
    }
    const p = runPistonToWall(
      rows[4],
      { id: "p", specId: "piston", valueEntered: 87.94, unitEntered: "mm", note: "" },
      { id: "c", label: "Piston-to-wall", quantity: "length", unit: "mm", min: 0.05, max: 0.07 },
    );
    expect(p.ok && p.result.clearance_mm).toBeCloseTo(0.064, 9);
    expect(p.ok && p.result.verdict).toBe("within");
  });
});
