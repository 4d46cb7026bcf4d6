// What the calculator pages show of a result, worked out in app/lib/calc-ui/*-view.ts.
import { describe, expect, test } from "vitest";
import { calculateClearance, calculateDistortion, calculatePreload } from "~/lib/calc";
import { clearanceView, judgedOf, peekNote } from "./clearance-view";
import { exaggerationFor, largestChange, levelDots, signedIn } from "./distortion-view";
import { overYieldLimit, torqueShares, yieldForceOf, yieldLimits } from "./preload-view";

describe("Preload: the yield figures and the torque split", () => {
  // M12x1.5, class 12.9: ISO 898-1:2013 Table 3, Rp0.2 min 1100 MPa; stress area from ISO 898-1's
  // formula As = π/4·((d2 + d3)/2)² = 88.126 mm² (88.1 in its table). Clamp load at yield = Rp0.2·As.
  const r = calculatePreload({
    thread: "M12x1.5",
    direction: "torque-to-preload",
    torque: { value: 110, unit: "N.m" },
    method: { kind: "nut-factor", k: 0.15 },
    material: { propertyClass: "12.9" },
  });

  test("clamp load at yield is the minimum yield times the stress area (ISO 898-1 Table 3)", () => {
    expect(yieldForceOf(r)).toBeCloseTo(1100 * r.thread.stressArea_mm2, 6);
    expect(r.thread.stressArea_mm2).toBeCloseTo(88.1, 1);
  });

  test("the limits at 90 % of yield, and the torque for them at the model's T/F (T = K·F·d, Shigley 9th ed. Eq. 8-27)", () => {
    const l = yieldLimits(r, 1100 * r.thread.stressArea_mm2);
    expect(l.atLimit_N).toBeCloseTo(0.9 * 1100 * r.thread.stressArea_mm2, 6);
    expect(l.torqueForLimit_Nm).toBeCloseTo(0.15 * l.atLimit_N * 0.012, 6);
    // 110 N·m at K 0.15 on d = 12 mm: F = 61.1 kN, 61.1/96.9 = 63 % of yield, under the limit
    expect(overYieldLimit(r)).toBe(false);
  });

  test("the friction model's torque split adds up to the whole (ISO 16047: pitch, thread and head friction)", () => {
    const f = calculatePreload({
      thread: "M12x1.5",
      direction: "preload-to-torque",
      preload: { value: 30, unit: "kN" },
      method: { kind: "friction", muThread: 0.1, muHead: 0.1, headDiameter: { value: 15, unit: "mm" } },
    });
    const shares = torqueShares(f);
    expect(shares.map((s) => s.what)).toEqual(["Stretching the bolt", "Thread friction", "Head friction"]);
    expect(shares.reduce((a, s) => a + s.percent, 0)).toBeCloseTo(100, 9);
    // the pitch part is F·P/(2π) = 30 000 × 1.5e-3 / (2π) N·m
    expect(shares[0].torque_Nm).toBeCloseTo((30000 * 1.5e-3) / (2 * Math.PI), 9);
    expect(torqueShares(r)).toEqual([]);
  });
});

describe("Bore distortion: the measured dots and their drawing", () => {
  test("a two-point reading is a diameter: half its deviation from the level's mean, at θ and at θ + 180° (ISO 12181-1 terms)", () => {
    const mm = (value: number) => ({ value, unit: "mm" });
    const input = {
      mode: "diametral",
      readings: [0, 45, 90, 135].map((angleDeg, i) => ({ depth: mm(10), angleDeg, diameter: mm([88.006, 88.012, 88.009, 88.003][i]) })),
    };
    const r = calculateDistortion(input as never);
    const dots = levelDots(input, "main", r.levels)[0].dots;
    expect(r.levels[0].meanDiameter_mm).toBeCloseTo(88.0075, 9);
    expect(dots).toHaveLength(8);
    expect(dots[0].angleDeg).toBe(0);
    expect(dots[0].dev_mm).toBeCloseTo((88.006 - 88.0075) / 2, 9);
    expect(dots[1]).toEqual({ angleDeg: 180, dev_mm: dots[0].dev_mm });
  });

  test("the exaggeration is a 1, 2 or 5 × 10ⁿ that draws the largest deviation at no more than 0.28 of the radius", () => {
    // 0.28 × 44 mm / 0.006 mm = 2053 → 2000
    expect(exaggerationFor(0.006, 44)).toBe(2000);
    expect(exaggerationFor(0, 44)).toBe(1);
  });

  test("a change is signed unless it rounds to zero; the largest change keeps its sign", () => {
    expect(signedIn(0.0031, "um")).toBe("+3.1");
    expect(signedIn(0.00001, "um")).toBe("0.0");
    expect(largestChange([0.001, -0.004, 0.003])).toBe(-0.004);
  });
});

describe("Clearances: the verdict in words and the chart's band", () => {
  test("a ring gap without a spec is judged against the shop guidance band, recommended to +25 % (common practice, no published source)", () => {
    // 4.000 in bore × 0.0045 in/in = 0.018 in recommended (the rule of thumb, shop guidance)
    const input = {
      kind: "ring-gap" as const,
      bore: { value: 4, unit: "in" as const },
      gapPerBore: 0.0045,
      measuredGap: { value: 0.02, unit: "in" as const },
    };
    const r = calculateClearance(input);
    const v = clearanceView({ kind: "ring-gap", input, result: r, errors: {} });
    expect(v.bandLabel).toBe("Shop guidance band");
    expect(v.band?.min_mm).toBeCloseTo(0.018 * 25.4, 9);
    expect(v.band?.max_mm).toBeCloseTo(0.018 * 25.4 * 1.25, 9);
    expect(v.verdict).toBe("Measured gap within spec (against the shop guidance band)");
    expect(v.markers.map((m) => m.label)).toEqual(["Recommended", "Measured"]);
  });

  test("piston-to-wall judges the cold clearance; the hot one says its own (ΔD = D·α·ΔT with typed coefficients)", () => {
    const input = {
      kind: "piston-to-wall" as const,
      bore: { value: 88, unit: "mm" as const },
      piston: { value: 87.93, unit: "mm" as const },
      thermal: {
        ambient: { value: 20, unit: "degC" as const },
        boreTemperature: { value: 100, unit: "degC" as const },
        pistonTemperature: { value: 150, unit: "degC" as const },
        boreMaterial: { alphaPerK: 11.4e-6 },
        pistonMaterial: { alphaPerK: 22.3e-6 },
      },
      spec: { min: { value: 0.06, unit: "mm" as const }, max: { value: 0.08, unit: "mm" as const } },
    };
    const r = calculateClearance(input);
    const outcome = { kind: "piston-to-wall" as const, input, result: r, errors: {} };
    const v = clearanceView(outcome);
    expect(judgedOf("piston-to-wall", input)).toBe("Cold clearance");
    expect(v.verdict).toBe("Cold clearance within spec");
    expect(v.hotCaution).toBe("Hot clearance negative: the piston would seize");
    expect(peekNote(outcome)).toBe("Cold clearance within spec · Hot clearance negative: the piston would seize");
  });
});
