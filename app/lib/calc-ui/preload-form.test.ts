// The Preload page's wording for the thread's diameters: the metric d3 is the minor diameter
// (ISO 898-1: d3 = d − 1.226869·P); the Unified value is the second diameter of ASME B1.1's
// stress-area formula, D − 1.299038·P, which lies below the basic minor diameter D − 1.082532·P.
import { describe, expect, test } from "vitest";
import { threadGeometry } from "~/lib/calc";
import { UNIFIED_STRESS_AREA_NOTE, d3Label } from "./preload-form";

describe("the name of d3 on the Preload page", () => {
  test("metric: the minor diameter d3 = d − 1.226869·P (ISO 898-1)", () => {
    expect(d3Label(threadGeometry("M12x1.5").system)).toBe("Minor diameter d3 = d − 1.226869·P");
  });

  test("Unified: named as the stress-area term D − 1.299038·P (ASME B1.1), never as a minor diameter", () => {
    const label = d3Label(threadGeometry("1/2-13 UNC").system);
    expect(label).toContain("1.299038");
    expect(label).not.toMatch(/minor/i);
    expect(UNIFIED_STRESS_AREA_NOTE).toContain("0.7854·(D − 0.9743·P)²");
    expect(UNIFIED_STRESS_AREA_NOTE).toContain("basic minor diameter D − 1.082532·P");
  });
});
