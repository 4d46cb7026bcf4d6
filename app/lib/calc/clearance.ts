/**
 * Clearances: piston-to-wall (optionally hot, with thermal growth ΔD = D·α·ΔT of each part, the
 * piston alloys with their handbook means up to 300 °C: see thermalGrowth),
 * bearing oil clearance (direct, or housing bore − 2 × shell thickness) and ring end gap from
 * a gap factor (shop guidance), each checked against an optional spec. Temperatures outside
 * a table material's range, or past its melting point, are warned about.
 */
import { OIL_CLEARANCE_RULE, materialById, thermalGrowth, type MaterialId } from "./materials";
import { clearanceInputSchema, type ClearanceInput } from "./schemas";
import { toSI, type UnitCode } from "./units";

/** Result of calculateClearance (lengths in mm). */
export interface ClearanceResult {
  /** Cold clearance: bore − piston, bearing bore − journal, or (ring gap) the measured gap when given, else the recommended gap. */
  clearance_mm: number;
  /** Piston-to-wall with thermal input: grown bore minus grown piston. */
  hotClearance_mm?: number;
  /**
   * What the hot clearance warns of: "seize" when it is negative (interference), "tight" when it
   * is under HOT_CLEARANCE_MIN_PER_DIAMETER of the bore. Absent when it is neither. The verdict
   * judges the cold clearance only.
   */
  hotCaution?: "seize" | "tight";
  /** Clearance per unit of diameter (inch per inch, dimensionless): piston-to-wall and bearing. */
  perInchOfDiameter?: number;
  /** Ring gap: bore in inches × gap factor, in mm. */
  recommendedGap_mm?: number;
  /** Against the spec (or, for a measured ring gap without spec, against the recommended gap). */
  verdict?: "within" | "below" | "above";
  warnings: string[];
}

type Q = { value: number; unit: UnitCode };
const mm = (q: Q) => toSI(q.value, q.unit) * 1000;
const fmt = (x: number) => `${Number(x.toPrecision(5))} mm (${Number((x / 25.4).toPrecision(4))} in)`;

/**
 * A hot piston-to-wall clearance under this much per unit of bore diameter (0.00025 in per in,
 * 0.022 mm on an 88 mm bore) is too little to carry an oil film at running temperature: it is
 * warned about as near zero. Common practice, no published source; the piston maker's running
 * clearance takes precedence.
 */
export const HOT_CLEARANCE_MIN_PER_DIAMETER = 0.00025;

/** Upper end of the default ring-gap band without a spec: recommended gap × this factor (shop guidance). */
export const RING_GAP_BAND_FACTOR = 1.25;

/** ΔD/D of a part from ambient to its running temperature: a table material's means, or the typed coefficient. */
function growthOf(ref: MaterialId | { alphaPerK: number }, from_K: number, to_K: number): number {
  return thermalGrowth(typeof ref === "string" ? materialById(ref) : ref, from_K, to_K);
}

// A limit typed in another unit lands a rounding error away from it (212 °F is 373.15000000000003 K).
const TEMPERATURE_TOL_K = 1e-9;
const fmtT = (K: number) => `${Number((K - 273.15).toPrecision(4))} °C`;

/**
 * Warns when a part's temperature is where its table material cannot be trusted: above the
 * point where it begins to melt, or outside the range its expansion coefficient is a mean
 * over. A coefficient the user typed has no known range, so it is taken as given.
 */
function temperatureWarnings(part: string, T_K: number, ref: MaterialId | { alphaPerK: number }, warnings: string[]): void {
  if (typeof ref !== "string") return;
  const m = materialById(ref);
  if (T_K >= m.solidus.K) {
    warnings.push(
      `The ${part} temperature (${fmtT(T_K)}) is at or above where ${m.label} begins to melt (about ${fmtT(m.solidus.K)}): the part would not keep its shape, so the hot clearance means nothing.`,
    );
  } else if (T_K < m.alphaRange.minK - TEMPERATURE_TOL_K || T_K > m.alphaRange.maxK + TEMPERATURE_TOL_K) {
    warnings.push(
      `The ${part} temperature (${fmtT(T_K)}) is outside ${fmtT(m.alphaRange.minK)} to ${fmtT(m.alphaRange.maxK)}, the range over which the expansion coefficient of ${m.label} is a mean; its growth there is an estimate (the coefficient rises with temperature).`,
    );
  }
}

function verdictFor(
  value_mm: number,
  spec: { min?: Q; max?: Q } | undefined,
  what: string,
  warnings: string[],
): "within" | "below" | "above" | undefined {
  if (!spec) return undefined;
  const min = spec.min ? mm(spec.min) : undefined;
  const max = spec.max ? mm(spec.max) : undefined;
  if (min !== undefined && value_mm < min - 1e-12) {
    warnings.push(`The ${what} (${fmt(value_mm)}) is below the spec minimum (${fmt(min)}).`);
    return "below";
  }
  if (max !== undefined && value_mm > max + 1e-12) {
    warnings.push(`The ${what} (${fmt(value_mm)}) is above the spec maximum (${fmt(max)}).`);
    return "above";
  }
  return "within";
}

/**
 * Piston-to-wall, bearing oil clearance or ring end gap, with a verdict against an optional
 * spec. A negative clearance is returned with a warning. Throws the ZodError on invalid input.
 */
