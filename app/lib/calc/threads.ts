/**
 * Thread geometry: ISO metric (ISO 261 sizes and pitches, ISO 724 basic profile, ISO 898-1
 * stress area) and Unified inch (ASME B1.1 / FED-STD-H28 series, ASME B1.1 stress area).
 */
import { failWith } from "./errors";

/** Basic geometry of one thread, all in millimetres (SI-derived keys end with their unit). */
export interface ThreadGeometry {
  system: "iso-metric" | "unified";
  /** Nominal (basic major) diameter d. */
  d_mm: number;
  /** Pitch P (for unified threads 25.4 / threads per inch). */
  pitch_mm: number;
  /** Basic pitch diameter d2. */
  d2_mm: number;
  /**
   * The smaller diameter the stress-area formula averages with d2. Metric: the minor diameter
   * of the external thread, d3 = d − 1.226869·P (ISO 898-1). Unified: D − 1.299038·P, which
   * ASME B1.1's 0.7854·(D − 0.9743·P)² implies; it is not the basic minor diameter (see
   * `unifiedGeometry`).
   */
  d3_mm: number;
  /** Tensile stress area As. */
  stressArea_mm2: number;
}

/** One ISO metric size of ISO 261 (M3 to M24): coarse pitch (if the size has one) and fine pitches. */
export interface MetricSize {
  d_mm: number;
  coarse?: number;
  fine: number[];
}

/**
 * ISO metric sizes M3–M24 with their pitches, after ISO 261:1998, Table 1 (coarse and fine
 * series; M9 and M11 are third-choice sizes, kept because engine studs use them). M15 and M17
 * have fine pitches only.
 */
export const METRIC_SIZES: readonly MetricSize[] = [
  { d_mm: 3, coarse: 0.5, fine: [0.35] },
  { d_mm: 3.5, coarse: 0.6, fine: [0.35] },
  { d_mm: 4, coarse: 0.7, fine: [0.5] },
  { d_mm: 5, coarse: 0.8, fine: [0.5] },
  { d_mm: 6, coarse: 1, fine: [0.75] },
  { d_mm: 7, coarse: 1, fine: [0.75] },
  { d_mm: 8, coarse: 1.25, fine: [1, 0.75] },
  { d_mm: 9, coarse: 1.25, fine: [1, 0.75] },
  { d_mm: 10, coarse: 1.5, fine: [1.25, 1, 0.75] },
  { d_mm: 11, coarse: 1.5, fine: [1, 0.75] },
  { d_mm: 12, coarse: 1.75, fine: [1.5, 1.25, 1] },
  { d_mm: 14, coarse: 2, fine: [1.5, 1.25, 1] },
  { d_mm: 15, fine: [1.5, 1] },
  { d_mm: 16, coarse: 2, fine: [1.5, 1] },
  { d_mm: 17, fine: [1.5, 1] },
  { d_mm: 18, coarse: 2.5, fine: [2, 1.5, 1] },
  { d_mm: 20, coarse: 2.5, fine: [2, 1.5, 1] },
  { d_mm: 22, coarse: 2.5, fine: [2, 1.5, 1] },
  { d_mm: 24, coarse: 3, fine: [2, 1.5, 1] },
];

/** One Unified inch size (#10 to 1 in): label, basic major diameter and UNC / UNF threads per inch. */
export interface UnifiedSize {
  label: string;
  d_in: number;
  unc: number;
  unf: number;
}

/** Unified inch sizes #10 to 1 in, coarse (UNC) and fine (UNF) series, after ASME B1.1 (FED-STD-H28/2). */
export const UNIFIED_SIZES: readonly UnifiedSize[] = [
  { label: "#10", d_in: 0.19, unc: 24, unf: 32 },
  { label: "1/4", d_in: 0.25, unc: 20, unf: 28 },
  { label: "5/16", d_in: 0.3125, unc: 18, unf: 24 },
  { label: "3/8", d_in: 0.375, unc: 16, unf: 24 },
  { label: "7/16", d_in: 0.4375, unc: 14, unf: 20 },
  { label: "1/2", d_in: 0.5, unc: 13, unf: 20 },
  { label: "9/16", d_in: 0.5625, unc: 12, unf: 18 },
  { label: "5/8", d_in: 0.625, unc: 11, unf: 18 },
  { label: "3/4", d_in: 0.75, unc: 10, unf: 16 },
  { label: "7/8", d_in: 0.875, unc: 9, unf: 14 },
  { label: "1", d_in: 1, unc: 8, unf: 12 },
];

