import FFT from "fft.js";
import { describe, expect, test } from "vitest";
import { calculateDistortion, type BoreReading, type DistortionResult } from "./index";

const rad = (deg: number) => (deg * Math.PI) / 180;

/** A synthetic bore: r(θ) = R0 + Σ A_k·cos(k·(θ − φ_k)), in mm. */
interface Shape {
  R0: number;
  orders: { k: number; A: number; phiDeg: number }[];
}
const radius = (s: Shape, thetaDeg: number) => s.R0 + s.orders.reduce((sum, o) => sum + o.A * Math.cos(o.k * rad(thetaDeg - o.phiDeg)), 0);

/** Radial readings at n equally spaced angles over 360°. */
function radialReadings(s: Shape, n: number, depth = 20, start = 0): BoreReading[] {
  return Array.from({ length: n }, (_, j) => {
    const a = start + (360 * j) / n;
    return { depth: { value: depth, unit: "mm" }, angleDeg: a, radius: { value: radius(s, a), unit: "mm" } };
  });
}

/** Two-point gauge readings D(θ) = r(θ) + r(θ + 180°) at n equally spaced angles over 180°. */
function diametralReadings(s: Shape, n: number, depth = 20, start = 0): BoreReading[] {
  return Array.from({ length: n }, (_, j) => {
    const a = start + (180 * j) / n;
    return { depth: { value: depth, unit: "mm" }, angleDeg: a, diameter: { value: radius(s, a) + radius(s, a + 180), unit: "mm" } };
  });
}

const order = (r: DistortionResult, k: number, level = 0) => r.levels[level].orders.find((o) => o.order === k);

