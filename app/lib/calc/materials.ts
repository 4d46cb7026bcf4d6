/**
 * Data tables with their sources: bolt property classes and grades (strength), nut factors by
 * condition, piston and bore materials (thermal expansion), ring end-gap factors and the
 * bearing oil-clearance rule of thumb (shop guidance).
 */
import { metricGeometry } from "./threads";

// ---------------------------------------------------------------------------------------------
// Bolt strength
// ---------------------------------------------------------------------------------------------

/** Property classes and grades the preload calculator knows. */
export const PROPERTY_CLASS_IDS = ["8.8", "10.9", "12.9", "SAE-5", "SAE-8"] as const;
/** A property class (ISO 898-1) or grade (SAE J429). */
export type PropertyClassId = (typeof PROPERTY_CLASS_IDS)[number];

/** One size range of a property class: valid for nominal diameters up to `dMax_mm` (inclusive). */
export interface StrengthRow {
  dMin_mm: number;
  dMax_mm: number;
  /** Size range in the standard's own words. */
  sizeRange: string;
  /** Minimum yield strength (ISO 898-1: ReL or Rp0.2, min). */
  yield_MPa: number;
  /** Proof stress Sp (ISO 898-1) or proof strength (SAE J429). */
  proof_MPa: number;
  /** Minimum tensile strength Rm. */
  tensile_MPa: number;
}

/** A property class or grade with its source and size-dependent strengths. */
export interface PropertyClass {
  id: PropertyClassId;
  label: string;
  standard: "ISO 898-1" | "SAE J429";
  source: string;
  rows: StrengthRow[];
}

const KSI_MPA = 6.894757293168361; // 1 ksi in MPa (from 1 lbf = 4.4482216152605 N, 1 in = 25.4 mm)

const ISO_SOURCE =
  "ISO 898-1:2013, Table 3: minimum lower yield strength ReL / stress at 0.2 % non-proportional elongation Rp0.2, stress under proof load Sp, minimum tensile strength Rm";
const SAE_SOURCE = "SAE J429 (Aug. 2014), Table 1: minimum proof, yield and tensile strength (ksi) by grade and size";

/**
 * Property classes and grades: ISO 898-1 classes 8.8, 10.9, 12.9 (8.8 has different minimums
 * for d ≤ 16 mm and d > 16 mm) and SAE J429 grades 5 and 8 (grade 5 drops above 1 in).
 */
export const PROPERTY_CLASSES: readonly PropertyClass[] = [
  {
    id: "8.8",
    label: "ISO 898-1 class 8.8",
    standard: "ISO 898-1",
    source: ISO_SOURCE,
    rows: [
      { dMin_mm: 1.6, dMax_mm: 16, sizeRange: "d ≤ 16 mm", yield_MPa: 640, proof_MPa: 580, tensile_MPa: 800 },
      { dMin_mm: 16, dMax_mm: 39, sizeRange: "16 mm < d ≤ 39 mm", yield_MPa: 660, proof_MPa: 600, tensile_MPa: 830 },
    ],
  },
  {
    id: "10.9",
    label: "ISO 898-1 class 10.9",
    standard: "ISO 898-1",
    source: ISO_SOURCE,
    rows: [{ dMin_mm: 1.6, dMax_mm: 39, sizeRange: "d ≤ 39 mm", yield_MPa: 940, proof_MPa: 830, tensile_MPa: 1040 }],
  },
  {
    id: "12.9",
    label: "ISO 898-1 class 12.9",
    standard: "ISO 898-1",
    source: ISO_SOURCE,
    rows: [{ dMin_mm: 1.6, dMax_mm: 39, sizeRange: "d ≤ 39 mm", yield_MPa: 1100, proof_MPa: 970, tensile_MPa: 1220 }],
  },
  {
    id: "SAE-5",
    label: "SAE J429 grade 5",
    standard: "SAE J429",
    source: SAE_SOURCE,
    rows: [
      {
        dMin_mm: 6.35,
        dMax_mm: 25.4,
        sizeRange: "1/4 in to 1 in",
        yield_MPa: 92 * KSI_MPA,
        proof_MPa: 85 * KSI_MPA,
        tensile_MPa: 120 * KSI_MPA,
      },
      {
        dMin_mm: 25.4,
        dMax_mm: 38.1,
        sizeRange: "over 1 in to 1-1/2 in",
        yield_MPa: 81 * KSI_MPA,
        proof_MPa: 74 * KSI_MPA,
        tensile_MPa: 105 * KSI_MPA,
      },
    ],
  },
  {
    id: "SAE-8",
    label: "SAE J429 grade 8",
    standard: "SAE J429",
    source: SAE_SOURCE,
    rows: [
      {
        dMin_mm: 6.35,
        dMax_mm: 38.1,
        sizeRange: "1/4 in to 1-1/2 in",
        yield_MPa: 130 * KSI_MPA,
        proof_MPa: 120 * KSI_MPA,
        tensile_MPa: 150 * KSI_MPA,
      },
    ],
  },
];

