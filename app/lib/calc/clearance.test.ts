import { describe, expect, test } from "vitest";
import { ZodError } from "zod";
import { hotPistonToWall } from "../../../tests/support/calc-inputs";
import {
  HOT_CLEARANCE_MIN_PER_DIAMETER,
  MATERIALS,
  OIL_CLEARANCE_RULE,
  RING_GAP_FACTORS,
  calculateClearance,
  convert,
  materialById,
  meanAlphaFrom20,
  thermalGrowth,
} from "./index";

describe("thermal expansion coefficients against named handbook tables", () => {
  test("Callister, Materials Science and Engineering: An Introduction, Appendix B, Table B.6 (10⁻⁶ /°C)", () => {
    // Table B.6, room-temperature linear coefficients: steel alloy 4340 12.3; gray irons
    // G1800/G3000/G4000 11.4; aluminium alloy 356.0 21.5; Ti-6Al-4V 8.6.
    expect(materialById("steel-4340").alphaPerK).toBeCloseTo(12.3e-6, 12);
    expect(materialById("grey-cast-iron").alphaPerK).toBeCloseTo(11.4e-6, 12);
    expect(materialById("a356-t6").alphaPerK).toBeCloseTo(21.5e-6, 12);
    expect(materialById("ti-6al-4v").alphaPerK).toBeCloseTo(8.6e-6, 12);
  });

  // 4032 was checked against a reproduction of the ASM table; 2618 is from memory of it.
  test("ASM Handbook Vol. 2, wrought aluminium alloys: 2618 22.3 and 4032 19.4 µm/m·K (20–100 °C; from memory of the table)", () => {
    expect(materialById("forged-2618").alphaPerK).toBeCloseTo(22.3e-6, 12);
    expect(materialById("forged-4032").alphaPerK).toBeCloseTo(19.4e-6, 12);
  });

  test("every material names its handbook", () => {
    for (const m of MATERIALS) expect(m.source).toMatch(/Callister|ASM Handbook/);
  });
});

describe("part temperatures a material's figures do not cover", () => {
  const hot = (
    pistonTemperature: { value: number; unit: string },
    pistonMaterial: unknown = "forged-2618",
    boreTemperature = { value: 95, unit: "degC" },
  ) => calculateClearance(hotPistonToWall({ pistonTemperature, pistonMaterial, boreTemperature }) as never).warnings.join(" ");

  test("every table material states the range of its coefficient and where it begins to melt, with a source", () => {
    for (const m of MATERIALS) {
      expect(m.alphaRange.source).toMatch(/ASM Handbook|Callister|common practice, no published source/);
      expect(m.solidus.source).toMatch(/ASM Handbook|Callister/);
      expect(m.alphaRange.minK).toBeLessThan(m.alphaRange.maxK);
      expect(m.solidus.K).toBeGreaterThan(m.alphaRange.maxK);
    }
  });

  test("a 2618 piston at 2,000 K is past where the alloy begins to melt (ASM Handbook Vol. 2: 2618 melts from about 549 °C)", () => {
    expect(hot({ value: 2000, unit: "K" })).toMatch(/begins to melt/);
    // just under and just over 549 °C (822.15 K)
    expect(hot({ value: 545, unit: "degC" })).not.toMatch(/begins to melt/);
    expect(hot({ value: 560, unit: "degC" })).toMatch(/begins to melt/);
  });

  test("a grey-iron bore past the iron–carbon eutectic, 1147 °C (Callister, Fe–Fe3C diagram)", () => {
    expect(hot({ value: 90, unit: "degC" }, "forged-2618", { value: 1200, unit: "degC" })).toMatch(/bore temperature .* begins to melt/);
  });

  test("above 300 °C the 2618 means (ASM Vol. 2: to 300 °C at most) are extrapolated: a warning, not a refusal", () => {
    const w = hot({ value: 320, unit: "degC" });
    expect(w).toMatch(/piston temperature \(320 °C\) is outside 20 °C to 300 °C/);
    expect(hot({ value: 300, unit: "degC" })).not.toMatch(/outside/);
    expect(hot({ value: 572, unit: "degF" })).not.toMatch(/outside/); // 572 °F = 300 °C (NIST SP 811, B.8)
  });

  test("a bore material without means past 100 °C still warns there (Callister B.6 gives one value, used over 20–100 °C)", () => {
    expect(hot({ value: 250, unit: "degC" }, "forged-2618", { value: 150, unit: "degC" })).toMatch(
      /bore temperature \(150 °C\) is outside 20 °C to 100 °C/,
    );
  });

  test("a coefficient typed by the user has no known range: no such warning", () => {
    expect(hot({ value: 250, unit: "degC" }, { alphaPerK: 22.3e-6 })).not.toMatch(/outside|melt/);
  });

  test("below absolute zero is refused, not warned about (0 K = −459.67 °F, NIST SP 811 B.8)", () => {
    expect(() => hot({ value: -460, unit: "degF" })).toThrow(ZodError);
  });
});

