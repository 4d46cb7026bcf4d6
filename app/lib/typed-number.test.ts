import { describe, expect, it } from "vitest";
import { formatMeasured } from "~/lib/calc-ui/units";
import { typedDecimals, typedText } from "./typed-number";

describe("the resolution a reading was typed with", () => {
  it("counts the decimals typed, trailing zeros included", () => {
    expect(typedDecimals("88.010")).toBe(3);
    expect(typedDecimals("88,010")).toBe(3);
    expect(typedDecimals("81")).toBe(0);
    expect(typedDecimals("2.50e-3")).toBe(5);
    expect(typedDecimals("12.")).toBe(0);
    expect(typedDecimals("abc")).toBeNull();
    expect(typedDecimals("")).toBeNull();
  });

  it("gives a stored value back as typed, for a form field", () => {
    expect(typedText(88.01, 3)).toBe("88.010");
    expect(typedText(88.01, null)).toBe("88.01");
    // A row whose value has more digits than its decimals say keeps its digits.
    expect(typedText(88.0125, 3)).toBe("88.0125");
  });

  it("shows a reading at the resolution typed in its own unit, and converted at the equivalent resolution", () => {
    // 88.010 mm is stored as 88.01: with the decimals typed it reads 88.010, not 88.01.
    expect(formatMeasured(88.01, "mm", "mm", 0, 3)).toBe("88.010");
    expect(formatMeasured(88.01, "mm", "mm")).toBe("88.01");
    // In inches: 1 in = 25.4 mm exactly (NIST SP 811, B.8), so 88.01 mm = 3.464960… in. A step
    // of 0.001 mm is 0.0000394 in (five decimals); a step of 0.01 mm, 0.000394 in (four).
    expect(formatMeasured(88.01, "mm", "in", 0, 3)).toBe("3.46496");
    expect(formatMeasured(88.01, "mm", "in", 0, 2)).toBe("3.4650");
  });
});