/** Strengths of a property class for a nominal diameter, with the standard's size range and whether d is inside it. */
export function strengthFor(
  propertyClass: PropertyClassId,
  d_mm: number,
): StrengthRow & { source: string; label: string; inRange: boolean } {
  const pc = PROPERTY_CLASSES.find((p) => p.id === propertyClass);
  if (!pc) throw new Error(`unknown property class ${propertyClass}`);
  const row = pc.rows.find((r) => d_mm <= r.dMax_mm + 1e-9) ?? pc.rows[pc.rows.length - 1];
  const first = pc.rows[0];
  const last = pc.rows[pc.rows.length - 1];
  const inRange = d_mm >= first.dMin_mm - 1e-6 && d_mm <= last.dMax_mm + 1e-6;
  return { ...row, source: pc.source, label: pc.label, inRange };
}

/** Minimum yield strength (MPa) of a property class or grade for a nominal diameter (mm). */
export function yieldStrengthFor(propertyClass: PropertyClassId, d_mm: number): number {
  return strengthFor(propertyClass, d_mm).yield_MPa;
}

// ---------------------------------------------------------------------------------------------
// Nut factors
// ---------------------------------------------------------------------------------------------

/** Conditions with a nut-factor preset ("custom" has no value: the user types K). */
export type NutFactorCondition = "dry" | "dry-black-oxide" | "oiled" | "moly-paste" | "anti-seize" | "custom";

/** A nut-factor preset: condition, K (undefined for custom), label and source. */
export interface NutFactorPreset {
  condition: NutFactorCondition;
  label: string;
  k: number | undefined;
  source: string;
}

// Moly paste is not in Shigley's table. Its preset is derived with the ISO 16047 / VDI 2230
// torque form (the same one as the friction model) for M12x1.75 with a bearing diameter
// Db = 1.4·d and μ = 0.08 under head and in the thread, a value inside VDI 2230 Part 1:2015,
// Table A5, friction class A (μ 0.04 to 0.10; MoS2 pastes and other solid lubricants).
function derivedK(d_mm: number, pitch_mm: number, mu: number, db_mm: number): number {
  const g = metricGeometry(d_mm, pitch_mm);
  const perN = pitch_mm / (2 * Math.PI) + (mu * g.d2_mm) / (2 * Math.cos(Math.PI / 6)) + (mu * db_mm) / 2;
  return perN / d_mm;
}
const MOLY_K = Math.round(derivedK(12, 1.75, 0.08, 16.8) * 100) / 100;