// ASM Handbook, Vol. 2 (1990): the data sheets of the wrought alloys (2618, 4032) and of the
// cast 356.0 / A356.0 tabulate the mean coefficient from 20 °C to 100, 200 and 300 °C. The
// 200 and 300 °C figures here are from memory of those tables (2618: 22.3, 23.2, 24.1;
// 4032: 19.4, 20.2, 21.0; A356: 22.5 and 23.5 µm/m·K to 200 and 300 °C).
describe("a running piston, 200–300 °C, inside the piston alloys' figures", () => {
  const kelvin = (c: number) => c + 273.15;

  test("the means from 20 °C to 200 and 300 °C of each piston alloy (ASM Handbook Vol. 2 data sheets, value from memory)", () => {
    const means = (id: Parameters<typeof materialById>[0]) => [200, 300].map((c) => meanAlphaFrom20(materialById(id), kelvin(c)));
    expect(means("forged-2618")[0]).toBeCloseTo(23.2e-6, 12);
    expect(means("forged-2618")[1]).toBeCloseTo(24.1e-6, 12);
    expect(means("forged-4032")[0]).toBeCloseTo(20.2e-6, 12);
    expect(means("forged-4032")[1]).toBeCloseTo(21.0e-6, 12);
    expect(means("a356-t6")[0]).toBeCloseTo(22.5e-6, 12);
    expect(means("a356-t6")[1]).toBeCloseTo(23.5e-6, 12);
    for (const m of MATERIALS.filter((x) => x.use.includes("piston"))) {
      expect(m.alphaRange.maxK, m.id).toBeCloseTo(kelvin(300), 9);
      expect(m.alphaRange.source, m.id).toMatch(/ASM Handbook, Vol\. 2 .*20–300 °C.*value from memory/);
    }
  });

  test("a 2618 piston at 250 °C: the mean interpolated between the 20–200 and 20–300 °C means, and no range warning", () => {
    // ᾱ(20→250 °C) = (23.2 + 24.1) / 2 = 23.65 µm/m·K (linear between the tabulated means)
    // hot piston = 87.930 × (1 + 23.65e-6 × 230) = 88.408295… mm; hot bore (grey iron, Callister B.6) = 88 × (1 + 11.4e-6 × 80)
    const r = calculateClearance(
      hotPistonToWall({ pistonTemperature: { value: 250, unit: "degC" }, boreTemperature: { value: 100, unit: "degC" } }) as never,
    );
    expect(r.hotClearance_mm).toBeCloseTo(88 * (1 + 11.4e-6 * 80) - 87.93 * (1 + 23.65e-6 * 230), 12);
    expect(r.warnings.join(" ")).not.toMatch(/outside/);
    expect(r.hotCaution).toBe("seize");
  });

  test("from an ambient other than 20 °C: the difference of the strains from 20 °C", () => {
    // 2618 from 30 °C to 250 °C: 23.65e-6 × 230 − 22.3e-6 × 10 = 5.2165e-3
    expect(thermalGrowth(materialById("forged-2618"), kelvin(30), kelvin(250))).toBeCloseTo(23.65e-6 * 230 - 22.3e-6 * 10, 15);
    // up to 100 °C it is α·ΔT with the 20–100 °C mean (ASM: 22.3), whatever the ambient
    expect(thermalGrowth(materialById("forged-2618"), kelvin(15), kelvin(95))).toBeCloseTo(22.3e-6 * 80, 15);
    // and it is continuous at 100 °C, where the tabulated means take over
    expect(thermalGrowth(materialById("forged-2618"), kelvin(20), kelvin(100.001))).toBeCloseTo(22.3e-6 * 80.001, 8);
  });
});

