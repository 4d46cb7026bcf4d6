/**
 * The record page's calculator forms (Bore distortion, piston-to-wall), parsed at the edge.
 * Field names: intent, specId, cylinder (the group run; absent: every reading of the spec),
 * depth.<readingId> / angle.<readingId> (typed only for a reading filed without its place),
 * boreReading, pistonReading, clearanceSpec. Pure: no database.
 */
import { z } from "zod";
import type { FieldErrors } from "~/lib/forms";
import type { TypedPlace } from "./calcs";

const text = z.string().trim().default("");

// The room Bore distortion's own page gives a depth and an angle typed by hand.
const MAX_DEPTH_MM = 2000;
const MAX_ANGLE_DEG = 720;

const decimal = (s: string) => (/^[-+]?(\d+([.,]\d*)?|[.,]\d+)$/.test(s) ? Number(s.replace(",", ".")) : Number.NaN);
const typedDepth = text.transform(decimal).pipe(z.number().min(0).max(MAX_DEPTH_MM));
const typedAngle = text.transform(decimal).pipe(z.number().min(-MAX_ANGLE_DEG).max(MAX_ANGLE_DEG));

export const DEPTH_WORDS = "Depth below the deck, in mm.";
export const ANGLE_WORDS = "Angle in degrees.";

export const calcFormSchema = z.discriminatedUnion(
  "intent",
  [
    z
      .object({
        intent: z.literal("distortion"),
        specId: text,
        // "" is the group of readings without a cylinder; absent, every reading of the spec.
        cylinder: z
          .string()
          .trim()
          .regex(/^\d{0,3}$/, { message: "Choose a cylinder of the record." })
          .transform((s) => (s === "" ? null : Number(s)))
          .optional(),
      })
      .catchall(z.unknown()),
    z.object({ intent: z.literal("piston-to-wall"), boreReading: text, pistonReading: text, clearanceSpec: text }).catchall(z.unknown()),
  ],
  { error: "This form asked for something this page does not do." },
);

export type CalcForm = z.infer<typeof calcFormSchema>;

/**
 * The depths and angles typed for `ids` (depth.<id> in mm, angle.<id> in degrees); a field
 * left blank is no value, a field that is no depth or angle is an error by its name.
 */
export function typedPlaces(form: Record<string, unknown>, ids: string[]): { places: Map<string, TypedPlace>; errors: FieldErrors } {
  const places = new Map<string, TypedPlace>();
  const errors: FieldErrors = {};
  for (const id of ids) {
    const raw = (k: string) => (typeof form[`${k}.${id}`] === "string" ? String(form[`${k}.${id}`]).trim() : "");
    const place: TypedPlace = {};
    if (raw("depth") !== "") {
      const d = typedDepth.safeParse(raw("depth"));
      if (d.success) place.depth = { value: d.data, unit: "mm" };
      else errors[`depth.${id}`] = DEPTH_WORDS;
    }
    if (raw("angle") !== "") {
      const a = typedAngle.safeParse(raw("angle"));
      if (a.success) place.angleDeg = a.data;
      else errors[`angle.${id}`] = ANGLE_WORDS;
    }
    places.set(id, place);
  }
  return { places, errors };
}
