/**
 * What a reading can measure: its quantities, the unit codes (docs/calculations.md) that fit each,
 * the SI value stored, and the zod schema of the JSON the API takes for a reading (with where
 * it was taken, `positions.ts`). Pure: no Node built-ins, safe in the browser.
 */
import { z } from "zod";
import { UNIT_CODES, toSI, unitLabel, isUnitCode, type UnitCode, type UnitKind } from "~/lib/calc";
import { quantityProblem } from "~/lib/edge";
import { guessedDecimals, MAX_TYPED_DECIMALS } from "~/lib/typed-number";
import { positionFromLabel, positionInputSchema, positionIssues, storedPosition } from "./positions";
import { pastTheEnd, tooLateMessage, videoSeconds } from "./video-time";

export type QuantityId =
  | "torque"
  | "clamp-load"
  | "bore-diameter"
  | "out-of-round"
  | "clearance"
  | "ring-gap"
  | "leak-down"
  | "temperature"
  | "length"
  | "other";

type QuantityDef = { id: QuantityId; label: string; kind: UnitKind | "percent" | "any"; defaultUnit: string };

export const QUANTITIES: QuantityDef[] = [
  { id: "torque", label: "Torque", kind: "torque", defaultUnit: "N.m" },
  { id: "clamp-load", label: "Clamp load", kind: "force", defaultUnit: "kN" },
  { id: "bore-diameter", label: "Bore diameter", kind: "length", defaultUnit: "mm" },
  { id: "out-of-round", label: "Out-of-round", kind: "length", defaultUnit: "mm" },
  { id: "clearance", label: "Clearance", kind: "length", defaultUnit: "mm" },
  { id: "ring-gap", label: "Ring end gap", kind: "length", defaultUnit: "mm" },
  { id: "leak-down", label: "Leak-down", kind: "percent", defaultUnit: "%" },
  { id: "temperature", label: "Temperature", kind: "temperature", defaultUnit: "degC" },
  { id: "length", label: "Length", kind: "length", defaultUnit: "mm" },
  { id: "other", label: "Other (free-form)", kind: "any", defaultUnit: "" },
];

export const QUANTITY_IDS = QUANTITIES.map((q) => q.id) as [QuantityId, ...QuantityId[]];

export function quantityDef(id: string): QuantityDef | undefined {
  return QUANTITIES.find((q) => q.id === id);
}

/** The unit codes a quantity accepts (empty for free-form, which takes any short unit text). */
export function unitsFor(id: string): string[] {
  const q = quantityDef(id);
  if (!q) return [];
  if (q.kind === "percent") return ["%"];
  if (q.kind === "any") return [];
  return [...UNIT_CODES[q.kind]];
}

export function displayUnit(code: string): string {
  if (isUnitCode(code)) return unitLabel(code);
  return code;
}

/**
 * The SI value of a typed reading: contract units go through `toSI` (m, N, N·m, Pa, K),
 * a percentage is kept as a fraction (40 % → 0.4), a free-form unit is stored as typed.
 */
export function toStoredSI(_quantity: string, value: number, unit: string): number {
  if (unit === "%") return value / 100;
  if (isUnitCode(unit)) return toSI(value, unit as UnitCode);
  return value;
}

const FREE_UNIT = /^[\p{L}\p{N}%/.·°²³ -]{1,16}$/u;

const conditionsSchema = z
  .object({
    lube: z.string().trim().max(80).optional(),
    tool: z.string().trim().max(80).optional(),
    pass: z.union([z.string().trim().max(20), z.number().int().min(0).max(999).transform(String)]).optional(),
    note: z.string().trim().max(300).optional(),
  })
  .default({})
  .transform((c) => Object.fromEntries(Object.entries(c).filter(([, v]) => v !== undefined && v !== "")) as Record<string, string>);