describe("piston-to-wall", () => {
  test("cold clearance is bore minus piston; per inch of diameter", () => {
    const r = calculateClearance({ kind: "piston-to-wall", bore: { value: 4.03, unit: "in" }, piston: { value: 4.0265, unit: "in" } });
    expect(convert(r.clearance_mm, "mm", "thou")).toBeCloseTo(3.5, 9);
    expect(r.perInchOfDiameter).toBeCloseTo(0.0035 / 4.03, 12);
    expect(r.hotClearance_mm).toBeUndefined();
    expect(r.verdict).toBeUndefined();
    expect(r.warnings).toEqual([]);
  });

  test("hot clearance from ΔD = D·α·ΔT for each part, by hand with the handbook values", () => {
    // grey iron liner (Callister B.6: 11.4e-6) at 100 °C, 2618 piston (ASM: 22.3e-6, 20–100 °C) at 100 °C, from 20 °C
    // hot bore   = 88.000 × (1 + 11.4e-6 × 80) = 88.080256 mm
    // hot piston = 87.930 × (1 + 22.3e-6 × 80) = 88.086867… mm
    const hotBore = 88 * (1 + 11.4e-6 * 80);
    const hotPiston = 87.93 * (1 + 22.3e-6 * 80);
    const thermal = {
      ambient: { value: 20, unit: "degC" as const },
      boreTemperature: { value: 100, unit: "degC" as const },
      pistonTemperature: { value: 100, unit: "degC" as const },
      boreMaterial: "grey-cast-iron",
      pistonMaterial: "forged-2618",
    };
    const r = calculateClearance({
      kind: "piston-to-wall",
      bore: { value: 88, unit: "mm" },
      piston: { value: 87.93, unit: "mm" },
      thermal,
    });
    expect(r.clearance_mm).toBeCloseTo(0.07, 12);
    expect(r.hotClearance_mm).toBeCloseTo(hotBore - hotPiston, 12);
    expect(r.warnings.join(" ")).toMatch(/negative/);
    // the same in °F and with the coefficients given directly
    const f = calculateClearance({
      kind: "piston-to-wall",
      bore: { value: 88, unit: "mm" },
      piston: { value: 87.93, unit: "mm" },
      thermal: {
        ambient: { value: 68, unit: "degF" },
        boreTemperature: { value: 212, unit: "degF" },
        pistonTemperature: { value: 212, unit: "degF" },
        boreMaterial: { alphaPerK: 11.4e-6 },
        pistonMaterial: { alphaPerK: 22.3e-6 },
      },
    });
    expect(f.hotClearance_mm).toBeCloseTo(hotBore - hotPiston, 9);
    // common spellings of the table's ids are accepted
    const alias = calculateClearance({
      kind: "piston-to-wall",
      bore: { value: 88, unit: "mm" },
      piston: { value: 87.93, unit: "mm" },
      thermal: { ...thermal, pistonMaterial: "2618" },
    });
    expect(alias.hotClearance_mm).toBeCloseTo(hotBore - hotPiston, 12);
  });

  test("a hot clearance near zero is a warning of its own, whatever the cold verdict says", () => {
    // ΔD = D·α·ΔT with the coefficients given directly (grey iron 11.4e-6, Callister B.6; 2618 22.3e-6, ASM Vol. 2):
    // hot bore   = 88.000 × (1 + 11.4e-6 × 80) = 88.080256 mm
    // hot piston = 87.935 × (1 + 22.3e-6 × 70) = 88.0722666… mm → hot clearance 0.0079895 mm
    // The limit, 0.00025 in per in of bore (0.022 mm here), is common practice, no published source.
    const thermal = (pistonC: number) =>
      hotPistonToWall({
        boreTemperature: { value: 100, unit: "degC" },
        pistonTemperature: { value: pistonC, unit: "degC" },
        boreMaterial: { alphaPerK: 11.4e-6 },
        pistonMaterial: { alphaPerK: 22.3e-6 },
      }).thermal as never;
    const spec = { min: { value: 0.05, unit: "mm" as const }, max: { value: 0.08, unit: "mm" as const } };
    const tight = calculateClearance({
      kind: "piston-to-wall",
      bore: { value: 88, unit: "mm" },
      piston: { value: 87.935, unit: "mm" },
      thermal: thermal(90),
      spec,
    });
    expect(tight.hotClearance_mm).toBeCloseTo(88 * (1 + 11.4e-6 * 80) - 87.935 * (1 + 22.3e-6 * 70), 12);
    expect(tight.hotClearance_mm).toBeCloseTo(0.008, 3);
    expect(tight.verdict).toBe("within"); // the cold clearance, 0.065 mm, is within 0.05–0.08
    expect(tight.hotCaution).toBe("tight");
    expect(tight.warnings.join(" ")).toMatch(/Hot clearance is near zero/);
    expect(HOT_CLEARANCE_MIN_PER_DIAMETER * 88).toBeCloseTo(0.022, 12);
    // 87.90 mm at 90 °C: hot clearance 88.080256 − 88.0372119 = 0.0430 mm, over the limit: no caution.
    const roomy = calculateClearance({
      kind: "piston-to-wall",
      bore: { value: 88, unit: "mm" },
      piston: { value: 87.9, unit: "mm" },
      thermal: thermal(90),
    });
    expect(roomy.hotClearance_mm).toBeCloseTo(0.043044, 5);
    expect(roomy.hotCaution).toBeUndefined();
    expect(roomy.warnings).toEqual([]);
    // negative: the seize warning, not the near-zero one
    const seize = calculateClearance({
      kind: "piston-to-wall",
      bore: { value: 88, unit: "mm" },
      piston: { value: 87.93, unit: "mm" },
      thermal: thermal(150),
    });
    expect(seize.hotCaution).toBe("seize");
    expect(seize.warnings.join(" ")).not.toMatch(/near zero/);
  });

  test("a piston larger than its bore gives a negative clearance with a warning", () => {
    const r = calculateClearance({ kind: "piston-to-wall", bore: { value: 94, unit: "mm" }, piston: { value: 94.01, unit: "mm" } });
    expect(r.clearance_mm).toBeCloseTo(-0.01, 12);
    expect(r.warnings.join(" ")).toMatch(/larger than the bore/);
  });

  test("verdicts against a spec, with a warning outside it", () => {
    const base = { kind: "piston-to-wall" as const, bore: { value: 94, unit: "mm" as const } };
    const spec = { min: { value: 40, unit: "um" as const }, max: { value: 0.06, unit: "mm" as const } };
    const within = calculateClearance({ ...base, piston: { value: 93.95, unit: "mm" }, spec });
    expect(within.verdict).toBe("within");
    expect(within.warnings).toEqual([]);
    const below = calculateClearance({ ...base, piston: { value: 93.97, unit: "mm" }, spec });
    expect(below.verdict).toBe("below");
    expect(below.warnings.join(" ")).toMatch(/below the spec minimum/);
    const above = calculateClearance({ ...base, piston: { value: 93.93, unit: "mm" }, spec });
    expect(above.verdict).toBe("above");
    expect(calculateClearance({ ...base, piston: { value: 93.93, unit: "mm" }, spec: { min: { value: 0.04, unit: "mm" } } }).verdict).toBe(
      "within",
    );
  });
});

