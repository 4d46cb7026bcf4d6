/**
 * Effective nut factor from bench readings: the least-squares line through the origin
 * F = T/(K·d) over torque / clamp-load points, and the scatter of the per-point K = T/(F·d).
 */
import { failWith } from "./errors";
import { fitNutFactorInputSchema, type NutFactorPoint } from "./schemas";
import { parseThread } from "./threads";
import { toSI } from "./units";

/**
 * Relative tolerance under which two torques count as the same setting. The unit factors are
 * exact, so one torque typed in two units differs only by rounding: about 1e-16 when converted
 * here, up to about 5e-7 when converted by hand and typed to seven significant figures
 * (73.75621 ft·lbf for 100 N·m). 1e-6 covers both and is far below any step a torque wrench
 * can be set to.
 */
export const SAME_TORQUE_RELATIVE_TOLERANCE = 1e-6;

function sameTorque(a: number, b: number): boolean {
  return Math.abs(a - b) <= SAME_TORQUE_RELATIVE_TOLERANCE * Math.max(Math.abs(a), Math.abs(b));
}

/** How to label `rSquared` beside the fit (it is the uncentred R² of a line through the origin). */
export const NUT_FACTOR_R_SQUARED_LABEL = "R² through the origin (uncentred)";

/** Result of fitNutFactor. */
export interface NutFactorFit {
  /** Effective nut factor from the least-squares slope: K = 1/(slope·d). */
  k: number;
  /** Sample standard deviation (n − 1) of the per-point K = T/(F·d); 0 for a single point. */
  kStdDev: number;
  /** Coefficient of variation of the per-point K as a fraction (0.03 means 3 %): kStdDev / mean per-point K. */
  kCoefficientOfVariation: number;
  /** Number of points. */
  n: number;
  /** Least-squares slope of preload against torque through the origin, N per N·m: Σ(T·F)/Σ(T²). */
  slope_N_per_Nm: number;
  /**
   * Coefficient of determination of the line through the origin, uncentred: 1 − SSres/ΣF²
   * (the total sum of squares about zero, not about the mean clamp load). Always within [0, 1];
   * not comparable with the R² of a line with an intercept. 1 for a single point.
   */
  rSquared: number;
  /** Measured minus fitted clamp load for each point, N, in the order given. */
  residuals_N: number[];
  warnings: string[];
}

/**
 * Fits the effective nut factor K to torque / clamp-load readings on one thread
 * (e.g. `fitNutFactor([{ torque: { value: 110, unit: "N.m" }, preload: { value: 51, unit: "kN" } }], "M12x1.5")`).
 * Throws the ZodError on invalid input (paths ["points", i, "torque", "value"], ["thread"]).
 */
export function fitNutFactor(points: NutFactorPoint[], thread: string): NutFactorFit {
  const v = fitNutFactorInputSchema.parse({ points, thread });
  const parsed = parseThread(v.thread);
  if (!parsed) failWith(["thread"], "unknown thread designation");
  const d_m = parsed.geometry.d_mm / 1000;
  const warnings: string[] = [];

  const T = v.points.map((p) => toSI(p.torque.value, p.torque.unit));
  const F = v.points.map((p) => toSI(p.preload.value, p.preload.unit));
  const n = T.length;

  let sTF = 0;
  let sTT = 0;
  for (let i = 0; i < n; i++) {
    sTF += T[i] * F[i];
    sTT += T[i] * T[i];
  }
  const slope = sTF / sTT;
  const k = 1 / (slope * d_m);

  const perPointK = T.map((t, i) => t / (F[i] * d_m));
  const meanK = perPointK.reduce((a, b) => a + b, 0) / n;
  let kStdDev = 0;
  if (n >= 2) {
    const ss = perPointK.reduce((a, x) => a + (x - meanK) ** 2, 0);
    kStdDev = Math.sqrt(ss / (n - 1));
  } else {
    warnings.push("One point only: the standard deviation of K needs at least two points (reported as 0).");
  }
  const cv = kStdDev / meanK;

  const residuals_N = F.map((f, i) => f - slope * T[i]);
  const ssRes = residuals_N.reduce((a, r) => a + r * r, 0);
  // The model has no intercept, so the total sum of squares is taken about zero, as the fit
  // is (Eisenhauer, "Regression through the origin", Teaching Statistics 25(3), 2003; R's
  // summary.lm does the same for a model without intercept). About the mean it would compare
  // the line with a model the fit never considered, and for nearly equal clamp loads it falls
  // far below zero. Least squares gives SSres = ΣF² − slope·ΣTF ≤ ΣF², so this stays in [0, 1]
  // (clamped against rounding); every clamp load is positive, so ΣF² > 0.
  const ssTot = F.reduce((a, f) => a + f * f, 0);
  const rSquared = Math.min(1, Math.max(0, 1 - ssRes / ssTot));

  if (n >= 2 && cv > 0.1)
    warnings.push(`The per-point K scatters by ${Math.round(cv * 1000) / 10} % (coefficient of variation above 10 %); check the readings.`);
  if (k < 0.05 || k > 0.5)
    warnings.push(`An effective nut factor of ${Math.round(k * 1000) / 1000} is unusual; check the units of the readings.`);
  if (n >= 2 && T.every((t) => sameTorque(t, T[0])))
    warnings.push("All points have the same torque: the fit shows the scatter at one torque, not the trend.");

  return {
    k,
    kStdDev,
    kCoefficientOfVariation: cv,
    n,
    slope_N_per_Nm: slope,
    rSquared,
    residuals_N,
    warnings,
  };
}