describe("Fourier orders recovered from synthetic bores", () => {
  const shape: Shape = {
    R0: 44,
    orders: [
      { k: 2, A: 0.01, phiDeg: 30 },
      { k: 3, A: 0.004, phiDeg: 50 },
      { k: 4, A: 0.002, phiDeg: 10 },
    ],
  };

  test("radial readings at 16 angles recover amplitude and phase of orders 2, 3 and 4", () => {
    const r = calculateDistortion({ mode: "radial", readings: radialReadings(shape, 16) });
    for (const o of shape.orders) {
      expect(order(r, o.k)!.radialAmplitude_mm).toBeCloseTo(o.A, 12);
      expect(order(r, o.k)!.phaseDeg).toBeCloseTo(o.phiDeg, 7);
    }
    expect(order(r, 1)!.radialAmplitude_mm).toBeLessThan(1e-12);
    expect(r.levels[0].meanDiameter_mm).toBeCloseTo(88, 12);
    // orders up to (16 − 1)/2 = 7 are resolvable; nothing beyond
    expect(r.levels[0].orders.map((o) => o.order)).toEqual([1, 2, 3, 4, 5, 6, 7]);
  });

  test("phases are in [0°, 360°/k) and follow the readings' start angle and order", () => {
    const s: Shape = {
      R0: 47,
      orders: [
        { k: 2, A: 0.008, phiDeg: 170 },
        { k: 3, A: 0.003, phiDeg: 115 },
      ],
    };
    // start at 7°, give the readings shuffled and with angles written as negative or above 360°
    const readings = radialReadings(s, 12, 30, 7).map((x, j) => ({
      ...x,
      angleDeg: j % 3 === 0 ? x.angleDeg - 360 : j % 3 === 1 ? x.angleDeg + 360 : x.angleDeg,
    }));
    readings.reverse();
    const r = calculateDistortion({ mode: "radial", readings });
    // φ2 = 170° lies in [0, 180); φ3 = 115° lies in [0, 120)
    expect(order(r, 2)!.phaseDeg).toBeCloseTo(170, 7);
    expect(order(r, 3)!.phaseDeg).toBeCloseTo(115, 7);
    for (const o of r.levels[0].orders) {
      expect(o.phaseDeg).toBeGreaterThanOrEqual(0);
      expect(o.phaseDeg).toBeLessThan(360 / o.order);
    }
    // a phase given outside [0, 360/k) is reported inside it: cos(2(θ − 200°)) = cos(2(θ − 20°))
    const wrapped = calculateDistortion({
      mode: "radial",
      readings: radialReadings({ R0: 40, orders: [{ k: 2, A: 0.01, phiDeg: 200 }] }, 8),
    });
    expect(order(wrapped, 2)!.phaseDeg).toBeCloseTo(20, 7);
  });

  test("the spectrum agrees with fft.js (amplitude 2|X_k|/N, phase −arg(X_k)/k)", () => {
    const n = 16;
    const readings = radialReadings(shape, n);
    const r = calculateDistortion({ mode: "radial", readings });
    const fft = new FFT(n);
    const out = fft.createComplexArray() as number[];
    fft.realTransform(
      out,
      readings.map((x) => x.radius!.value),
    );
    fft.completeSpectrum(out);
    for (let k = 1; k <= 7; k++) {
      const re = out[2 * k];
      const im = out[2 * k + 1];
      const amp = (2 * Math.hypot(re, im)) / n;
      expect(order(r, k)!.radialAmplitude_mm).toBeCloseTo(amp, 12);
      if (amp > 1e-9) {
        const period = 360 / k;
        const phi = ((((-Math.atan2(im, re) * 180) / Math.PI / k) % period) + period) % period;
        expect(order(r, k)!.phaseDeg).toBeCloseTo(phi, 7);
      }
    }
    // mean radius: X_0 / N
    expect(r.levels[0].meanDiameter_mm / 2).toBeCloseTo(out[0] / n, 12);
  });

  test("a two-point gauge sees only even orders: A_k is half the cosine amplitude of D(θ)", () => {
    const r = calculateDistortion({ readings: diametralReadings(shape, 8) }); // mode defaults to diametral
    // 8 angles over 180° resolve orders up to 7: the even ones 2, 4, 6
    expect(r.levels[0].orders.map((o) => o.order)).toEqual([2, 4, 6]);
    expect(order(r, 2)!.radialAmplitude_mm).toBeCloseTo(0.01, 12);
    expect(order(r, 2)!.phaseDeg).toBeCloseTo(30, 7);
    expect(order(r, 4)!.radialAmplitude_mm).toBeCloseTo(0.002, 12);
    expect(order(r, 4)!.phaseDeg).toBeCloseTo(10, 7);
    expect(order(r, 3)).toBeUndefined();
    // D(θ) = 88 + 0.02·cos(2(θ − 30°)) + 0.004·cos(4(θ − 10°)), read at 0°, 22.5°, …, 157.5°
    const D = Array.from({ length: 8 }, (_, j) => 88 + 0.02 * Math.cos(2 * rad(22.5 * j - 30)) + 0.004 * Math.cos(4 * rad(22.5 * j - 10)));
    expect(r.levels[0].maxDiameter_mm).toBeCloseTo(Math.max(...D), 12);
    expect(r.levels[0].minDiameter_mm).toBeCloseTo(Math.min(...D), 12);
    expect(r.levels[0].outOfRound_mm).toBeCloseTo(Math.max(...D) - Math.min(...D), 12);
    expect(r.levels[0].meanDiameter_mm).toBeCloseTo(88, 12);
  });

  test("an order-3 (three-lobed) bore read with a two-point gauge shows no order 3 and no out-of-round", () => {
    const lobed: Shape = { R0: 44, orders: [{ k: 3, A: 0.01, phiDeg: 0 }] };
    const two = calculateDistortion({ mode: "diametral", readings: diametralReadings(lobed, 12) });
    expect(order(two, 3)).toBeUndefined();
    expect(two.levels[0].orders.every((o) => o.order % 2 === 0)).toBe(true);
    for (const o of two.levels[0].orders) expect(o.radialAmplitude_mm).toBeLessThan(1e-12);
    expect(two.levels[0].outOfRound_mm).toBeLessThan(1e-12);
    // the same bore read radially shows it
    const radial = calculateDistortion({ mode: "radial", readings: radialReadings(lobed, 12) });
    expect(order(radial, 3)!.radialAmplitude_mm).toBeCloseTo(0.01, 12);
  });

  test("radial readings with opposite pairs give two-point diameters D(θ) = r(θ) + r(θ + 180°)", () => {
    const s: Shape = { R0: 44, orders: [{ k: 2, A: 0.01, phiDeg: 0 }] };
    const r = calculateDistortion({ mode: "radial", readings: radialReadings(s, 8) });
    // max diameter 88 + 2·0.01 at 0°, min 88 − 2·0.01 at 90°
    expect(r.levels[0].maxDiameter_mm).toBeCloseTo(88.02, 12);
    expect(r.levels[0].minDiameter_mm).toBeCloseTo(87.98, 12);
    expect(r.levels[0].outOfRound_mm).toBeCloseTo(0.04, 12);
  });
});