describe("bearing oil clearance", () => {
  test("direct: bearing bore minus journal", () => {
    const r = calculateClearance({ kind: "bearing", journal: { value: 2.0, unit: "in" }, bearingBore: { value: 2.0025, unit: "in" } });
    expect(convert(r.clearance_mm, "mm", "in")).toBeCloseTo(0.0025, 12);
    expect(r.perInchOfDiameter).toBeCloseTo(0.00125, 12);
  });

  test("housing bore minus two shells minus journal", () => {
    // 2.1500 − 2 × 0.0735 − 2.0000 = 0.0030 in
    const r = calculateClearance({
      kind: "bearing",
      journal: { value: 2.0, unit: "in" },
      housingBore: { value: 2.15, unit: "in" },
      shellThickness: { value: 0.0735, unit: "in" },
      spec: { min: { value: 0.002, unit: "in" }, max: { value: 0.0025, unit: "in" } },
    });
    expect(convert(r.clearance_mm, "mm", "in")).toBeCloseTo(0.003, 12);
    expect(r.verdict).toBe("above");
  });

  test("the oil clearance rule of thumb is marked as shop guidance", () => {
    expect(OIL_CLEARANCE_RULE.perInchOfDiameter).toBe(0.001);
    expect(OIL_CLEARANCE_RULE.guidance).toMatch(/shop guidance/);
  });
});

