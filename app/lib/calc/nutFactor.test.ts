import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { ZodError } from "zod";
import { calculatePreload, convert, fitNutFactor, type NutFactorPoint } from "./index";

const pts = (rows: [number, number][], tUnit: "N.m" | "ft.lbf" = "N.m", fUnit: "N" | "kN" | "lbf" = "N"): NutFactorPoint[] =>
  rows.map(([t, f]) => ({ torque: { value: t, unit: tUnit }, preload: { value: f, unit: fUnit } }));

describe("fitNutFactor", () => {
  // Check value: common practice, no published source. Clamp-load bench readings of M9x1.25
  // head studs assembled with moly assembly lube: about 5,900 lbf at 45 ft·lbf, 8,200 lbf at
  // 63 ft·lbf, 9,000 lbf at 70 ft·lbf and 11,500 lbf at 85 ft·lbf.
  const bench: [number, number][] = [
    [45, 5900],
    [63, 8200],
    [70, 9000],
    [85, 11500],
  ];

  test("bench readings of M9x1.25 studs with moly lube give K about 0.25–0.26 with CV under 5 % (common practice, no published source)", () => {
    const fit = fitNutFactor(pts(bench, "ft.lbf", "lbf"), "M9x1.25");
    expect(fit.n).toBe(4);
    expect(fit.k).toBeGreaterThanOrEqual(0.25);
    expect(fit.k).toBeLessThanOrEqual(0.26);
    expect(fit.kCoefficientOfVariation).toBeGreaterThan(0);
    expect(fit.kCoefficientOfVariation).toBeLessThan(0.05);
    expect(fit.rSquared).toBeGreaterThan(0.95);
    expect(fit.residuals_N).toHaveLength(4);
  });

  test("the preload calculator with the fitted K lands within 5 % of each bench point (common practice, no published source)", () => {
    const fit = fitNutFactor(pts(bench, "ft.lbf", "lbf"), "M9x1.25");
    for (const [t, f] of bench) {
      const r = calculatePreload({ thread: "M9x1.25", torque: { value: t, unit: "ft.lbf" }, method: { kind: "nut-factor", k: fit.k } });
      expect(Math.abs(convert(r.preload_N, "N", "lbf") - f) / f).toBeLessThan(0.05);
    }
  });

  test("per-point K, its sample standard deviation and CV computed by hand", () => {
    // M10 (d = 10 mm). K_i = T_i / (F_i · d):
    //   20 N·m / (10 000 N × 0.010 m) = 0.20
    //   44 N·m / (20 000 N × 0.010 m) = 0.22
    //   54 N·m / (30 000 N × 0.010 m) = 0.18
    // mean 0.20; sample std dev sqrt((0 + 0.02² + 0.02²)/2) = 0.02; CV = 0.1
    const fit = fitNutFactor(pts([[20, 10000], [44, 20000], [54, 30000]]), "M10");
    expect(fit.kStdDev).toBeCloseTo(0.02, 12);
    expect(fit.kCoefficientOfVariation).toBeCloseTo(0.1, 12);
    // Least squares through the origin: slope = ΣTF/ΣT² = (20·1e4 + 44·2e4 + 54·3e4)/(20² + 44² + 54²)
    const slope = (20 * 1e4 + 44 * 2e4 + 54 * 3e4) / (20 ** 2 + 44 ** 2 + 54 ** 2);
    expect(fit.slope_N_per_Nm).toBeCloseTo(slope, 9);
    expect(fit.k).toBeCloseTo(1 / (slope * 0.01), 12);
    expect(fit.residuals_N[0]).toBeCloseTo(10000 - slope * 20, 6);
    // R² = 1 − SSres/SStot with SStot about the mean clamp load (20 000 N)
    const res = [10000 - slope * 20, 20000 - slope * 44, 30000 - slope * 54];
    const ssRes = res.reduce((a, r) => a + r * r, 0);
    expect(fit.rSquared).toBeCloseTo(1 - ssRes / (1e4 ** 2 + 0 + 1e4 ** 2), 12);
  });

  test("readings made with a known K come back exactly, in any units (fast-check)", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.08, max: 0.4, noNaN: true }),
        fc.array(fc.double({ min: 5, max: 300, noNaN: true }), { minLength: 2, maxLength: 12 }),
        (k, torques) => {
          const d = 0.012; // M12x1.5
          const points = torques.map((t) => ({
            torque: { value: convert(t, "N.m", "ft.lbf"), unit: "ft.lbf" as const },
            preload: { value: t / (k * d) / 1000, unit: "kN" as const },
          }));
          const fit = fitNutFactor(points, "M12x1.5");
          expect(fit.k).toBeCloseTo(k, 9);
          expect(fit.kStdDev).toBeLessThan(1e-9);
          for (const r of fit.residuals_N) expect(Math.abs(r)).toBeLessThan(1e-6);
        },
      ),
      { numRuns: 200 },
    );
  });

  test("one point: K from it, standard deviation 0 and a warning", () => {
    const fit = fitNutFactor(pts([[110, 51000]]), "M12x1.5");
    expect(fit.n).toBe(1);
    expect(fit.k).toBeCloseTo(110 / (51000 * 0.012), 12);
    expect(fit.kStdDev).toBe(0);
    expect(fit.kCoefficientOfVariation).toBe(0);
    expect(fit.warnings.join(" ")).toMatch(/two points/);
  });

  test("invalid points and threads are ZodErrors with paths", () => {
    const paths = (fn: () => unknown) => {
      try {
        fn();
      } catch (e) {
        expect(e).toBeInstanceOf(ZodError);
        return (e as ZodError).issues.map((i) => i.path.join("."));
      }
      throw new Error("did not throw");
    };
    expect(paths(() => fitNutFactor([], "M12x1.5"))).toContain("points");
    expect(paths(() => fitNutFactor(pts([[50, 20000], [60, 0]]), "M12x1.5"))).toContain("points.1.preload.value");
    expect(paths(() => fitNutFactor(pts([[Number.NaN, 20000]]), "M12x1.5"))).toContain("points.0.torque.value");
    expect(paths(() => fitNutFactor(pts([[50, 20000]]), "M13x1.5"))).toContain("thread");
    expect(
      paths(() => fitNutFactor([{ torque: { value: 50, unit: "mm" as "N.m" }, preload: { value: 1, unit: "kN" } }], "M12")),
    ).toContain("points.0.torque.unit");
  });
});