/** Nut-factor presets by condition for T = K·F·d, each with its source; "custom" lets the user type K. */
export const NUT_FACTOR_PRESETS: readonly NutFactorPreset[] = [
  {
    condition: "dry",
    label: "Dry, as received",
    k: 0.2,
    source:
      "Shigley's Mechanical Engineering Design, 9th ed., §8-8 (K = 0.20 when the condition is not stated) and Table 8-15 (zinc-plated 0.20)",
  },
  {
    condition: "dry-black-oxide",
    label: "Dry, non-plated black finish",
    k: 0.3,
    source: "Shigley's Mechanical Engineering Design, 9th ed., Table 8-15",
  },
  {
    condition: "oiled",
    label: "Oiled threads",
    k: 0.18,
    source: "Shigley's Mechanical Engineering Design, 9th ed., Table 8-15 (lubricated)",
  },
  {
    condition: "moly-paste",
    label: "Moly (MoS2) paste",
    k: MOLY_K,
    source:
      "Derived with the ISO 16047 / VDI 2230 torque form for M12, Db = 1.4·d, μ = 0.08 (VDI 2230 Part 1:2015, Table A5, friction class A: MoS2 pastes)",
  },
  {
    condition: "anti-seize",
    label: "Anti-seize compound",
    k: 0.12,
    source: "Shigley's Mechanical Engineering Design, 9th ed., Table 8-15 (with an anti-seize compound)",
  },
  { condition: "custom", label: "Custom (type K)", k: undefined, source: "entered by the user" },
];

// ---------------------------------------------------------------------------------------------
// Piston and bore materials (thermal expansion)
// ---------------------------------------------------------------------------------------------

/** Ids of the materials in the thermal-expansion table. */
export const MATERIAL_IDS = [
  "forged-2618",
  "forged-4032",
  "a356-t6",
  "grey-cast-iron",
  "compacted-graphite-iron",
  "steel-4340",
  "ti-6al-4v",
] as const;
/** A material id of the thermal-expansion table. */
export type MaterialId = (typeof MATERIAL_IDS)[number];

/** A temperature limit of a material (kelvin) with where it comes from. */
export interface TemperatureLimit {
  K: number;
  source: string;
}

/** A piston or bore material: mean linear expansion coefficient near room temperature and its handbook. */
export interface Material {
  id: MaterialId;
  label: string;
  /** Mean linear coefficient of thermal expansion, per kelvin. */
  alphaPerK: number;
  /** Typical use in an engine. */
  use: ("piston" | "bore" | "fastener" | "connecting rod")[];
  source: string;
  /**
   * The temperatures over which `alphaPerK` is the mean. Outside them the growth is an
   * extrapolation (α of these alloys rises with temperature), so the result is warned about.
   */
  alphaRange: { minK: number; maxK: number; source: string };
  /**
   * Mean coefficients from 20 °C up to higher temperatures, where a handbook tabulates them
   * (20–200 °C, 20–300 °C), so that a running piston (200–300 °C) is inside the figures. `alphaPerK`
   * is the mean up to 100 °C; between the tabulated temperatures the mean is interpolated
   * linearly (see thermalGrowth).
   */
  alphaMeansFrom20?: { toK: number; alphaPerK: number }[];
  /** Where melting begins (solidus, or the eutectic for cast irons): above it no clearance means anything. */
  solidus: TemperatureLimit;
}

const C = (celsius: number) => celsius + 273.15;

// Callister's table gives a single value per material without a temperature range; it is used
// over 20–100 °C, like the ASM means over 20–100 °C as printed.
const CALLISTER_ALPHA_RANGE =
  "Callister, Appendix B, Table B.6 gives one value without a range; used as a 20–100 °C mean like the handbook values (common practice, no published source)";
// The piston alloys' means to 200 and 300 °C, as the handbook's data sheets tabulate them beside
// the 20–100 °C mean. The figures are from memory of those tables, not checked against a copy:
// verify before relying on the last digit.
const ASM_WROUGHT_TO_300 =
  "ASM Handbook, Vol. 2 (1990), Properties of Wrought Aluminum and Aluminum Alloys, the alloy's data sheet, coefficient of linear thermal expansion: means over 20–100, 20–200 and 20–300 °C (value from memory)";
