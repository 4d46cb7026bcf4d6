import { describe, expect, it } from "vitest";
import { boreCylinders, distortionFieldsFor, positionFieldsForSpec, positionFromLabel, positionText } from "./positions";
import { readingInputSchema } from "./quantities";

// Unit conversions checked against NIST SP 811 (2008), B.8: 1 in = 0.0254 m exactly.

describe("a reading's position from an old label", () => {
  it("takes cylinder, depth and angle out of a bore reading's label", () => {
    const { position, label } = positionFromLabel("bore-diameter", "cyl 3, 20 mm down, 90°");
    expect(position).toEqual({ fastener: null, cylinder: 3, journal: null, depthM: 0.02, depthUnit: "mm", angleDeg: 90 });
    expect(label).toBe("");
  });
  it("keeps the words that are not a position, and positions the quantity does not take", () => {
    expect(positionFromLabel("bore-diameter", "Cylinder 2; 1.5 in deep, plate on")).toEqual({
      position: { fastener: null, cylinder: 2, journal: null, depthM: 1.5 * 0.0254, depthUnit: "in", angleDeg: null },
      label: "plate on",
    });
    expect(positionFromLabel("torque", "stud 4, moly")).toMatchObject({ position: { fastener: 4 }, label: "moly" });
    // a torque reading has no cylinder: the words stay in the label
    expect(positionFromLabel("torque", "cyl 3")).toMatchObject({ position: { cylinder: null, fastener: null }, label: "cyl 3" });
    expect(positionFromLabel("clearance", "main 3")).toMatchObject({ position: { journal: 3 }, label: "" });
  });
  it("leaves out-of-range and repeated places in the label", () => {
    expect(positionFromLabel("bore-diameter", "cyl 40, 400°")).toMatchObject({
      position: { cylinder: null, angleDeg: null },
      label: "cyl 40, 400°",
    });
    expect(positionFromLabel("bore-diameter", "cyl 1, cyl 2")).toMatchObject({ position: { cylinder: 1 }, label: "cyl 2" });
    expect(positionFromLabel("other", "cyl 1")).toMatchObject({ label: "cyl 1" });
  });
  it("reads back as words", () => {
    expect(positionText({ cylinder: 3, depthM: 0.02, depthUnit: "mm", angleDeg: 90 })).toBe("cyl 3 · 20 mm down · 90°");
    expect(positionText({ fastener: 4 })).toBe("stud 4");
    expect(positionText({})).toBe("");
  });
  it("gives each spec of the demo procedures the fields that fit it", () => {
    expect(positionFieldsForSpec({ quantity: "length", label: "Bore diameter, plate fitted" })).toEqual(["cylinder", "depth", "angle"]);
    expect(positionFieldsForSpec({ quantity: "length", label: "Out-of-round at any depth" })).toEqual(["cylinder", "depth"]);
    expect(positionFieldsForSpec({ quantity: "length", label: "Piston-to-wall, forged 2618 in iron liner" })).toEqual(["cylinder"]);
    expect(positionFieldsForSpec({ quantity: "length", label: "Main bearing oil clearance" })).toEqual(["journal"]);
    expect(positionFieldsForSpec({ quantity: "length", label: "Stud protrusion above deck" })).toEqual(["fastener"]);
    expect(positionFieldsForSpec({ quantity: "torque", label: "Head stud final torque" })).toEqual(["fastener"]);
    expect(positionFieldsForSpec({ quantity: "length", label: "Deck flatness over the whole deck" })).toEqual([]);
  });
});