describe("ring end gap", () => {
  test("recommended gap = bore (in) × gap factor: 4.000 in × 0.0045 = 0.018 in", () => {
    const r = calculateClearance({ kind: "ring-gap", bore: { value: 4, unit: "in" }, gapPerBore: 0.0045 });
    expect(convert(r.recommendedGap_mm!, "mm", "in")).toBeCloseTo(0.018, 12);
    expect(r.verdict).toBeUndefined();
    const metric = calculateClearance({ kind: "ring-gap", bore: { value: 88, unit: "mm" }, gapPerBore: 0.005 });
    expect(metric.recommendedGap_mm).toBeCloseTo(88 * 0.005, 12); // the factor is dimensionless
  });

  test("a measured gap is checked against the recommended one", () => {
    const base = { kind: "ring-gap" as const, bore: { value: 4, unit: "in" as const }, gapPerBore: 0.0045 };
    const small = calculateClearance({ ...base, measuredGap: { value: 12, unit: "thou" } });
    expect(small.verdict).toBe("below");
    expect(small.warnings.length).toBeGreaterThan(0);
    expect(calculateClearance({ ...base, measuredGap: { value: 20, unit: "thou" } }).verdict).toBe("within");
    expect(calculateClearance({ ...base, measuredGap: { value: 30, unit: "thou" } }).verdict).toBe("above");
    // with a spec, the spec decides
    const spec = { min: { value: 0.016, unit: "in" as const }, max: { value: 0.02, unit: "in" as const } };
    expect(calculateClearance({ ...base, measuredGap: { value: 17, unit: "thou" }, spec }).verdict).toBe("within");
  });

  test("gap factors by application are marked as shop guidance", () => {
    expect(RING_GAP_FACTORS.length).toBeGreaterThan(2);
    for (const f of RING_GAP_FACTORS) {
      expect(f.guidance).toMatch(/shop guidance/);
      expect(f.gapPerBore).toBeGreaterThan(0.002);
      expect(f.gapPerBore).toBeLessThan(0.01);
    }
  });
});
