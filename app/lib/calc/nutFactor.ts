/**
 * Effective nut factor from bench readings: the least-squares line through the origin
 * F = T/(K·d) over torque / clamp-load points, and the scatter of the per-point K = T/(F·d).
 */
import { failWith } from "./errors";
import { fitNutFactorInputSchema, type NutFactorPoint } from "./schemas";
import { parseThread } from "./threads";
import { toSI } from "./units";

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
  /** Coefficient of determination 1 − SSres/SStot (SStot about the mean clamp load); 1 for a single point. */
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
  const meanF = F.reduce((a, b) => a + b, 0) / n;
  const ssTot = F.reduce((a, f) => a + (f - meanF) ** 2, 0);
  let rSquared: number;
  if (ssTot > 0) rSquared = 1 - ssRes / ssTot;
  else rSquared = ssRes <= 1e-12 * Math.max(1, meanF * meanF) ? 1 : 0;
  if (!Number.isFinite(rSquared)) rSquared = 0;

  if (n >= 2 && cv > 0.1)
    warnings.push(`The per-point K scatters by ${Math.round(cv * 1000) / 10} % (coefficient of variation above 10 %); check the readings.`);
  if (k < 0.05 || k > 0.5) warnings.push(`An effective nut factor of ${Math.round(k * 1000) / 1000} is unusual; check the units of the readings.`);
  if (n >= 2 && new Set(T).size === 1)
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
