import { describe, expect, it } from "vitest";
import { groupOfNote, positionFromNote, runDistortion, runPistonToWall } from "./calcs";

describe("calculators on a record's readings", () => {
  it("reads depth and angle from a reading's note", () => {
    expect(positionFromNote("cyl 2, 20 mm down, 90°")).toEqual({ depthMm: 20, angleDeg: 90 });
    expect(positionFromNote("top 10mm 45 deg")).toEqual({ depthMm: 10, angleDeg: 45 });
    expect(positionFromNote("cyl 1")).toEqual({ depthMm: null, angleDeg: null });
    expect(groupOfNote("cyl 2, 20 mm down, 90°")).toBe("cyl 2");
    expect(groupOfNote("10 mm, 45°")).toBe("");
  });

  it("runs bore distortion on the diameters and piston-to-wall on a bore and a piston reading", () => {
    // Two levels, four angles over 180°: an oval of 0.010 mm at 10 mm, round at 60 mm.
    const rows = [
      [10, 0, 88.01], [10, 45, 88.005], [10, 90, 88.0], [10, 135, 88.005],
      [60, 0, 88.004], [60, 45, 88.004], [60, 90, 88.004], [60, 135, 88.004],
    ].map(([d, a, v], i) => ({ id: `r${i}`, specId: "bore", valueEntered: v, unitEntered: "mm", note: `${d} mm, ${a}°` }));
    const pos = new Map(rows.map((r) => [r.id, { depthMm: positionFromNote(r.note).depthMm!, angleDeg: positionFromNote(r.note).angleDeg! }]));
    const d = runDistortion(rows, pos, { value: 88, unit: "mm" });
    expect(d.ok).toBe(true);
    if (d.ok) {
      expect(d.result.levels.map((l) => Number(l.outOfRound_mm.toFixed(6)))).toEqual([0.01, 0]);
      expect(d.result.taper_mm).toBeCloseTo(0.001, 9);
    }
    const p = runPistonToWall(rows[4], { id: "p", specId: "piston", valueEntered: 87.94, unitEntered: "mm", note: "" }, { id: "c", label: "Piston-to-wall", quantity: "length", unit: "mm", min: 0.05, max: 0.07 });
    expect(p.ok && p.result.clearance_mm).toBeCloseTo(0.064, 9);
    expect(p.ok && p.result.verdict).toBe("within");
  });
});