describe("resolvability", () => {
  const ellipse: Shape = { R0: 44, orders: [{ k: 2, A: 0.01, phiDeg: 45 }] };

  test("two angles over 180° (0° and 90°) cannot resolve order 2: left out with a warning", () => {
    const r = calculateDistortion({ readings: diametralReadings({ R0: 44, orders: [{ k: 2, A: 0.01, phiDeg: 0 }] }, 2) });
    expect(r.levels[0].orders).toEqual([]);
    expect(r.warnings.join(" ")).toMatch(/Order 2 cannot be resolved with 2 angles over 180° \(it needs 3\)/);
    // out-of-round is still the max minus min diameter read: 88.02 at 0°, 87.98 at 90°
    expect(r.levels[0].outOfRound_mm).toBeCloseTo(0.04, 12);
    // the same ellipse turned by 45° reads round at 0° and 90°: why two angles are not enough
    const turned = calculateDistortion({ readings: diametralReadings(ellipse, 2) });
    expect(turned.levels[0].outOfRound_mm).toBeLessThan(1e-12);
  });

  test("three angles over 180° resolve order 2; order 4 needs five", () => {
    const r = calculateDistortion({ readings: diametralReadings(ellipse, 3) });
    expect(order(r, 2)!.radialAmplitude_mm).toBeCloseTo(0.01, 12);
    expect(order(r, 2)!.phaseDeg).toBeCloseTo(45, 7);
    expect(order(r, 4)).toBeUndefined();
    expect(r.warnings.join(" ")).toMatch(/Order 4 .* needs 5/);
    const five = calculateDistortion({ readings: diametralReadings(ellipse, 5) });
    expect(order(five, 4)).toBeDefined();
    expect(five.warnings.join(" ")).not.toMatch(/Order 4/);
  });

  test("radial: order k needs 2k + 1 angles over 360°", () => {
    const r = calculateDistortion({ mode: "radial", readings: radialReadings(ellipse, 4) });
    expect(r.levels[0].orders.map((o) => o.order)).toEqual([1]);
    expect(r.warnings.join(" ")).toMatch(/Order 2 cannot be resolved with 4 angles over 360° \(it needs 5\)/);
    expect(r.warnings.join(" ")).toMatch(/Order 3 .* needs 7/);
    const seven = calculateDistortion({ mode: "radial", readings: radialReadings(ellipse, 7) });
    expect(seven.levels[0].orders.map((o) => o.order)).toEqual([1, 2, 3]);
    expect(order(seven, 2)!.radialAmplitude_mm).toBeCloseTo(0.01, 12);
  });

  test("angles that are not equally spaced leave the orders out with a warning", () => {
    const readings = [0, 30, 90, 120].map((a) => ({
      depth: { value: 10, unit: "mm" as const },
      angleDeg: a,
      diameter: { value: 88 + 0.01 * Math.cos(2 * rad(a)), unit: "mm" as const },
    }));
    const r = calculateDistortion({ readings });
    expect(r.levels[0].orders).toEqual([]);
    expect(r.warnings.join(" ")).toMatch(/not equally spaced over 180°/);
  });
});

