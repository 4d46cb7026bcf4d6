import fc from "fast-check";
import { describe, expect, test } from "vitest";
import {
  NUT_FACTOR_PRESETS,
  PROPERTY_CLASSES,
  THREAD_PRESETS,
  calculatePreload,
  convert,
  strengthFor,
  threadGeometry,
  type PreloadInput,
} from "./index";

describe("nut-factor model against Shigley", () => {
  test("Shigley 9th ed., Eq. 8-27 (T = K·Fi·d) and Example 8-3(b): 3/4-16 UNF, Fi = 25 kip, K = 0.2 → T = 3750 lbf·in", () => {
    const r = calculatePreload({
      thread: "3/4-16 UNF",
      direction: "preload-to-torque",
      preload: { value: 25000, unit: "lbf" },
      method: { kind: "nut-factor", k: 0.2 },
    });
    expect(convert(r.torque_Nm, "N.m", "in.lbf")).toBeCloseTo(3750, 6);
    expect(convert(r.preload_N, "N", "lbf")).toBeCloseTo(25000, 6);
  });

  test("the same example read backwards: 3750 lbf·in with K = 0.2 on 3/4-16 gives 25 kip", () => {
    const r = calculatePreload({
      thread: "3/4-16",
      torque: { value: 3750, unit: "in.lbf" },
      method: { kind: "nut-factor", k: 0.2 },
    });
    expect(convert(r.preload_N, "N", "lbf")).toBeCloseTo(25000, 6);
    expect(r.torqueSplit).toBeUndefined();
  });

  test("nut-factor presets match Shigley 9th ed., Table 8-15 (torque factors K)", () => {
    // Table 8-15, from memory of the book: non-plated black finish 0.30, zinc-plated 0.20,
    // lubricated 0.18, cadmium-plated 0.16, with an anti-seize compound 0.12. The text of
    // §8-8 uses K = 0.20 when the bolt condition is not stated.
    const k = (c: string) => NUT_FACTOR_PRESETS.find((p) => p.condition === c)?.k;
    expect(k("dry-black-oxide")).toBe(0.3);
    expect(k("dry")).toBe(0.2);
    expect(k("oiled")).toBe(0.18);
    expect(k("anti-seize")).toBe(0.12);
    expect(k("custom")).toBeUndefined();
    for (const p of NUT_FACTOR_PRESETS) expect(p.source.length).toBeGreaterThan(10);
    for (const c of ["dry", "oiled", "moly-paste", "anti-seize", "custom"]) {
      expect(NUT_FACTOR_PRESETS.some((p) => p.condition === c)).toBe(true);
    }
  });
});

describe("friction model (ISO 16047 / VDI 2230 form)", () => {
  test("M12x1.5, F = 50 kN, μth = μhead = 0.12, Db = 17 mm: the three terms summed by hand", () => {
    // d2 = 12 − 0.649519 × 1.5 = 11.0257215 mm (ISO 724 basic pitch diameter).
    // pitch term:  F·P/(2π)               = 50000 × 0.0015 / (2π)                    = 11.936621 N·m
    // thread term: F·μth·d2/(2·cos 30°)   = 50000 × 0.12 × 0.0110257215 / 1.7320508  = 38.194220 N·m
    // head term:   F·μhead·Db/2           = 50000 × 0.12 × 0.017 / 2                 = 51.000000 N·m
    // total                                                                          = 101.130841 N·m
    const r = calculatePreload({
      thread: "M12x1.5",
      direction: "preload-to-torque",
      preload: { value: 50, unit: "kN" },
      method: { kind: "friction", muThread: 0.12, muHead: 0.12, headDiameter: { value: 17, unit: "mm" } },
    });
    expect(r.torqueSplit).toBeDefined();
    expect(r.torqueSplit!.pitch_Nm).toBeCloseTo(11.936621, 5);
    expect(r.torqueSplit!.threadFriction_Nm).toBeCloseTo(38.19422, 4);
    expect(r.torqueSplit!.headFriction_Nm).toBeCloseTo(51.0, 9);
    expect(r.torque_Nm).toBeCloseTo(11.936621 + 38.19422 + 51.0, 4);
    const s = r.torqueSplit!;
    expect(s.pitch_Nm + s.threadFriction_Nm + s.headFriction_Nm).toBeCloseTo(r.torque_Nm, 9);
  });

  test("close to the rounded VDI 2230 Part 1 approximation T = F·(0.16·P + 0.58·d2·μG + μK·DKm/2)", () => {
    const r = calculatePreload({
      thread: "M10x1.25",
      direction: "preload-to-torque",
      preload: { value: 30, unit: "kN" },
      method: { kind: "friction", muThread: 0.1, muHead: 0.14, headDiameter: { value: 14.5, unit: "mm" } },
    });
    const d2 = 10 - 0.649519 * 1.25;
    const vdi = (30000 * (0.16 * 1.25 + 0.58 * d2 * 0.1 + (0.14 * 14.5) / 2)) / 1000;
    expect(Math.abs(r.torque_Nm - vdi) / vdi).toBeLessThan(0.005);
  });

  test("torque → preload → torque round trips for both models (fast-check)", () => {
    const threads = THREAD_PRESETS.map((t) => t.designation);
    const method = fc.oneof(
      fc.record({ kind: fc.constant("nut-factor" as const), k: fc.double({ min: 0.05, max: 0.5, noNaN: true }) }),
      fc.record({
        kind: fc.constant("friction" as const),
        muThread: fc.double({ min: 0.05, max: 0.5, noNaN: true }),
        muHead: fc.double({ min: 0.05, max: 0.5, noNaN: true }),
        headDiameter: fc.record({ value: fc.double({ min: 5, max: 40, noNaN: true }), unit: fc.constant("mm" as const) }),
      }),
    );
    fc.assert(
      fc.property(
        fc.constantFrom(...threads),
        fc.double({ min: 1, max: 500, noNaN: true }),
        fc.constantFrom("N.m" as const, "ft.lbf" as const, "in.lbf" as const),
        method,
        (thread, t, unit, m) => {
          const a = calculatePreload({ thread, torque: { value: t, unit }, method: m });
          const b = calculatePreload({
            thread,
            direction: "preload-to-torque",
            preload: { value: a.preload_N, unit: "N" },
            method: m,
          });
          expect(Math.abs(b.torque_Nm - convert(t, unit, "N.m")) / convert(t, unit, "N.m")).toBeLessThan(1e-12);
          expect(Math.abs(b.preload_N - a.preload_N) / a.preload_N).toBeLessThan(1e-12);
        },
      ),
      { numRuns: 300 },
    );
  });
});

