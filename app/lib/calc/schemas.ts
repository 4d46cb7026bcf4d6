/**
 * Zod schemas of every input. They only validate, fill defaults and turn a common spelling of
 * a table's name into its id: their output is again a valid input, so
 * `calculateX(schema.parse(json))` and `calculateX(json)` agree.
 * Bounds are checked in SI after conversion; a value outside them is an error at ["…","value"].
 */
import { z } from "zod";
import { MATERIAL_IDS, PROPERTY_CLASS_IDS, resolveMaterialId, type PropertyClassId } from "./materials";
import { parseThread, unknownThreadMessage } from "./threads";
import { UNIT_CODES, fromSI, toSI, unitLabel, type UnitCode, type UnitKind } from "./units";

const finiteNumber = z.number({ error: "must be a finite number" });

/** Any quantity `{ value, unit }` with a finite value and one of the contract's unit codes. */
export const quantitySchema = z.object({
  value: finiteNumber,
  unit: z.enum([...UNIT_CODES.length, ...UNIT_CODES.force, ...UNIT_CODES.torque, ...UNIT_CODES.stress, ...UNIT_CODES.temperature], {
    error: "unknown unit code",
  }),
});

interface Bounds {
  /** What the quantity is, for messages ("torque"). */
  what: string;
  /** Exclusive lower bound in SI. */
  gt?: number;
  /** Inclusive lower bound in SI. */
  ge?: number;
  /** Inclusive upper bound in SI (absurd magnitudes beyond it). */
  le: number;
  /** Unit used to state the bounds in messages. */
  show: UnitCode;
}

function fmt(si: number, unit: UnitCode): string {
  const v = fromSI(si, unit);
  return `${Number(v.toPrecision(6))} ${unitLabel(unit)}`;
}

/** A quantity of one kind whose SI value must lie within `bounds`. */
function kindQuantity<K extends UnitKind>(kind: K, bounds: Bounds) {
  const codes = UNIT_CODES[kind] as unknown as readonly [string, ...string[]];
  return z
    .object({
      value: finiteNumber,
      unit: z.enum(codes as (typeof UNIT_CODES)[K], {
        error: `expected a ${kind} unit (${codes.join(", ")})`,
      }),
    })
    .superRefine((q, ctx) => {
      const si = toSI(q.value, q.unit as UnitCode);
      const fail = (message: string) => ctx.addIssue({ code: "custom", message, path: ["value"] });
      if (!Number.isFinite(si)) fail(`${bounds.what} is out of range`);
      else if (bounds.gt !== undefined && !(si > bounds.gt))
        fail(bounds.gt === 0 ? `${bounds.what} must be greater than zero` : `${bounds.what} must be above ${fmt(bounds.gt, bounds.show)}`);
      else if (bounds.ge !== undefined && !(si >= bounds.ge))
        fail(
          bounds.gt !== undefined
            ? `${bounds.what} below ${fmt(bounds.ge, bounds.show)} is not plausible`
            : bounds.ge === 0
              ? `${bounds.what} must not be negative`
              : `${bounds.what} must be at least ${fmt(bounds.ge, bounds.show)}`,
        );
      else if (!(si <= bounds.le)) fail(`${bounds.what} above ${fmt(bounds.le, bounds.show)} is not plausible`);
    });
}

/** A length quantity (units m, mm, um, in, thou), finite, within ±1 km. */
export const lengthSchema = kindQuantity("length", { what: "length", ge: -1e3, le: 1e3, show: "m" });
/** A force quantity (units N, kN, lbf), finite, within ±1 GN. */
export const forceSchema = kindQuantity("force", { what: "force", ge: -1e9, le: 1e9, show: "N" });
/** A torque quantity (units N.m, ft.lbf, in.lbf), finite, within ±10 MN·m. */
export const torqueSchema = kindQuantity("torque", { what: "torque", ge: -1e7, le: 1e7, show: "N.m" });
/** A stress or pressure quantity (units Pa, kPa, MPa, GPa, psi, ksi, bar), finite, within ±1 TPa. */
export const stressSchema = kindQuantity("stress", { what: "stress", ge: -1e12, le: 1e12, show: "MPa" });
/** A temperature quantity (units degC, degF, K) above absolute zero and at most 2000 K. */
export const temperatureSchema = kindQuantity("temperature", { what: "temperature", gt: 0, le: 2000, show: "degC" });

/** A quantity of any kind: the schema for `{ value, unit }` of the given kind. */
export const quantitySchemas = {
  length: lengthSchema,
  force: forceSchema,
  torque: torqueSchema,
  stress: stressSchema,
  temperature: temperatureSchema,
} as const;