const ASM_CAST_TO_300 =
  "ASM Handbook, Vol. 2 (1990), Properties of Cast Aluminum Alloys, 356.0 and A356.0 data sheet, coefficient of linear thermal expansion: means over 20–200 and 20–300 °C (value from memory); up to 100 °C Callister's Table B.6 value";

// The iron–carbon eutectic, where cast irons begin to melt.
const IRON_EUTECTIC =
  "Callister, Materials Science and Engineering: An Introduction, the iron–iron carbide phase diagram (Fig. 9.24): eutectic at 1147 °C";

/** Piston and bore materials with α (per K) and the handbook table each value comes from. */
export const MATERIALS: readonly Material[] = [
  {
    id: "forged-2618",
    label: "Forged aluminium 2618 (piston)",
    alphaPerK: 22.3e-6,
    use: ["piston"],
    source:
      "ASM Handbook, Vol. 2 (1990), Properties of Wrought Aluminum and Aluminum Alloys: 2618, 22.3 µm/m·K, 20–100 °C; 23.2 to 200 °C, 24.1 to 300 °C (value from memory)",
    alphaRange: { minK: C(20), maxK: C(300), source: ASM_WROUGHT_TO_300 },
    alphaMeansFrom20: [
      { toK: C(200), alphaPerK: 23.2e-6 },
      { toK: C(300), alphaPerK: 24.1e-6 },
    ],
    solidus: {
      K: C(549),
      source:
        "ASM Handbook, Vol. 2 (1990), Properties of Wrought Aluminum and Aluminum Alloys: 2618, melting range about 549–638 °C (value from memory, approximate)",
    },
  },
  {
    id: "forged-4032",
    label: "Forged aluminium 4032 (piston)",
    alphaPerK: 19.4e-6,
    use: ["piston"],
    source:
      "ASM Handbook, Vol. 2 (1990), Properties of Wrought Aluminum and Aluminum Alloys: 4032, 19.4 µm/m·K, 20–100 °C; 20.2 to 200 °C, 21.0 to 300 °C (value from memory)",
    alphaRange: { minK: C(20), maxK: C(300), source: ASM_WROUGHT_TO_300 },
    alphaMeansFrom20: [
      { toK: C(200), alphaPerK: 20.2e-6 },
      { toK: C(300), alphaPerK: 21.0e-6 },
    ],
    solidus: {
      K: C(532),
      source:
        "ASM Handbook, Vol. 2 (1990), Properties of Wrought Aluminum and Aluminum Alloys: 4032, melting range about 532–571 °C (value from memory, approximate)",
    },
  },
  {
    id: "a356-t6",
    label: "Cast aluminium A356-T6",
    alphaPerK: 21.5e-6,
    use: ["piston", "bore"],
    source:
      "Callister, Materials Science and Engineering: An Introduction, Appendix B, Table B.6 (alloy 356.0): 21.5 × 10⁻⁶ /°C; ASM Handbook, Vol. 2 (1990), Properties of Cast Aluminum Alloys (356.0, A356.0): 22.5 to 200 °C, 23.5 to 300 °C (value from memory)",
    alphaRange: { minK: C(20), maxK: C(300), source: ASM_CAST_TO_300 },
    alphaMeansFrom20: [
      { toK: C(200), alphaPerK: 22.5e-6 },
      { toK: C(300), alphaPerK: 23.5e-6 },
    ],
    solidus: {
      K: C(555),
      source:
        "ASM Handbook, Vol. 2 (1990), Properties of Cast Aluminum Alloys: A356.0, melting range about 555–615 °C (value from memory, approximate)",
    },
  },
  {
    id: "grey-cast-iron",
    label: "Grey cast iron (liner or block)",
    alphaPerK: 11.4e-6,
    use: ["bore"],
    source:
      "Callister, Materials Science and Engineering: An Introduction, Appendix B, Table B.6 (gray irons G1800–G4000): 11.4 × 10⁻⁶ /°C",
    alphaRange: { minK: C(20), maxK: C(100), source: CALLISTER_ALPHA_RANGE },
    solidus: { K: C(1147), source: IRON_EUTECTIC },
  },
  {
    id: "compacted-graphite-iron",
    label: "Compacted graphite iron (block)",
    alphaPerK: 11.0e-6,
    use: ["bore"],
    // From memory of the handbook's physical-properties table, not checked against it: verify.
    source:
      "ASM Handbook, Vol. 1 (1990), Stefanescu, Compacted Graphite Iron, physical properties: about 11 µm/m·K near room temperature (approximate)",
    alphaRange: {
      minK: C(20),
      maxK: C(100),
      source:
        "ASM Handbook, Vol. 1 (1990), Compacted Graphite Iron: given near room temperature; used as a 20–100 °C mean (common practice, no published source)",
    },
    solidus: { K: C(1147), source: IRON_EUTECTIC },
  },
  {
    id: "steel-4340",
    label: "Steel 4340",
    alphaPerK: 12.3e-6,
    use: ["fastener", "connecting rod"],
    source: "Callister, Materials Science and Engineering: An Introduction, Appendix B, Table B.6 (steel alloy 4340): 12.3 × 10⁻⁶ /°C",
    alphaRange: { minK: C(20), maxK: C(100), source: CALLISTER_ALPHA_RANGE },
    solidus: {
      K: C(1450),
      source:
        "Callister, the iron–iron carbide phase diagram (Fig. 9.24): the γ solidus at 0.40 wt% C read as about 1450 °C (alloying lowers it slightly; approximate)",
    },
  },
  {
    id: "ti-6al-4v",
    label: "Titanium Ti-6Al-4V",
    alphaPerK: 8.6e-6,
    use: ["fastener", "connecting rod"],
    source: "Callister, Materials Science and Engineering: An Introduction, Appendix B, Table B.6 (alloy Ti-6Al-4V): 8.6 × 10⁻⁶ /°C",
    alphaRange: { minK: C(20), maxK: C(100), source: CALLISTER_ALPHA_RANGE },
    solidus: {
      K: C(1604),
      source:
        "ASM Handbook, Vol. 2 (1990), Titanium and Titanium Alloys: Ti-6Al-4V, melting range about 1604–1660 °C (value from memory, approximate)",
    },
  },
];