describe("levels, taper and comparison", () => {
  /** Readings of a round bore whose diameter depends on depth, 4 angles per level. */
  const byDepth = (diameters: Record<number, number>, ovality = 0): BoreReading[] =>
    Object.entries(diameters).flatMap(([depth, d]) =>
      [0, 45, 90, 135].map((a) => ({
        depth: { value: Number(depth), unit: "mm" as const },
        angleDeg: a,
        diameter: { value: d + ovality * Math.cos(2 * rad(a)), unit: "mm" as const },
      })),
    );

  test("levels are sorted by depth; taper is largest minus smallest mean, top-to-bottom is signed", () => {
    // a barrel-shaped bore: 88.004 at the top (10 mm), 88.010 in the middle (50 mm), 88.000 at the bottom (90 mm)
    const r = calculateDistortion({ readings: byDepth({ 90: 88.0, 10: 88.004, 50: 88.01 }) });
    expect(r.levels.map((l) => l.depth_mm)).toEqual([10, 50, 90]);
    expect(r.levels.map((l) => l.meanDiameter_mm)).toEqual([88.004, 88.01, 88.0].map((x) => expect.closeTo(x, 12)));
    expect(r.taper_mm).toBeCloseTo(0.01, 12);
    expect(r.taperTopToBottom_mm).toBeCloseTo(0.004, 12);
    const hourglass = calculateDistortion({ readings: byDepth({ 10: 88.0, 50: 87.99, 90: 88.008 }) });
    expect(hourglass.taperTopToBottom_mm).toBeCloseTo(-0.008, 12);
    expect(hourglass.taper_mm).toBeCloseTo(0.018, 12);
  });

  test("readings in inches and depths in inches give the same figures in mm", () => {
    const mm = calculateDistortion({ readings: byDepth({ 25.4: 88.9, 50.8: 88.925 }, 0.005) });
    const inch = calculateDistortion({
      readings: byDepth({ 25.4: 88.9, 50.8: 88.925 }, 0.005).map((x) => ({
        ...x,
        depth: { value: x.depth.value / 25.4, unit: "in" as const },
        diameter: { value: x.diameter!.value / 25.4, unit: "in" as const },
      })),
    });
    expect(inch.levels.map((l) => l.depth_mm)).toEqual(mm.levels.map((l) => expect.closeTo(l.depth_mm, 9)));
    expect(inch.taper_mm).toBeCloseTo(mm.taper_mm, 9);
    expect(inch.levels[0].outOfRound_mm).toBeCloseTo(mm.levels[0].outOfRound_mm, 9);
  });

  test("compareTo gives the same figures as differences (torque plate on minus free)", () => {
    const free = byDepth({ 10: 88.002, 50: 88.0, 90: 88.0 }, 0.001);
    const plate = byDepth({ 10: 88.008, 50: 88.003, 90: 88.0 }, 0.004);
    const r = calculateDistortion({ readings: plate, compareTo: { readings: free } });
    expect(r.compared).toBeDefined();
    expect(r.difference!.taper_mm).toBeCloseTo(0.008 - 0.002, 12);
    expect(r.difference!.taperTopToBottom_mm).toBeCloseTo(0.008 - 0.002, 12);
    expect(r.difference!.levels).toHaveLength(3);
    // ovality a·cos(2θ) read at 0°, 45°, 90°, 135°: out-of-round 2a; order-2 radial amplitude a/2
    expect(r.difference!.levels[0].outOfRound_mm).toBeCloseTo(2 * 0.004 - 2 * 0.001, 12);
    expect(r.difference!.levels[0].meanDiameter_mm).toBeCloseTo(0.006, 12);
    expect(r.difference!.levels[0].orders.find((o) => o.order === 2)!.radialAmplitude_mm).toBeCloseTo((0.004 - 0.001) / 2, 12);
  });

  test("a single depth gives zero taper and a warning; a far-off reference warns about units", () => {
    const r = calculateDistortion({ readings: byDepth({ 20: 88.0 }), reference: { value: 3.4646, unit: "mm" } });
    expect(r.taper_mm).toBe(0);
    expect(r.taperTopToBottom_mm).toBe(0);
    expect(r.warnings.join(" ")).toMatch(/one depth/);
    expect(r.warnings.join(" ")).toMatch(/reference/);
  });
});
