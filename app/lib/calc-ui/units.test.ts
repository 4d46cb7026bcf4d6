import { unit as mathUnit } from "mathjs";
import { describe, expect, it } from "vitest";
import { decimalsOf, formatMeasured, formatNumber, specDecimals } from "./units";

// The rounding rule checked here is the one of IEEE/ASTM SI 10 (rounding of converted values):
// a converted value keeps a precision commensurate with the value measured, never more digits
// than the original's last digit is worth in the new unit. The values converted are checked
// against mathjs, an independent implementation of the same units.
describe("formatMeasured: a converted value at the resolution it was typed with", () => {
  it("shows 81 ft·lbf as 110 N·m (one step of 1 ft·lbf is 1.36 N·m), not 109.8212538", () => {
    expect(mathUnit(81, "ft lbf").toNumber("N m")).toBeCloseTo(109.8212538, 6); // mathjs
    expect(formatMeasured(81, "ft.lbf", "N.m")).toBe("110");
  });

  it("gives one more decimal when one more was typed (81.1 ft·lbf → 110.0 N·m, a step of 0.136 N·m)", () => {
    expect(mathUnit(81.1, "ft lbf").toNumber("N m")).toBeCloseTo(109.957, 3); // mathjs
    expect(formatMeasured(81.1, "ft.lbf", "N.m")).toBe("110.0");
  });

  it("shows a 4-decimal inch bore reading to 0.001 mm (0.0001 in is 0.00254 mm)", () => {
    expect(mathUnit(3.4651, "inch").toNumber("mm")).toBeCloseTo(88.01354, 5); // mathjs
    expect(formatMeasured(3.4651, "in", "mm")).toBe("88.014");
  });

  it("never shows fewer decimals than the spec it is compared with", () => {
    // 3.465 in (the zero of 3.4650 is lost in the stored number) against a spec of 88.000–88.012 mm.
    expect(formatMeasured(3.465, "in", "mm", specDecimals({ min: 88.0, max: 88.012 }))).toBe("88.011");
  });

  it("converts the step of a temperature, not the point (offset scales)", () => {
    // 212 °F = 100 °C; a step of 1 °F is 5/9 °C, shown to 1 decimal.
    expect(mathUnit(212, "degF").toNumber("degC")).toBeCloseTo(100, 9); // mathjs
    expect(formatMeasured(212, "degF", "degC")).toBe("100.0");
  });

  it("reads as typed in its own unit", () => {
    expect(formatMeasured(88.006, "mm", "mm")).toBe("88.006");
    expect(formatMeasured(88.006, "mm", "mm", 4)).toBe("88.0060");
  });

  it("counts typed decimals from the number's shortest text", () => {
    expect(decimalsOf(88.006)).toBe(3);
    expect(decimalsOf(81)).toBe(0);
    expect(decimalsOf(2.5e-7)).toBe(8);
    expect(specDecimals({ min: 105, max: 115, nominal: 110.5 })).toBe(1);
    expect(specDecimals({ min: null, max: null })).toBe(0);
  });
});

describe("formatNumber: the same text on the server and in the browser", () => {
  it("rounds a value a last-bit error away from a half the same way on either side", () => {
    // 7.5 is exactly representable (IEEE 754 binary64); the neighbours one ulp (2^-50 here) away
    // are what two engines' atan2 gave for a phase of 7.5°. Rounded half away from zero
    // (ECMA-402's default rounding, "halfExpand"), 7.5 is 8 whichever side computed it.
    const ulp = 2 ** -50;
    expect(formatNumber(7.5 - ulp, 0)).toBe("8");
    expect(formatNumber(7.5 + ulp, 0)).toBe("8");
    expect(formatNumber(0.0125 - 1e-17, 3)).toBe(formatNumber(0.0125 + 1e-17, 3));
  });

  it("keeps its grouping and decimals", () => {
    expect(formatNumber(76389.4, 0)).toBe("76,389");
    expect(formatNumber(-0.0004, 3)).toBe("0.000");
    expect(formatNumber(Number.NaN, 2)).toBe("—");
  });
});