/** Common engine-shop thread sizes for the thread picker (free entry is also accepted). */
export const THREAD_PRESETS: readonly { designation: string; system: ThreadGeometry["system"] }[] = [
  { designation: "M6", system: "iso-metric" },
  { designation: "M8", system: "iso-metric" },
  { designation: "M8x1", system: "iso-metric" },
  { designation: "M9x1.25", system: "iso-metric" },
  { designation: "M10", system: "iso-metric" },
  { designation: "M10x1.25", system: "iso-metric" },
  { designation: "M11x1.5", system: "iso-metric" },
  { designation: "M12", system: "iso-metric" },
  { designation: "M12x1.5", system: "iso-metric" },
  { designation: "M12x1.25", system: "iso-metric" },
  { designation: "M14x1.5", system: "iso-metric" },
  { designation: "5/16-18 UNC", system: "unified" },
  { designation: "5/16-24 UNF", system: "unified" },
  { designation: "3/8-16 UNC", system: "unified" },
  { designation: "3/8-24 UNF", system: "unified" },
  { designation: "7/16-14 UNC", system: "unified" },
  { designation: "7/16-20 UNF", system: "unified" },
  { designation: "1/2-13 UNC", system: "unified" },
  { designation: "1/2-20 UNF", system: "unified" },
  { designation: "9/16-12 UNC", system: "unified" },
  { designation: "9/16-18 UNF", system: "unified" },
];

const close = (a: number, b: number) => Math.abs(a - b) < 1e-9;

/** ISO 724 basic profile and ISO 898-1 stress area for a metric thread (d and P in mm). */
export function metricGeometry(d_mm: number, pitch_mm: number): ThreadGeometry {
  const d2 = d_mm - 0.649519 * pitch_mm;
  const d3 = d_mm - 1.226869 * pitch_mm;
  return {
    system: "iso-metric",
    d_mm,
    pitch_mm,
    d2_mm: d2,
    d3_mm: d3,
    stressArea_mm2: (Math.PI / 4) * ((d2 + d3) / 2) ** 2,
  };
}

/**
 * ASME B1.1 geometry for a Unified thread (D in inches, n threads per inch, P = 1/n): stress
 * area As = 0.7854·(D − 0.9743·P)² in²; d2 is the basic pitch diameter D − 0.649519·P. With
 * 0.9743 = (0.649519 + 1.299038)/2 the formula is π/4 of the mean of d2 and D − 1.299038·P
 * squared, so d3 holds D − 1.299038·P = D − 1.5·H (H = 0.866025·P, the sharp-V height): the
 * diameter three quarters of H below D on each side. It lies below the basic minor diameter
 * D − 1.082532·P (D − 1.25·H), so the page names it as a term of the stress-area formula, not
 * as the minor diameter.
 */
export function unifiedGeometry(d_in: number, tpi: number): ThreadGeometry {
  const asIn2 = 0.7854 * (d_in - 0.9743 / tpi) ** 2;
  return {
    system: "unified",
    d_mm: d_in * 25.4,
    pitch_mm: 25.4 / tpi,
    d2_mm: (d_in - 0.649519 / tpi) * 25.4,
    d3_mm: (d_in - 1.299038 / tpi) * 25.4,
    stressArea_mm2: asIn2 * 645.16,
  };
}

interface ParsedThread {
  geometry: ThreadGeometry;
  /** Canonical designation, e.g. "M12x1.5" or "7/16-20 UNF". */
  designation: string;
}