describe("strength tables", () => {
  test("ISO 898-1:2013, Table 3: class 8.8 differs for d ≤ 16 mm and d > 16 mm; 10.9 and 12.9", () => {
    // Typed from memory of Table 3 (minimum ReL/Rp0.2, stress under proof load Sp, minimum Rm), in MPa.
    const expected: [string, number, number, number, number][] = [
      ["8.8", 12, 640, 580, 800],
      ["8.8", 16, 640, 580, 800],
      ["8.8", 20, 660, 600, 830],
      ["10.9", 12, 940, 830, 1040],
      ["10.9", 24, 940, 830, 1040],
      ["12.9", 10, 1100, 970, 1220],
    ];
    for (const [cls, d, y, proof, rm] of expected) {
      const s = strengthFor(cls as "8.8", d);
      expect([s.yield_MPa, s.proof_MPa, s.tensile_MPa]).toEqual([y, proof, rm]);
    }
  });

  test("SAE J429, Table 1: grades 5 and 8 in ksi, grade 5 lower above 1 in", () => {
    // Typed from memory of SAE J429: grade 5, 1/4–1 in: proof 85, yield 92, tensile 120 ksi;
    // over 1 to 1-1/2 in: 74, 81, 105 ksi. Grade 8, 1/4–1-1/2 in: 120, 130, 150 ksi.
    const ksi = (mpa: number) => convert(mpa, "MPa", "ksi");
    const g5 = strengthFor("SAE-5", 0.5 * 25.4);
    expect([ksi(g5.proof_MPa), ksi(g5.yield_MPa), ksi(g5.tensile_MPa)].map((x) => Number(x.toFixed(9)))).toEqual([85, 92, 120]);
    const g5big = strengthFor("SAE-5", 1.25 * 25.4);
    expect([ksi(g5big.proof_MPa), ksi(g5big.yield_MPa), ksi(g5big.tensile_MPa)].map((x) => Number(x.toFixed(9)))).toEqual([74, 81, 105]);
    const g8 = strengthFor("SAE-8", 0.75 * 25.4);
    expect([ksi(g8.proof_MPa), ksi(g8.yield_MPa), ksi(g8.tensile_MPa)].map((x) => Number(x.toFixed(9)))).toEqual([120, 130, 150]);
  });

  test("every property class names its standard and table", () => {
    for (const pc of PROPERTY_CLASSES) expect(pc.source).toMatch(/ISO 898-1|SAE J429/);
  });
});