// A Map, not an object literal: a name such as "constructor" or "__proto__" must find nothing
// rather than something inherited from Object.prototype.
const MATERIAL_ALIASES = new Map<string, MaterialId>();
for (const [id, aliases] of [
  ["forged-2618", ["2618", "forged2618", "al2618", "aa2618", "2618t61", "forged2618t61", "2618a"]],
  ["forged-4032", ["4032", "forged4032", "al4032", "aa4032", "4032t6", "forged4032t6"]],
  ["a356-t6", ["a356t6", "a356", "356", "3560", "a3560", "a3560t6", "356t6"]],
  ["grey-cast-iron", ["greycastiron", "graycastiron", "greyiron", "grayiron", "castiron", "gci"]],
  ["compacted-graphite-iron", ["compactedgraphiteiron", "cgi", "vermiculariron"]],
  ["steel-4340", ["steel4340", "4340", "aisi4340", "sae4340", "4340steel"]],
  ["ti-6al-4v", ["ti6al4v", "ti64", "titanium", "grade5titanium"]],
] as const) {
  for (const a of aliases) MATERIAL_ALIASES.set(a, id);
  MATERIAL_ALIASES.set(id.replace(/[^a-z0-9]/g, ""), id);
}

/** Resolves a material id or a common spelling of it ("2618", "Ti-6Al-4V", "CGI") to a MaterialId. */
export function resolveMaterialId(name: string): MaterialId | undefined {
  if (typeof name !== "string") return undefined;
  return MATERIAL_ALIASES.get(name.toLowerCase().replace(/[^a-z0-9]/g, ""));
}