/** A thread designation the module knows ("M12x1.5", "M10", "7/16-20", "1/2-13 UNC", "#10-32"). */
export const threadDesignationSchema = z
  .string({ error: "thread designation must be a string" })
  .refine((s) => parseThread(s) !== undefined, { error: (iss) => unknownThreadMessage(iss.input) });

// ---------------------------------------------------------------------------------------------
// Preload
// ---------------------------------------------------------------------------------------------

const torqueInput = kindQuantity("torque", { what: "torque", gt: 0, ge: 1e-3, le: 1e5, show: "N.m" });
const preloadForce = kindQuantity("force", { what: "preload", gt: 0, ge: 1e-3, le: 1e7, show: "N" });
const headDiameter = kindQuantity("length", { what: "head bearing diameter", gt: 0, ge: 1e-4, le: 1, show: "mm" });
const gripLength = kindQuantity("length", { what: "grip length", gt: 0, ge: 1e-5, le: 10, show: "mm" });
const modulus = kindQuantity("stress", { what: "modulus", ge: 1e9, le: 1e12, show: "GPa" });
const yieldStrength = kindQuantity("stress", { what: "yield strength", ge: 1e6, le: 1e10, show: "MPa" });

// A Map, not an object literal: "constructor" or "__proto__" must find nothing rather than
// something inherited from Object.prototype.
const PROPERTY_CLASS_ALIASES = new Map<string, PropertyClassId>([
  ["8.8", "8.8"],
  ["10.9", "10.9"],
  ["12.9", "12.9"],
  ["sae5", "SAE-5"],
  ["grade5", "SAE-5"],
  ["saegrade5", "SAE-5"],
  ["saej429grade5", "SAE-5"],
  ["sae8", "SAE-8"],
  ["grade8", "SAE-8"],
  ["saegrade8", "SAE-8"],
  ["saej429grade8", "SAE-8"],
]);

/** Resolves a property class spelling ("8.8", "SAE-5", "sae 5", "Grade 8") to its id. */
export function resolvePropertyClass(name: string): PropertyClassId | undefined {
  if (typeof name !== "string") return undefined;
  const t = name.trim();
  if ((PROPERTY_CLASS_IDS as readonly string[]).includes(t)) return t as PropertyClassId;
  const key = t
    .toLowerCase()
    .replace(/^iso\s*898-1\s*/, "")
    .replace(/^class\s*/, "");
  return PROPERTY_CLASS_ALIASES.get(key) ?? PROPERTY_CLASS_ALIASES.get(key.replace(/[^a-z0-9]/g, ""));
}

/**
 * A name of one of the module's tables: a common spelling is turned into the table's id,
 * which the enum of the table's ids then checks; anything else is refused with `message`.
 */
function tableName<const T extends readonly [string, ...string[]]>(ids: T, resolve: (s: string) => T[number] | undefined, message: string) {
  return z
    .string({ error: message })
    .transform((s) => resolve(s) ?? s)
    .pipe(z.enum(ids, { error: message }));
}

const propertyClassSchema = tableName(
  PROPERTY_CLASS_IDS,
  resolvePropertyClass,
  `unknown property class: use one of ${PROPERTY_CLASS_IDS.join(", ")}`,
);

/** The nut-factor model: T = K·F·d. */
export const nutFactorMethodSchema = z.object({
  kind: z.literal("nut-factor"),
  k: finiteNumber
    .gt(0, { error: "nut factor K must be greater than zero" })
    .gte(0.01, { error: "nut factor K below 0.01 is not plausible" })
    .lte(1, { error: "nut factor K above 1 is not plausible" }),
});

const mu = (what: string) =>
  finiteNumber.gte(0, { error: `${what} must not be negative` }).lte(1, { error: `${what} above 1 is not plausible` });

/** The friction model (ISO 16047 / VDI 2230): T = F·(P/(2π) + μth·d2/(2·cos 30°) + μhead·Db/2). */
export const frictionMethodSchema = z.object({
  kind: z.literal("friction"),
  muThread: mu("thread friction coefficient"),
  muHead: mu("head friction coefficient"),
  headDiameter,
});

/** Material for percent of yield: a property class / grade, or a given yield strength. */
export const boltMaterialSchema = z
  .object({ propertyClass: propertyClassSchema.optional(), yieldStrength: yieldStrength.optional() })
  .superRefine((m, ctx) => {
    if (m.propertyClass === undefined && m.yieldStrength === undefined)
      ctx.addIssue({ code: "custom", message: "give a propertyClass or a yieldStrength", path: ["propertyClass"] });
    if (m.propertyClass !== undefined && m.yieldStrength !== undefined)
      ctx.addIssue({ code: "custom", message: "give either a propertyClass or a yieldStrength, not both", path: ["yieldStrength"] });
  });