describe("the reading schema's position fields", () => {
  const schema = readingInputSchema(120);
  const issues = (x: unknown) => schema.safeParse(x).error?.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
  it("stores a bore reading's cylinder, depth (in metres, with the unit typed) and angle", () => {
    const r = schema.parse({
      quantity: "bore-diameter",
      value: 88.006,
      unit: "mm",
      cylinder: 3,
      depth: { value: 20, unit: "mm" },
      angle: 90,
    });
    expect(r.position).toEqual({ fastener: null, cylinder: 3, journal: null, depthM: 0.02, depthUnit: "mm", angleDeg: 90 });
  });
  it("refuses angles past 0–360°, cylinders that are not small whole numbers, and a place the quantity does not take", () => {
    expect(issues({ quantity: "bore-diameter", value: 88, unit: "mm", angle: 361 })).toEqual(["angle: An angle runs from 0 to 360°."]);
    expect(issues({ quantity: "bore-diameter", value: 88, unit: "mm", angle: -1 })).toEqual(["angle: An angle runs from 0 to 360°."]);
    expect(issues({ quantity: "bore-diameter", value: 88, unit: "mm", cylinder: 2.5 })).toEqual([
      "cylinder: A cylinder number from 1 to 24.",
    ]);
    expect(issues({ quantity: "bore-diameter", value: 88, unit: "mm", cylinder: 0 })).toEqual([
      "cylinder: A cylinder number from 1 to 24.",
    ]);
    expect(issues({ quantity: "bore-diameter", value: 88, unit: "mm", cylinder: "3a" })).toEqual([
      "cylinder: A cylinder number from 1 to 24.",
    ]);
    expect(issues({ quantity: "clearance", value: 0.05, unit: "mm", journal: 17 })).toEqual(["journal: A journal number from 1 to 16."]);
    expect(issues({ quantity: "torque", value: 110, unit: "N.m", cylinder: 3 })).toEqual([
      "cylinder: A torque reading has no cylinder; it takes stud number.",
    ]);
    expect(issues({ quantity: "bore-diameter", value: 88, unit: "mm", depth: { value: 2, unit: "m" } })).toEqual([
      "depth.unit: A depth is in mm or in.",
    ]);
    expect(issues({ quantity: "bore-diameter", value: 88, unit: "mm", depth: { value: 50, unit: "in" } })).toEqual([
      "depth: That is deeper than any bore (1 m); check the number and the unit.",
    ]);
  });
  it("takes the place out of the label of a reading sent without position fields", () => {
    const r = schema.parse({ quantity: "bore-diameter", value: 88.006, unit: "mm", label: "cyl 3, 20 mm down, 90°, plate on" });
    expect(r.position).toMatchObject({ cylinder: 3, depthM: 0.02, angleDeg: 90 });
    expect(r.label).toBe("plate on");
    // with a field given, the label is the person's own words and stays whole
    expect(schema.parse({ quantity: "bore-diameter", value: 88, unit: "mm", cylinder: 1, label: "cyl 3" })).toMatchObject({
      label: "cyl 3",
      position: { cylinder: 1 },
    });
  });
});

describe("bore readings into the Bore distortion form", () => {
  const bore = (cylinder: number, depthMm: number, angleDeg: number, value: number, unitEntered = "mm") => ({
    quantity: "bore-diameter",
    cylinder,
    depthM: depthMm / 1000,
    depthUnit: "mm",
    angleDeg,
    valueEntered: value,
    unitEntered,
    valueSi: unitEntered === "in" ? value * 0.0254 : value / 1000,
  });
  it("lays one cylinder's readings out by depth and angle", () => {
    const rs = [bore(1, 45, 0, 88.012), bore(1, 12, 90, 88.0), bore(1, 12, 0, 88.012), bore(2, 12, 0, 88.1), bore(1, 45, 90, 88.005)];
    expect(boreCylinders(rs)).toEqual([1, 2]);
    expect(distortionFieldsFor(rs, 1)).toEqual({
      depths: "12, 45",
      "depth.unit": "mm",
      angles: "0, 90",
      "reading.unit": "mm",
      "m.0.0": "88.012",
      "m.0.1": "88",
      "m.1.0": "88.012",
      "m.1.1": "88.005",
    });
    expect(distortionFieldsFor(rs, 3)).toBeNull();
  });
  it("converts a reading typed in another unit into the unit most were typed in", () => {
    const rs = [bore(1, 12, 0, 88.0), bore(1, 12, 90, 88.004), bore(1, 12, 180, 3.465, "in")];
    // 3.465 in × 25.4 = 88.011 mm (NIST SP 811 B.8)
    expect(distortionFieldsFor(rs, 1)!["m.0.2"]).toBe("88.011");
  });
  it("keeps the digits a diameter was typed with (88.010 stays 88.010, not 88.01)", () => {
    const rs = [{ ...bore(1, 12, 0, 88.01), valueDecimals: 3 }, bore(1, 12, 90, 88.004)];
    expect(distortionFieldsFor(rs, 1)!["m.0.0"]).toBe("88.010");
  });
});
