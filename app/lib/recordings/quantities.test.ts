import { describe, expect, it } from "vitest";
import { readingInputSchema, toStoredSI, unitsFor } from "./quantities";

describe("reading rules", () => {
  const schema = readingInputSchema(120);
  it("accepts the contract's units for each quantity and stores SI", () => {
    expect(unitsFor("torque")).toEqual(["N.m", "ft.lbf", "in.lbf"]);
    expect(unitsFor("leak-down")).toEqual(["%"]);
    expect(toStoredSI("clamp-load", 51, "kN")).toBe(51000);
    expect(toStoredSI("bore-diameter", 3.465, "in")).toBeCloseTo(0.088011, 6);
    expect(toStoredSI("temperature", 90, "degC")).toBeCloseTo(363.15, 9);
    expect(toStoredSI("leak-down", 6, "%")).toBeCloseTo(0.06, 12);
    expect(toStoredSI("other", 3200, "rpm")).toBe(3200);
  });
  it("refuses a unit of another kind, with the units that fit in the message", () => {
    const r = schema.safeParse({ quantity: "clamp-load", value: 51, unit: "N.m" });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]).toMatchObject({ path: ["unit"], message: "N.m is not a unit of clamp load; use N, kN, lbf." });
  });
  it("refuses impossible values and times beyond the video", () => {
    const msg = (x: unknown) => schema.safeParse(x).error?.issues[0]?.message;
    expect(msg({ quantity: "temperature", value: -300, unit: "degC" })).toBe("That is below absolute zero.");
    expect(msg({ quantity: "bore-diameter", value: 0, unit: "mm" })).toBe("This measurement must be greater than zero.");
    expect(msg({ quantity: "torque", value: 110, unit: "N.m", t: 121 })).toBe("The video is only 2:00.0 long.");
    expect(msg({ quantity: "other", value: 1, unit: "a/b/c/d/e/f/g/h/i" })).toMatch(/short unit/);
    expect(
      schema.safeParse({ quantity: "torque", value: 110, unit: "N.m", conditions: { pass: 3, lube: " moly " } }).data?.conditions,
    ).toEqual({ pass: "3", lube: "moly" });
  });
});