/** Preload calculator input (see the contract): thread, direction, torque or preload, method, material?, grip?. */
export const preloadInputSchema = z
  .object({
    thread: threadDesignationSchema,
    direction: z.enum(["torque-to-preload", "preload-to-torque"]).default("torque-to-preload"),
    torque: torqueInput.optional(),
    preload: preloadForce.optional(),
    method: z.discriminatedUnion("kind", [nutFactorMethodSchema, frictionMethodSchema], {
      error: 'method.kind must be "nut-factor" or "friction"',
    }),
    material: boltMaterialSchema.optional(),
    grip: z.object({ length: gripLength, modulus: modulus.optional() }).optional(),
  })
  .superRefine((v, ctx) => {
    if (v.direction === "torque-to-preload" && v.torque === undefined)
      ctx.addIssue({ code: "custom", message: "torque is required for torque-to-preload", path: ["torque"] });
    if (v.direction === "preload-to-torque" && v.preload === undefined)
      ctx.addIssue({ code: "custom", message: "preload is required for preload-to-torque", path: ["preload"] });
  });

/** One bench reading for the nut-factor fit: applied torque and measured clamp load. */
export const nutFactorPointSchema = z.object({ torque: torqueInput, preload: preloadForce });

/** Input of fitNutFactor as one object: `{ points, thread }`. */
export const fitNutFactorInputSchema = z.object({
  points: z
    .array(nutFactorPointSchema)
    .min(1, { error: "at least one torque / clamp-load point is needed" })
    .max(10000, { error: "too many points (at most 10000)" }),
  thread: threadDesignationSchema,
});

// ---------------------------------------------------------------------------------------------
// Bore distortion
// ---------------------------------------------------------------------------------------------

const depthQ = kindQuantity("length", { what: "depth", ge: 0, le: 10, show: "mm" });
const diameterQ = kindQuantity("length", { what: "diameter", gt: 0, ge: 1e-9, le: 10, show: "mm" });
const radiusQ = kindQuantity("length", { what: "radius", gt: 0, ge: 1e-9, le: 5, show: "mm" });

/** One bore reading: depth, angle (degrees, in the direction the readings go) and a diameter (diametral) or a radius (radial). */
export const boreReadingSchema = z.object({
  depth: depthQ,
  angleDeg: finiteNumber
    .gte(-3600, { error: "angle must be between -3600° and 3600°" })
    .lte(3600, { error: "angle must be between -3600° and 3600°" }),
  diameter: diameterQ.optional(),
  radius: radiusQ.optional(),
});

const modeSchema = z.enum(["diametral", "radial"], { error: 'mode must be "diametral" or "radial"' });
const readingsSchema = z
  .array(boreReadingSchema)
  .min(1, { error: "at least one reading is needed" })
  .max(10000, { error: "too many readings (at most 10000)" });

/** A measured bore state: mode (default diametral at the top level), readings and an optional nominal bore. */
export const boreStateSchema = z.object({
  mode: modeSchema.optional(),
  readings: readingsSchema,
  reference: diameterQ.optional(),
});

function checkReadingKeys(
  readings: { diameter?: unknown; radius?: unknown }[],
  mode: "diametral" | "radial",
  prefix: (string | number)[],
  ctx: z.RefinementCtx,
) {
  const key = mode === "radial" ? "radius" : "diameter";
  readings.forEach((r, i) => {
    if (r[key] === undefined)
      ctx.addIssue({ code: "custom", message: `${mode} mode needs a ${key} in every reading`, path: [...prefix, "readings", i, key] });
  });
}

/** Bore distortion input: mode (default diametral), readings, reference?, compareTo? (same shape). */
export const distortionInputSchema = z
  .object({
    mode: modeSchema.default("diametral"),
    readings: readingsSchema,
    reference: diameterQ.optional(),
    compareTo: boreStateSchema.optional(),
  })
  .superRefine((v, ctx) => {
    checkReadingKeys(v.readings, v.mode, [], ctx);
    if (v.compareTo) checkReadingKeys(v.compareTo.readings, v.compareTo.mode ?? v.mode, ["compareTo"], ctx);
  });

// ---------------------------------------------------------------------------------------------
// Clearances
// ---------------------------------------------------------------------------------------------

const partDiameter = (what: string) => kindQuantity("length", { what, gt: 0, ge: 1e-4, le: 10, show: "mm" });
const specLimit = kindQuantity("length", { what: "spec limit", ge: -1, le: 1, show: "mm" });

/** Optional spec band for a clearance: min and/or max (lengths). */
export const specSchema = z.object({ min: specLimit.optional(), max: specLimit.optional() }).superRefine((s, ctx) => {
  if (s.min === undefined && s.max === undefined)
    ctx.addIssue({ code: "custom", message: "a spec needs a min, a max or both", path: ["min"] });
  if (s.min && s.max && toSI(s.min.value, s.min.unit) > toSI(s.max.value, s.max.unit))
    ctx.addIssue({ code: "custom", message: "spec min is above spec max", path: ["max"] });
});