export function calculateClearance(input: ClearanceInput): ClearanceResult {
  const v = clearanceInputSchema.parse(input);
  const warnings: string[] = [];

  if (v.kind === "piston-to-wall") {
    const bore = mm(v.bore);
    const piston = mm(v.piston);
    const clearance_mm = bore - piston;
    const result: ClearanceResult = { clearance_mm, perInchOfDiameter: clearance_mm / bore, warnings };
    if (clearance_mm < 0) warnings.push(`The piston is larger than the bore: interference of ${fmt(-clearance_mm)}.`);
    else if (clearance_mm === 0) warnings.push("The piston is the same size as the bore: no clearance.");
    if (Math.abs(clearance_mm) > 0.05 * bore)
      warnings.push("The clearance is more than 5 % of the bore; check the units of bore and piston.");
    if (v.thermal) {
      const t = v.thermal;
      const ambient = toSI(t.ambient.value, t.ambient.unit);
      const boreT = toSI(t.boreTemperature.value, t.boreTemperature.unit);
      const pistonT = toSI(t.pistonTemperature.value, t.pistonTemperature.unit);
      const dTb = boreT - ambient;
      const dTp = pistonT - ambient;
      const hotBore = bore * (1 + growthOf(t.boreMaterial, ambient, boreT));
      const hotPiston = piston * (1 + growthOf(t.pistonMaterial, ambient, pistonT));
      result.hotClearance_mm = hotBore - hotPiston;
      if (result.hotClearance_mm < 0) {
        result.hotCaution = "seize";
        warnings.push(`Hot clearance is negative (${fmt(result.hotClearance_mm)}): the piston would seize at these temperatures.`);
      } else if (result.hotClearance_mm < HOT_CLEARANCE_MIN_PER_DIAMETER * bore) {
        result.hotCaution = "tight";
        warnings.push(
          `Hot clearance is near zero (${fmt(result.hotClearance_mm)}, under ${fmt(HOT_CLEARANCE_MIN_PER_DIAMETER * bore)} for this bore): at these temperatures the piston would run with almost no oil film and could scuff or seize, whatever the cold clearance.`,
        );
      }
      if (dTp < 0 || dTb < 0) warnings.push("A part is colder than ambient; check the temperatures.");
      temperatureWarnings("bore", boreT, t.boreMaterial, warnings);
      temperatureWarnings("piston", pistonT, t.pistonMaterial, warnings);
    }
    result.verdict = verdictFor(clearance_mm, v.spec, "piston-to-wall clearance", warnings);
    if (result.verdict === undefined) delete result.verdict;
    return result;
  }

  if (v.kind === "bearing") {
    const journal = mm(v.journal);
    const bearingBore = v.bearingBore ? mm(v.bearingBore) : mm(v.housingBore!) - 2 * mm(v.shellThickness!);
    const clearance_mm = bearingBore - journal;
    const perInch = clearance_mm / journal;
    const result: ClearanceResult = { clearance_mm, perInchOfDiameter: perInch, warnings };
    if (!v.bearingBore && bearingBore <= 0) warnings.push("Two shells are thicker than the housing bore is wide; check the inputs.");
    if (clearance_mm < 0) warnings.push(`The journal is larger than the bearing bore: interference of ${fmt(-clearance_mm)}.`);
    else if (clearance_mm === 0) warnings.push("The journal is the same size as the bearing bore: no oil clearance.");
    else if (perInch < OIL_CLEARANCE_RULE.perInchOfDiameter / 3 || perInch > OIL_CLEARANCE_RULE.perInchOfDiameter * 3)
      warnings.push(
        `The oil clearance is ${Number((perInch * 1000).toPrecision(3))} thou per inch of journal, far from the usual about 1 thou per inch (shop guidance); check the readings.`,
      );
    result.verdict = verdictFor(clearance_mm, v.spec, "oil clearance", warnings);
    if (result.verdict === undefined) delete result.verdict;
    return result;
  }

  // ring-gap
  const bore = mm(v.bore);
  const recommendedGap_mm = (bore / 25.4) * v.gapPerBore * 25.4;
  const result: ClearanceResult = { clearance_mm: recommendedGap_mm, recommendedGap_mm, warnings };
  if (v.gapPerBore < 0.002 || v.gapPerBore > 0.01)
    warnings.push(`A gap factor of ${v.gapPerBore} in per in of bore is outside the usual 0.002–0.010 (shop guidance); check it.`);
  if (v.measuredGap) {
    const measured = mm(v.measuredGap);
    result.clearance_mm = measured;
    if (v.spec) {
      result.verdict = verdictFor(measured, v.spec, "measured ring gap", warnings);
    } else if (measured < recommendedGap_mm - 1e-9) {
      result.verdict = "below";
      warnings.push(
        `The measured gap (${fmt(measured)}) is smaller than the recommended ${fmt(recommendedGap_mm)}: the ring ends could butt when hot; file the ring.`,
      );
    } else if (measured > recommendedGap_mm * RING_GAP_BAND_FACTOR + 1e-9) {
      result.verdict = "above";
      warnings.push(
        `The measured gap (${fmt(measured)}) is more than ${Math.round((RING_GAP_BAND_FACTOR - 1) * 100)} % over the recommended ${fmt(recommendedGap_mm)} (shop guidance).`,
      );
    } else result.verdict = "within";
  } else if (v.spec) {
    result.verdict = verdictFor(recommendedGap_mm, v.spec, "recommended ring gap", warnings);
  }
  return result;
}
