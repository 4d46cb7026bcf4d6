import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { ZodError } from "zod";
import { dot, lusolve, matrix, multiply, subtract, transpose, unit as mathUnit } from "mathjs";
import { NUT_FACTOR_R_SQUARED_LABEL, calculatePreload, convert, fitNutFactor, type NutFactorPoint } from "./index";

const mathUnitFtLbf = (nm: number) => mathUnit(nm, "N m").toNumber("ft lbf");

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
    const fit = fitNutFactor(
      pts([
        [20, 10000],
        [44, 20000],
        [54, 30000],
      ]),
      "M10",
    );
    expect(fit.kStdDev).toBeCloseTo(0.02, 12);
    expect(fit.kCoefficientOfVariation).toBeCloseTo(0.1, 12);
    // Least squares through the origin: slope = ΣTF/ΣT² = (20·1e4 + 44·2e4 + 54·3e4)/(20² + 44² + 54²)
    const slope = (20 * 1e4 + 44 * 2e4 + 54 * 3e4) / (20 ** 2 + 44 ** 2 + 54 ** 2);
    expect(fit.slope_N_per_Nm).toBeCloseTo(slope, 9);
    expect(fit.k).toBeCloseTo(1 / (slope * 0.01), 12);
    expect(fit.residuals_N[0]).toBeCloseTo(10000 - slope * 20, 6);
    // R² of a line through the origin: 1 − SSres/ΣF², the total sum of squares about zero
    // (Eisenhauer, "Regression through the origin", Teaching Statistics 25(3), 2003).
    const res = [10000 - slope * 20, 20000 - slope * 44, 30000 - slope * 54];
    const ssRes = res.reduce((a, r) => a + r * r, 0);
    expect(fit.rSquared).toBeCloseTo(1 - ssRes / (1e4 ** 2 + 2e4 ** 2 + 3e4 ** 2), 12);
  });

  // R² for a line without intercept is 1 − Σr²/Σy², the sum of squares taken about zero: R's
  // summary.lm ("y* is the mean of y[i] if there is an intercept and zero otherwise") and
  // Eisenhauer, "Regression through the origin", Teaching Statistics 25(3), 2003.
  describe("R² of the line through the origin (uncentred)", () => {
    /** Slope by least squares with mathjs (normal equations XᵀX·b = XᵀF), and R² about zero. */
    function mathjsFit(T: number[], F: number[]) {
      const X = matrix(T.map((t) => [t]));
      const y = matrix(F.map((f) => [f]));
      const b = lusolve(multiply(transpose(X), X), multiply(transpose(X), y)) as unknown as number[][] | { toArray(): number[][] };
      const slope = (Array.isArray(b) ? b : b.toArray())[0][0];
      const r = (subtract(y, multiply(X, slope)) as unknown as { toArray(): number[][] }).toArray().map((row) => row[0]);
      return { slope, rSquared: 1 - dot(r, r) / dot(F, F) };
    }

    test("worked by hand: (10 N·m, 10 kN), (20 N·m, 30 kN) give slope 1400 N/N·m and R² 0.98, not the centred 0.9", () => {
      // slope = ΣTF/ΣT² = (10·10 000 + 20·30 000)/(10² + 20²) = 700 000/500 = 1400
      // residuals 10 000 − 14 000 = −4000 and 30 000 − 28 000 = 2000: SSres = 2e7
      // ΣF² = 1e8 + 9e8 = 1e9, so R² = 1 − 2e7/1e9 = 0.98 (about the mean: 1 − 2e7/2e8 = 0.9)
      const fit = fitNutFactor(
        pts([
          [10, 10000],
          [20, 30000],
        ]),
        "M10",
      );
      expect(fit.slope_N_per_Nm).toBeCloseTo(1400, 9);
      expect(fit.rSquared).toBeCloseTo(0.98, 12);
      const m = mathjsFit([10, 20], [10000, 30000]);
      expect(fit.slope_N_per_Nm).toBeCloseTo(m.slope, 9);
      expect(fit.rSquared).toBeCloseTo(m.rSquared, 12);
    });

    test("two nearly equal clamp loads: R² stays in [0, 1] and agrees with mathjs", () => {
      // About the mean, SStot = 2·(0.0015 N)² and R² would be about −4e13.
      const fit = fitNutFactor(
        pts([
          [50, 30000],
          [100, 30000.003],
        ]),
        "M12x1.5",
      );
      const m = mathjsFit([50, 100], [30000, 30000.003]);
      expect(fit.rSquared).toBeGreaterThanOrEqual(0);
      expect(fit.rSquared).toBeLessThanOrEqual(1);
      expect(fit.rSquared).toBeCloseTo(m.rSquared, 9);
      expect(fit.rSquared).toBeCloseTo(0.9, 6); // 1 − 1.8e8/1.8e9 by hand, to the rounding of 0.003 N
    });

    test("any bench readings give R² in [0, 1], equal to mathjs's (fast-check)", () => {
      fc.assert(
        fc.property(
          fc.array(fc.tuple(fc.double({ min: 1, max: 500, noNaN: true }), fc.double({ min: 100, max: 2e5, noNaN: true })), {
            minLength: 1,
            maxLength: 10,
          }),
          (rows) => {
            const fit = fitNutFactor(pts(rows), "M12x1.5");
            expect(fit.rSquared).toBeGreaterThanOrEqual(0);
            expect(fit.rSquared).toBeLessThanOrEqual(1);
            const m = mathjsFit(
              rows.map((r) => r[0]),
              rows.map((r) => r[1]),
            );
            expect(Math.abs(fit.rSquared - Math.min(1, Math.max(0, m.rSquared)))).toBeLessThan(1e-9);
          },
        ),
        { numRuns: 300 },
      );
    });

    test("its label says which R² it is", () => {
      expect(NUT_FACTOR_R_SQUARED_LABEL).toMatch(/through the origin/);
      expect(NUT_FACTOR_R_SQUARED_LABEL).toMatch(/uncentred/);
    });
  });

  describe("the same torque typed in different units", () => {
    // NIST SP 811 (2008), B.8: 1 ft·lbf = 1.355818 N·m; with the exact lbf and foot,
    // 100 N·m = 73.756214927… ft·lbf (mathjs gives the same).
    test("100 N·m and 73.756214927 ft·lbf are one torque: the fit warns", () => {
      expect(mathUnitFtLbf(100)).toBeCloseTo(73.756214927, 8);
      const points: NutFactorPoint[] = [
        { torque: { value: 100, unit: "N.m" }, preload: { value: 40, unit: "kN" } },
        { torque: { value: 73.756214927, unit: "ft.lbf" }, preload: { value: 41, unit: "kN" } },
      ];
      expect(fitNutFactor(points, "M12x1.5").warnings.join(" ")).toMatch(/same torque/);
    });

    test("torques 0.01 % apart are different settings: no warning", () => {
      const fit = fitNutFactor(
        pts([
          [100, 40000],
          [100.01, 41000],
        ]),
        "M12x1.5",
      );
      expect(fit.warnings.join(" ")).not.toMatch(/same torque/);
    });
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
    expect(
      paths(() =>
        fitNutFactor(
          pts([
            [50, 20000],
            [60, 0],
          ]),
          "M12x1.5",
        ),
      ),
    ).toContain("points.1.preload.value");
    expect(paths(() => fitNutFactor(pts([[Number.NaN, 20000]]), "M12x1.5"))).toContain("points.0.torque.value");
    expect(paths(() => fitNutFactor(pts([[50, 20000]]), "M13x1.5"))).toContain("thread");
    expect(paths(() => fitNutFactor([{ torque: { value: 50, unit: "mm" as "N.m" }, preload: { value: 1, unit: "kN" } }], "M12"))).toContain(
      "points.0.torque.unit",
    );
  });
});