export function readingInputSchema(durationS: number | null) {
  return z
    .object({
      quantity: z.enum(QUANTITY_IDS, { error: "Choose what was measured." }),
      value: z.number({ error: "Enter the value as a number." }).finite("Enter the value as a number."),
      // JSON keeps no trailing zero (88.010 arrives as 88.01): how many decimals were typed, if known.
      valueDecimals: z
        .number({ error: "The decimals typed, as a whole number." })
        .int("The decimals typed, as a whole number.")
        .min(0, "The decimals typed, as a whole number.")
        .max(MAX_TYPED_DECIMALS, `At most ${MAX_TYPED_DECIMALS} decimals.`)
        .nullable()
        .optional(),
      unit: z.string().trim().min(1, "Choose a unit."),
      label: z.string().trim().max(120, "Keep the label under 120 characters.").default(""),
      conditions: conditionsSchema,
      t: videoSeconds.min(0, "A reading cannot be before the start of the video.").nullable().optional(),
      ...positionInputSchema.shape,
    })
    .superRefine((r, ctx) => {
      const allowed = unitsFor(r.quantity);
      // (zod runs this after a failed check of its own too: only a valid count is compared.)
      const decimalsValid = Number.isInteger(r.valueDecimals) && r.valueDecimals! >= 0 && r.valueDecimals! <= MAX_TYPED_DECIMALS;
      if (decimalsValid && Number.isFinite(r.value) && guessedDecimals(r.value) > r.valueDecimals!)
        ctx.addIssue({ code: "custom", path: ["valueDecimals"], message: `${r.value} has more decimals than ${r.valueDecimals}.` });
      for (const i of positionIssues(r.quantity, r, quantityDef(r.quantity)!.label))
        ctx.addIssue({ code: "custom", path: [i.path], message: i.message });
      if (r.quantity === "other") {
        if (!FREE_UNIT.test(r.unit))
          ctx.addIssue({ code: "custom", path: ["unit"], message: "Type a short unit (letters, digits, % / ·)." });
      } else if (!allowed.includes(r.unit)) {
        const q = quantityDef(r.quantity)!;
        ctx.addIssue({
          code: "custom",
          path: ["unit"],
          message: `${r.unit} is not a unit of ${q.label.toLowerCase()}; use ${allowed.map(displayUnit).join(", ")}.`,
        });
      }
      if (r.quantity === "leak-down" && (r.value < 0 || r.value > 100))
        ctx.addIssue({ code: "custom", path: ["value"], message: "Leak-down is a percentage from 0 to 100." });
      if (["bore-diameter", "ring-gap", "length"].includes(r.quantity) && r.value <= 0)
        ctx.addIssue({ code: "custom", path: ["value"], message: "This measurement must be greater than zero." });
      if (["out-of-round", "clamp-load"].includes(r.quantity) && r.value < 0)
        ctx.addIssue({ code: "custom", path: ["value"], message: "This measurement cannot be negative." });
      if (r.quantity === "temperature" && allowed.includes(r.unit) && toStoredSI(r.quantity, r.value, r.unit) <= 0)
        ctx.addIssue({ code: "custom", path: ["value"], message: "That is below absolute zero." });
      // What a gauge can read, in SI (app/lib/edge.ts): 1e308 lbf is a slip, and its SI value is Infinity.
      const outOfRange =
        (r.quantity === "other" || allowed.includes(r.unit)) && r.quantity !== "leak-down" ? quantityProblem(r.value, r.unit) : null;
      if (outOfRange && !(r.quantity === "temperature" && toStoredSI(r.quantity, r.value, r.unit) <= 0))
        ctx.addIssue({ code: "custom", path: ["value"], message: outOfRange });
      if (r.t != null && pastTheEnd(r.t, durationS)) ctx.addIssue({ code: "custom", path: ["t"], message: tooLateMessage(durationS!) });
    })
    .transform(({ fastener, cylinder, journal, depth, angle, valueDecimals, ...r }) => {
      const given = storedPosition({ fastener, cylinder, journal, depth, angle });
      // A reading sent the old way, its place written in the label ("cyl 3, 20 mm down, 90°"),
      // gets the place in its fields as migration 0021 did for the stored ones.
      if (Object.values(given).every((v) => v == null) && r.label) {
        const parsed = positionFromLabel(r.quantity, r.label);
        return { ...r, valueDecimals: valueDecimals ?? guessedDecimals(r.value), label: parsed.label, position: parsed.position };
      }
      return { ...r, valueDecimals: valueDecimals ?? guessedDecimals(r.value), position: given };
    });
}
