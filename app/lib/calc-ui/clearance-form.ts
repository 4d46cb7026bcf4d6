/**
 * The Clearances form: piston-to-wall (cold, and hot with thermal growth), bearing oil
 * clearance, ring end gap; defaults for the demo (88.0 mm bore, forged 2618 piston, iron
 * liner); and the one function that turns the typed values into the input and result.
 */
import { MATERIALS, RING_GAP_FACTORS, calculateClearance, type ClearanceResult } from "~/lib/calc";
import { DEFAULT_UNITS, fieldValue, parseNumber, type UnitSystem } from "./units";
import { readQuantity, runChecked, type FieldErrors, type FormValues, type Outcome } from "./outcome";

export const CLEARANCE_KINDS = [
  { kind: "piston-to-wall", label: "Piston-to-wall" },
  { kind: "bearing", label: "Bearing oil clearance" },
  { kind: "ring-gap", label: "Ring end gap" },
] as const;
export type ClearanceKind = (typeof CLEARANCE_KINDS)[number]["kind"];

export function clearanceDefaults(system: UnitSystem): FormValues {
  const u = DEFAULT_UNITS[system];
  const len = (mm: number, extra = 1) => fieldValue(mm, "mm", u.length, extra);
  const small = (mm: number) => fieldValue(mm, "mm", u.small, 1);
  const spec = (mm: number) => fieldValue(mm, "mm", u.small, system === "inch" ? -1 : 0);
  const temp = (c: number) => fieldValue(c, "degC", u.temperature, 0);
  const boosted = RING_GAP_FACTORS.find((r) => r.application === "boosted-street") ?? RING_GAP_FACTORS[0];
  return {
    kind: "piston-to-wall",
    "bore.value": len(88),
    "bore.unit": u.length,
    "piston.value": len(87.91),
    "piston.unit": u.length,
    "thermal.on": "on",
    "thermal.ambient.value": temp(20),
    "thermal.ambient.unit": u.temperature,
    "thermal.boreTemperature.value": temp(95),
    "thermal.boreTemperature.unit": u.temperature,
    "thermal.pistonTemperature.value": temp(100),
    "thermal.pistonTemperature.unit": u.temperature,
    "thermal.boreMaterial": "grey-cast-iron",
    "thermal.boreAlpha": "",
    "thermal.pistonMaterial": "forged-2618",
    "thermal.pistonAlpha": "",
    "spec.piston-to-wall.min.value": spec(0.08),
    "spec.piston-to-wall.min.unit": u.small,
    "spec.piston-to-wall.max.value": spec(0.1),
    "spec.piston-to-wall.max.unit": u.small,
    bearingMode: "direct",
    "journal.value": len(52),
    "journal.unit": u.length,
    "bearingBore.value": len(52.05),
    "bearingBore.unit": u.length,
    "housingBore.value": len(55.5),
    "housingBore.unit": u.length,
    "shellThickness.value": small(1.725),
    "shellThickness.unit": u.small,
    "spec.bearing.min.value": spec(0.04),
    "spec.bearing.min.unit": u.small,
    "spec.bearing.max.value": spec(0.065),
    "spec.bearing.max.unit": u.small,
    application: boosted.application,
    gapPerBore: String(boosted.gapPerBore),
    "measuredGap.value": small(0.5),
    "measuredGap.unit": u.small,
    "spec.ring-gap.min.value": "",
    "spec.ring-gap.min.unit": u.small,
    "spec.ring-gap.max.value": "",
    "spec.ring-gap.max.unit": u.small,
    "out.small": u.small,
  };
}

function readMaterial(values: FormValues, which: "bore" | "piston", errors: FieldErrors): unknown {
  const id = values[`thermal.${which}Material`] ?? "";
  if (id !== "custom") return id;
  const micro = parseNumber(values[`thermal.${which}Alpha`]);
  if (micro === undefined || Number.isNaN(micro)) {
    errors[`thermal.${which}Alpha`] = "Enter the expansion coefficient in µm/(m·K).";
    return undefined;
  }
  return { alphaPerK: micro * 1e-6 };
}

export type ClearanceOutcome = Outcome<ClearanceResult> & { kind: ClearanceKind };

export function runClearanceForm(values: FormValues): ClearanceOutcome {
  const errors: FieldErrors = {};
  const kind: ClearanceKind = CLEARANCE_KINDS.some((k) => k.kind === values.kind) ? (values.kind as ClearanceKind) : "piston-to-wall";
  const q = (name: string, required = true) => readQuantity(values, name, errors, required, parseNumber);
  const input: Record<string, unknown> = { kind };

  if (kind === "piston-to-wall") {
    input.bore = q("bore");
    input.piston = q("piston");
    if (values["thermal.on"] === "on") {
      input.thermal = {
        ambient: q("thermal.ambient"),
        boreTemperature: q("thermal.boreTemperature"),
        pistonTemperature: q("thermal.pistonTemperature"),
        boreMaterial: readMaterial(values, "bore", errors),
        pistonMaterial: readMaterial(values, "piston", errors),
      };
    }
  } else if (kind === "bearing") {
    input.journal = q("journal");
    if (values.bearingMode === "shells") {
      input.housingBore = q("housingBore");
      input.shellThickness = q("shellThickness");
    } else input.bearingBore = q("bearingBore");
  } else {
    input.bore = q("bore");
    const g = parseNumber(values.gapPerBore);
    const preset = RING_GAP_FACTORS.find((r) => r.application === values.application);
    const gap = preset ? preset.gapPerBore : g;
    if (gap === undefined || Number.isNaN(gap)) errors.gapPerBore = "Enter the gap factor (inch of gap per inch of bore).";
    input.gapPerBore = gap;
    const measured = q("measuredGap", false);
    if (measured) input.measuredGap = measured;
  }
  const min = q(`spec.${kind}.min`, false);
  const max = q(`spec.${kind}.max`, false);
  if (min || max) input.spec = { ...(min ? { min } : {}), ...(max ? { max } : {}) };

  const fieldOf = (path: string): string => {
    if (path.startsWith("spec")) {
      const rest = path.slice(5) || "min";
      return `spec.${kind}.${rest.replace(/\.unit$/, ".value").replace(/^(min|max)$/, "$1.value")}`;
    }
    if (path.startsWith("thermal.boreMaterial"))
      return values["thermal.boreMaterial"] === "custom" ? "thermal.boreAlpha" : "thermal.boreMaterial";
    if (path.startsWith("thermal.pistonMaterial"))
      return values["thermal.pistonMaterial"] === "custom" ? "thermal.pistonAlpha" : "thermal.pistonMaterial";
    if (path.endsWith(".unit")) return path.replace(/\.unit$/, ".value");
    if (/^(bore|piston|journal|bearingBore|housingBore|shellThickness|measuredGap)$/.test(path)) return `${path}.value`;
    return path;
  };
  return { ...runChecked(calculateClearance, input, errors, fieldOf), kind };
}

export const PISTON_MATERIALS = MATERIALS.filter((m) => m.use.includes("piston"));
export const BORE_MATERIALS = MATERIALS.filter((m) => m.use.includes("bore"));