/** The material of an id. */
export function materialById(id: MaterialId): Material {
  const m = MATERIALS.find((x) => x.id === id);
  if (!m) throw new Error(`unknown material ${id}`);
  return m;
}

const T20 = C(20);
const T100 = C(100);

/**
 * The mean coefficient from 20 °C to `T_K`: `alphaPerK` up to 100 °C, then interpolated
 * linearly between the tabulated means (20–100, 20–200, 20–300 °C), the last one beyond them.
 */
export function meanAlphaFrom20(m: Pick<Material, "alphaPerK" | "alphaMeansFrom20">, T_K: number): number {
  let from = { toK: T100, alphaPerK: m.alphaPerK };
  if (T_K <= T100 || !m.alphaMeansFrom20) return m.alphaPerK;
  for (const to of m.alphaMeansFrom20) {
    if (T_K <= to.toK) return from.alphaPerK + ((to.alphaPerK - from.alphaPerK) * (T_K - from.toK)) / (to.toK - from.toK);
    from = to;
  }
  return from.alphaPerK;
}

/**
 * The relative growth ΔL/L of a part from `from_K` to `to_K`. With one coefficient it is
 * α·ΔT. With means from 20 °C (a handbook's ᾱ(20→T)) it is the difference of the strains
 * from 20 °C, ᾱ(20→T)·(T − 20 °C) − ᾱ(20→T₀)·(T₀ − 20 °C), which is α·ΔT again below 100 °C.
 */
export function thermalGrowth(m: Pick<Material, "alphaPerK" | "alphaMeansFrom20">, from_K: number, to_K: number): number {
  if (!m.alphaMeansFrom20 || Math.max(from_K, to_K) <= T100) return m.alphaPerK * (to_K - from_K);
  return meanAlphaFrom20(m, to_K) * (to_K - T20) - meanAlphaFrom20(m, from_K) * (from_K - T20);
}

// ---------------------------------------------------------------------------------------------
// Rules of thumb (shop guidance)
// ---------------------------------------------------------------------------------------------

/** A top-ring end-gap factor (inch of gap per inch of bore) for one application: shop guidance. */
export interface RingGapFactor {
  application: string;
  label: string;
  gapPerBore: number;
  guidance: "shop guidance (common practice)";
}

/**
 * Top-ring end-gap factors by application, in inch of gap per inch of bore. Shop guidance
 * (common practice, no standard): the ring maker's figure takes precedence; overridable.
 */
export const RING_GAP_FACTORS: readonly RingGapFactor[] = [
  { application: "street-na", label: "Street, naturally aspirated", gapPerBore: 0.004, guidance: "shop guidance (common practice)" },
  {
    application: "performance-na",
    label: "Performance, naturally aspirated",
    gapPerBore: 0.0045,
    guidance: "shop guidance (common practice)",
  },
  {
    application: "boosted-street",
    label: "Turbo or supercharged, street",
    gapPerBore: 0.0055,
    guidance: "shop guidance (common practice)",
  },
  { application: "nitrous", label: "Nitrous oxide", gapPerBore: 0.006, guidance: "shop guidance (common practice)" },
  { application: "boosted-race", label: "Turbo or supercharged, race", gapPerBore: 0.0065, guidance: "shop guidance (common practice)" },
];

/** Bearing oil clearance rule of thumb: about 0.001 in per inch of journal diameter (shop guidance, common practice). */
export const OIL_CLEARANCE_RULE = {
  perInchOfDiameter: 0.001,
  label: "About 0.001 in of oil clearance per inch of journal diameter",
  guidance: "shop guidance (common practice)",
} as const;

/** Default Young's modulus (GPa) of a steel bolt when a grip is given without one: Shigley 9th ed., Table A-5 (carbon steel, 207 GPa). */
export const STEEL_MODULUS_GPA = 207;