describe("stress, percent of yield and warnings", () => {
  const atStress = (thread: string, stress_MPa: number, material: PreloadInput["material"]) => {
    const As = threadGeometry(thread).stressArea_mm2;
    return calculatePreload({
      thread,
      direction: "preload-to-torque",
      preload: { value: stress_MPa * As, unit: "N" },
      method: { kind: "nut-factor", k: 0.15 },
      material,
    });
  };

  test("stress is preload over the stress area", () => {
    // 7/16-20: As = 0.1187 in² (ASME B1.1); 10 000 lbf over it is 84 246 psi.
    const r = calculatePreload({
      thread: "7/16-20",
      direction: "preload-to-torque",
      preload: { value: 10000, unit: "lbf" },
      method: { kind: "nut-factor", k: 0.2 },
    });
    expect(convert(r.stress_MPa, "MPa", "psi") / (10000 / 0.1187)).toBeCloseTo(1, 3);
  });

  test("class 8.8 yield is size dependent: 650 MPa is past yield on M16, not on M20", () => {
    expect(atStress("M16", 650, { propertyClass: "8.8" }).percentOfYield).toBeCloseTo((650 / 640) * 100, 9);
    expect(atStress("M20", 650, { propertyClass: "8.8" }).percentOfYield).toBeCloseTo((650 / 660) * 100, 9);
  });

  test("no warning below 90 %, one past 90 %, another past 100 %", () => {
    const below = atStress("M12", 0.85 * 640, { propertyClass: "8.8" });
    expect(below.percentOfYield).toBeCloseTo(85, 9);
    expect(below.warnings).toEqual([]);
    const past90 = atStress("M12", 0.95 * 640, { propertyClass: "8.8" });
    expect(past90.percentOfYield).toBeCloseTo(95, 9);
    expect(past90.warnings).toHaveLength(1);
    expect(past90.warnings[0]).toMatch(/90 %/);
    const past100 = atStress("M12", 1.05 * 640, { propertyClass: "8.8" });
    expect(past100.warnings).toHaveLength(2);
    expect(past100.warnings.join(" ")).toMatch(/yield/);
  });

  test("a given yield strength and SAE grades", () => {
    expect(atStress("M12x1.5", 1170, { yieldStrength: { value: 1300, unit: "MPa" } }).percentOfYield).toBeCloseTo(90, 9);
    // SAE J429 grade 5, 7/16 in: yield 92 ksi
    const g5 = atStress("7/16-20", convert(46, "ksi", "MPa"), { propertyClass: "SAE-5" });
    expect(g5.percentOfYield).toBeCloseTo(50, 9);
    expect(g5.warnings).toEqual([]);
    const g8 = atStress("7/16-20", convert(65, "ksi", "MPa"), { propertyClass: "SAE-8" });
    expect(g8.percentOfYield).toBeCloseTo(50, 9);
  });

  test("no material, no percentOfYield", () => {
    const r = atStress("M10", 500, undefined);
    expect(r.percentOfYield).toBeUndefined();
    expect(r.elongation_mm).toBeUndefined();
  });
});

describe("elongation over the grip", () => {
  test("published example: Engineering ToolBox, 'Bolt Stretching and Tensile Stress' (7/8-9 stud, 10 000 lb, 5 in, E = 30×10⁶ psi → 0.0036 in)", () => {
    // The example computes A = 0.7854·(7/8 − 0.9743/9)² = 0.46 in², dl = F·L/(E·A) = 0.0036 in
    // and σ = 21 740 psi (with A rounded to 0.46).
    const r = calculatePreload({
      thread: "7/8-9",
      direction: "preload-to-torque",
      preload: { value: 10000, unit: "lbf" },
      method: { kind: "nut-factor", k: 0.2 },
      grip: { length: { value: 5, unit: "in" }, modulus: { value: 30000, unit: "ksi" } },
    });
    expect(Math.abs(convert(r.elongation_mm!, "mm", "in") - 0.0036)).toBeLessThan(0.00005);
    expect(Math.abs(convert(r.stress_MPa, "MPa", "psi") - 21740) / 21740).toBeLessThan(0.005);
  });

  test("Hooke's law by hand: M12x1.5, 50 kN, 120 mm, 205 GPa", () => {
    // δ = F·L/(As·E) = 50 000 × 120 / (88.126 × 205 000) = 0.33211 mm (As from ISO 898-1's formula, 88.1 in its table)
    const r = calculatePreload({
      thread: "M12x1.5",
      direction: "preload-to-torque",
      preload: { value: 50, unit: "kN" },
      method: { kind: "nut-factor", k: 0.15 },
      grip: { length: { value: 120, unit: "mm" }, modulus: { value: 205, unit: "GPa" } },
    });
    expect(r.elongation_mm).toBeCloseTo((50000 * 120) / (88.126 * 205000), 4);
  });
});