/** A material for thermal growth: an id of the material table (or a common spelling of it) or `{ alphaPerK }`. */
const unknownMaterial = `unknown material: use one of ${MATERIAL_IDS.join(", ")} or { "alphaPerK": number }`;
export const materialRefSchema = z.union(
  [
    tableName(MATERIAL_IDS, resolveMaterialId, unknownMaterial),
    z.object({
      alphaPerK: finiteNumber
        .gte(0, { error: "alphaPerK must not be negative" })
        .lte(1e-4, { error: "alphaPerK is per kelvin (e.g. 22e-6); above 1e-4 is not plausible" }),
    }),
  ],
  { error: unknownMaterial },
);

/** Temperatures and materials for hot piston-to-wall clearance. */
export const thermalSchema = z.object({
  ambient: temperatureSchema,
  boreTemperature: temperatureSchema,
  pistonTemperature: temperatureSchema,
  boreMaterial: materialRefSchema,
  pistonMaterial: materialRefSchema,
});

/** Piston-to-wall clearance input. */
export const pistonToWallInputSchema = z.object({
  kind: z.literal("piston-to-wall"),
  bore: partDiameter("bore"),
  piston: partDiameter("piston diameter"),
  thermal: thermalSchema.optional(),
  spec: specSchema.optional(),
});

/** Bearing oil clearance input: journal and bearing bore, or journal, housing bore and shell thickness (two shells). */
export const bearingInputSchema = z
  .object({
    kind: z.literal("bearing"),
    journal: partDiameter("journal diameter"),
    bearingBore: partDiameter("bearing bore").optional(),
    housingBore: partDiameter("housing bore").optional(),
    shellThickness: kindQuantity("length", { what: "shell thickness", gt: 0, ge: 1e-6, le: 0.5, show: "mm" }).optional(),
    spec: specSchema.optional(),
  })
  .superRefine((b, ctx) => {
    const direct = b.bearingBore !== undefined;
    const shells = b.housingBore !== undefined || b.shellThickness !== undefined;
    if (direct && shells)
      ctx.addIssue({ code: "custom", message: "give bearingBore, or housingBore and shellThickness, not both", path: ["bearingBore"] });
    else if (!direct && !shells)
      ctx.addIssue({ code: "custom", message: "give bearingBore, or housingBore and shellThickness", path: ["bearingBore"] });
    else if (!direct) {
      if (b.housingBore === undefined)
        ctx.addIssue({ code: "custom", message: "housingBore is required with shellThickness", path: ["housingBore"] });
      if (b.shellThickness === undefined)
        ctx.addIssue({ code: "custom", message: "shellThickness is required with housingBore", path: ["shellThickness"] });
    }
  });

/** Ring end-gap input: bore, gap factor (inch of gap per inch of bore), optional measured gap and spec. */
export const ringGapInputSchema = z.object({
  kind: z.literal("ring-gap"),
  bore: partDiameter("bore"),
  gapPerBore: finiteNumber
    .gt(0, { error: "gapPerBore must be greater than zero" })
    .gte(1e-4, { error: "gapPerBore below 0.0001 in per in is not plausible" })
    .lte(0.05, { error: "gapPerBore is inch per inch of bore (e.g. 0.0045); above 0.05 is not plausible" }),
  measuredGap: kindQuantity("length", { what: "measured gap", ge: 0, le: 1, show: "mm" }).optional(),
  spec: specSchema.optional(),
});

/** Clearance calculator input: one of piston-to-wall, bearing, ring-gap (by `kind`). */
export const clearanceInputSchema = z.discriminatedUnion("kind", [pistonToWallInputSchema, bearingInputSchema, ringGapInputSchema], {
  error: 'kind must be "piston-to-wall", "bearing" or "ring-gap"',
});

// ---------------------------------------------------------------------------------------------
// Types
// ---------------------------------------------------------------------------------------------

/** A quantity `{ value, unit }`. */
export type Quantity = z.input<typeof quantitySchema>;
/** Preload input as accepted (defaults optional). */
export type PreloadInput = z.input<typeof preloadInputSchema>;
/** One torque / clamp-load point for fitNutFactor. */
export type NutFactorPoint = z.input<typeof nutFactorPointSchema>;
/** Bore distortion input as accepted. */
export type DistortionInput = z.input<typeof distortionInputSchema>;
/** One bore reading. */
export type BoreReading = z.input<typeof boreReadingSchema>;
/** Clearance input as accepted (piston-to-wall, bearing or ring-gap). */
export type ClearanceInput = z.input<typeof clearanceInputSchema>;
/** A clearance spec band. */
export type Spec = z.input<typeof specSchema>;
/** Thermal growth input for piston-to-wall. */
export type ThermalInput = z.input<typeof thermalSchema>;