const METRIC_RE = /^m\s*(\d+(?:\.\d+)?)\s*(?:(?:x|×|\*)\s*(\d+(?:\.\d+)?))?\s*(?:mm)?$/i;
const UNIFIED_RE =
  /^(#\s*\d+|no\.?\s*\d+|\d+\s*\/\s*\d+|\d+(?:\.\d+)?|\.\d+)\s*(?:"|in\.?|inch)?\s*(?:-|–|\s)\s*(\d+)\s*(?:tpi)?\s*(?:-?\s*(unc|unf|un))?\s*(?:-?\s*[123][ab])?$/i;

function parseInchDiameter(raw: string): number | undefined {
  const s = raw.replace(/\s+/g, "").toLowerCase();
  const num = /^(?:#|no\.?)(\d+)$/.exec(s);
  if (num) return 0.06 + 0.013 * Number(num[1]);
  const frac = /^(\d+)\/(\d+)$/.exec(s);
  if (frac) {
    const den = Number(frac[2]);
    return den === 0 ? undefined : Number(frac[1]) / den;
  }
  const n = Number(s);
  if (!Number.isFinite(n)) return undefined;
  // A bare 10 or 12 is a number size (#10-32 is often written 10-32); a bare 1 is one inch.
  if (n === 10 || n === 12) return 0.06 + 0.013 * n;
  return n;
}

/** Parses a thread designation ("M12x1.5", "m12 x 1.5", "M10", "7/16-20", "1/2-13 UNC", "#10-32"); undefined if unknown. */
export function parseThread(designation: string): ParsedThread | undefined {
  if (typeof designation !== "string") return undefined;
  const s = designation.trim().replace(/\s+/g, " ");
  if (s.length === 0 || s.length > 40) return undefined;

  const m = METRIC_RE.exec(s.replace(/,/g, "."));
  if (m) {
    const d = Number(m[1]);
    const size = METRIC_SIZES.find((z) => close(z.d_mm, d));
    if (!size) return undefined;
    let p: number;
    if (m[2] === undefined) {
      if (size.coarse === undefined) return undefined;
      p = size.coarse;
    } else {
      p = Number(m[2]);
      const known = (size.coarse !== undefined && close(size.coarse, p)) || size.fine.some((f) => close(f, p));
      if (!known) return undefined;
    }
    return { geometry: metricGeometry(size.d_mm, p), designation: `M${size.d_mm}x${p}` };
  }

  const u = UNIFIED_RE.exec(s);
  if (u) {
    const d = parseInchDiameter(u[1]);
    const tpi = Number(u[2]);
    const series = u[3]?.toUpperCase();
    if (d === undefined) return undefined;
    const size = UNIFIED_SIZES.find((z) => Math.abs(z.d_in - d) < 5e-4);
    if (!size) return undefined;
    let actual: "UNC" | "UNF";
    if (tpi === size.unc) actual = "UNC";
    else if (tpi === size.unf) actual = "UNF";
    else return undefined;
    if (series !== undefined && series !== "UN" && series !== actual) return undefined;
    return { geometry: unifiedGeometry(size.d_in, tpi), designation: `${size.label}-${tpi} ${actual}` };
  }
  return undefined;
}

/** Canonical spelling of a thread designation ("m12 x 1.5" → "M12x1.5", "7/16-20" → "7/16-20 UNF"), or undefined. */
export function normalizeThreadDesignation(designation: string): string | undefined {
  return parseThread(designation)?.designation;
}

/**
 * Geometry of a thread from its designation: ISO metric M3–M24 (coarse pitch when none is
 * given) or Unified UNC/UNF #10 to 1 in. Throws a ZodError (path ["thread"]) when unknown.
 */
export function threadGeometry(designation: string): ThreadGeometry {
  const parsed = parseThread(designation);
  if (!parsed) failWith(["thread"], unknownThreadMessage(designation));
  return parsed.geometry;
}

/** The message used for an unknown thread designation. */
export function unknownThreadMessage(designation: unknown): string {
  return `unknown thread designation "${String(designation).slice(0, 40)}": use ISO metric M3–M24 (e.g. "M12x1.5", "M10") or Unified UNC/UNF #10 to 1 in (e.g. "7/16-20", "1/2-13 UNC")`;
}
