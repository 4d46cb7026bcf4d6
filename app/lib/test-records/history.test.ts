import { describe, expect, it } from "vitest";
import { diffAmendment, readingsAtVersion, type HeaderFields } from "./history";

const header: HeaderFields = { title: "Bore check after honing", engineSerial: "LX23-0412", testedOn: "2024-03-12", notes: "", recordingStartS: null, recordingEndS: null };
const labels = new Map([
  ["bore", "Bore diameter"],
  ["gap", "Top ring end gap"],
]);

describe("amendment history", () => {
  it("names each changed field and each spec whose readings changed, with before and after", () => {
    const changes = diffAmendment(
      { header, readings: [{ specId: "bore", value: 88.015, unit: "mm", note: "cyl 2 top" }, { specId: "gap", value: 0.5, unit: "mm", note: "" }] },
      { header: { ...header, engineSerial: "LX23-0421" }, readings: [{ specId: "bore", value: 88.011, unit: "mm", note: "cyl 2 top" }, { specId: "gap", value: 0.5, unit: "mm", note: "" }] },
      labels,
    );
    expect(changes).toEqual([
      { kind: "field", key: "engineSerial", label: "Engine serial", before: "LX23-0412", after: "LX23-0421" },
      { kind: "spec", key: "bore", label: "Bore diameter", before: "88.015 mm (cyl 2 top)", after: "88.011 mm (cyl 2 top)" },
    ]);
  });

  it("records a spec that gains or loses all its readings as not measured on that side", () => {
    const changes = diffAmendment(
      { header, readings: [{ specId: "bore", value: 88.006, unit: "mm", note: "" }] },
      { header, readings: [{ specId: "bore", value: 88.006, unit: "mm", note: "" }, { specId: "gap", value: 0.02, unit: "in", note: "" }] },
      labels,
    );
    expect(changes).toEqual([{ kind: "spec", key: "gap", label: "Top ring end gap", before: "not measured", after: "0.02 in" }]);
  });

  it("reports nothing when nothing changed", () => {
    const r = [{ specId: "bore", value: 88.006, unit: "mm", note: "" }];
    expect(diffAmendment({ header, readings: r }, { header, readings: r }, labels)).toEqual([]);
  });

  it("keeps the original: the readings at version 0 stay readable after amendments", () => {
    const rows = [
      { version: 0, v: 88.015 },
      { version: 0, v: 88.006 },
      { version: 1, v: 88.011 },
      { version: 1, v: 88.006 },
      { version: 2, v: 88.01 },
    ];
    expect(readingsAtVersion(rows, 0).map((r) => r.v)).toEqual([88.015, 88.006]);
    expect(readingsAtVersion(rows, 1).map((r) => r.v)).toEqual([88.011, 88.006]);
    expect(readingsAtVersion(rows, 2).map((r) => r.v)).toEqual([88.01]);
    expect(readingsAtVersion(rows, 5).map((r) => r.v)).toEqual([88.01]);
  });
});

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
