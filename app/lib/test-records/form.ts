/**
 * Reading fields of the test record form (shared by the new-record and amend forms and their
 * server actions). Field names: r.<specId>.<i>.value / .unit / .note / .src (a recording
 * reading pulled in). Pure: no database.
 */
import { z } from "zod";
import { unitKind } from "~/lib/calc";
import { isRealDate, isUuid, quantityProblem } from "~/lib/edge";
import { parseForm, type FieldErrors } from "~/lib/forms";
import {
  depthEntered,
  positionFieldsForSpec,
  positionFromLabel,
  positionInputSchema,
  positionIssues,
  storedPosition,
  type Position,
  type PositionField,
} from "~/lib/recordings/positions";
import { typedDecimals, typedText } from "~/lib/typed-number";
import { readingVerdict, VerdictInputError, withEmptyPlaces, type SpecLimits } from "./verdict";

/** `decimals`: as many as were typed ("88.010" → 3), kept beside the value (migration 0026). */
export type TypedReading = {
  value: number;
  decimals: number;
  unit: string;
  note: string;
  position: Position;
  sourceReadingId: string | null;
};

/** No engine was bench-tested before this; an earlier date is a typing slip. */
export const EARLIEST_TEST_DATE = "1900-01-01";

export const WORK_ORDER_PATTERN = /^[A-Z]{2,5}-\d{2}-\d{3,5}$/;

const optionalSeconds = z
  .string()
  .trim()
  .default("")
  .transform((s) => (s === "" ? null : Number(s.replace(",", "."))))
  // No recording runs a million seconds (11 days): a larger number is a slip, as in recordings/video-time.ts.
  .refine((n) => n === null || (Number.isFinite(n) && n >= 0 && n <= 1e6), {
    message: "Seconds from the start of the recording, 0 up to the recording's length.",
  });

export const headerSchema = z
  .object({
    title: z
      .string()
      .trim()
      .min(3, { message: "Give the record a title of at least 3 characters." })
      .max(200, { message: "At most 200 characters." }),
    testedOn: z
      .string()
      .trim()
      .regex(/^\d{4}-\d{2}-\d{2}$/, { message: "Enter the date of the test." })
      // A day that exists (2024-02-30 does not; PostgreSQL refused it with a 500), in the shop's era.
      .refine(isRealDate, { message: "That day does not exist in the calendar." })
      .refine((s) => s >= EARLIEST_TEST_DATE, { message: `Enter a test date from ${EARLIEST_TEST_DATE} on.` })
      .refine((s) => Date.parse(s) <= Date.now() + 36 * 3600 * 1000, { message: "The test date cannot be in the future." }),
    engineSerial: z.string().trim().max(80, { message: "At most 80 characters." }).default(""),
    notes: z.string().trim().max(5000, { message: "At most 5000 characters." }).default(""),
    recordingStartS: optionalSeconds,
    recordingEndS: optionalSeconds,
  })
  .refine((h) => h.recordingStartS == null || h.recordingEndS == null || h.recordingEndS >= h.recordingStartS, {
    message: "The span must end after it starts.",
    path: ["recordingEndS"],
  });

export const newRecordSchema = z
  .object({
    workOrder: z
      .string()
      .trim()
      .transform((s) => s.toUpperCase())
      .pipe(z.string().regex(WORK_ORDER_PATTERN, { message: "Work orders look like LEW-24-0117." })),
    revisionId: z.string().uuid({ message: "Choose a procedure first." }),
    recordingId: z
      .string()
      .trim()
      .default("")
      .refine((s) => s === "" || z.string().uuid().safeParse(s).success, { message: "Unknown recording." }),
  })
  .and(headerSchema);

export const amendSchema = z
  .object({
    reason: z
      .string()
      .trim()
      .min(5, { message: "Say why the record is amended (at least 5 characters)." })
      .max(2000, { message: "At most 2000 characters." }),
  })
  .and(headerSchema);

const ROW_VALUE = /^[-+]?(\d+([.,]\d*)?|[.,]\d+)(e[-+]?\d+)?$/i;

/** One reading row's own fields (its place is read by `readPosition`, per spec). */
const readingRowSchema = z.object({
  value: z
    .string()
    .refine((raw) => ROW_VALUE.test(raw) && Number.isFinite(Number(raw.replace(",", "."))), { message: "Enter a number, e.g. 88.006." })
    .transform((raw) => ({ value: Number(raw.replace(",", ".")), decimals: typedDecimals(raw) ?? 0 })),
  unit: z.string().refine((u) => unitKind(u) != null, { message: "Choose a unit." }),
  note: z.string().transform((n) => n.slice(0, 200)),
  src: z.string().refine((s) => s === "" || isUuid(s), {
    message: "That recording reading does not exist: pull the reading in again from the recording.",
  }),
});

// A bad pulled-in link is the value's problem: the row shows no field for it.
const ROW_FIELD_OF: Record<string, string> = { value: "value", unit: "unit", note: "note", src: "value" };

/** Reads the reading rows from the form; blank rows are ignored; bad rows get field errors. */
export function parseReadings(
  form: FormData,
  specs: SpecLimits[],
): { readings: Record<string, TypedReading[]>; errors: FieldErrors; count: number } {
  const readings: Record<string, TypedReading[]> = {};
  const errors: FieldErrors = {};
  let count = 0;
  const byId = new Map(specs.map((s) => [s.id, s]));
  const rows = new Map<string, { specId: string; i: number }>();
  for (const key of form.keys()) {
    const m = /^r\.([0-9a-f-]{36})\.(\d{1,3})\.value$/.exec(key);
    if (m) rows.set(`${m[1]}.${m[2]}`, { specId: m[1], i: Number(m[2]) });
  }
  const sorted = [...rows.values()].sort((a, b) => (a.specId === b.specId ? a.i - b.i : 0));
  for (const { specId, i } of sorted) {
    const base = `r.${specId}.${i}`;
    const field = (f: string) => String(form.get(`${base}.${f}`) ?? "").trim();
    if (field("value") === "") continue;
    const spec = byId.get(specId);
    if (!spec) {
      errors[`${base}.value`] = "This spec is not in the revision the record is filed against.";
      continue;
    }
    const row = readingRowSchema.safeParse({ value: field("value"), unit: field("unit"), note: field("note"), src: field("src") });
    if (!row.success) {
      const first = row.error.issues[0];
      errors[`${base}.${ROW_FIELD_OF[String(first.path[0])] ?? "value"}`] = first.message;
      continue;
    }
    const { value, decimals } = row.data.value;
    const { unit, note, src } = row.data;
    const outOfRange = quantityProblem(value, unit);
    if (outOfRange) {
      errors[`${base}.value`] = outOfRange;
      continue;
    }
    const where = readPosition(form, base, positionFieldsForSpec(spec));
    if ("errors" in where) {
      Object.assign(errors, where.errors);
      continue;
    }
    try {
      readingVerdict(spec, { value, unit });
    } catch (err) {
      if (err instanceof VerdictInputError) {
        errors[`${base}.${err.field}`] = err.message;
        continue;
      }
      throw err;
    }
    // A form sent the old way, the place written in the note, gets it in the fields as the readings API does.
    const typed = Object.values(where.position).every((v) => v == null)
      ? positionFromLabel(positionFieldsForSpec(spec), note)
      : { position: where.position, label: note };
    readings[specId] ??= [];
    readings[specId].push({
      value,
      decimals,
      unit,
      note: typed.label,
      position: typed.position,
      sourceReadingId: src === "" ? null : src,
    });
    count++;
  }
  return { readings, errors, count };
}

/**
 * A row's place (r.<specId>.<i>.cylinder / .fastener / .journal / .depth + .depthUnit / .angle),
 * only the fields that fit the spec, checked by the same schema as a recording's readings.
 */
function readPosition(form: FormData, base: string, fits: PositionField[]): { position: Position } | { errors: FieldErrors } {
  const text = (f: string) => String(form.get(`${base}.${f}`) ?? "").trim();
  const num = (f: string) =>
    text(f) === "" ? null : /^[-+]?(\d+([.,]\d*)?|[.,]\d+)$/.test(text(f)) ? Number(text(f).replace(",", ".")) : text(f);
  const input: Record<string, unknown> = {};
  for (const f of fits) {
    if (f === "depth") input.depth = num("depth") == null ? null : { value: num("depth"), unit: text("depthUnit") || "mm" };
    else input[f] = num(f);
  }
  const parsed = positionInputSchema.safeParse(input);
  const errors: FieldErrors = {};
  if (!parsed.success) for (const i of parsed.error.issues) errors[`${base}.${String(i.path[0])}`] ??= i.message;
  else for (const i of positionIssues(fits, parsed.data, "")) errors[`${base}.${i.path}`] ??= i.message;
  return Object.keys(errors).length || !parsed.success ? { errors } : { position: storedPosition(parsed.data) };
}

/** The place of a row, as the form's fields r.<specId>.<i>.<key> (depthUnit: mm or in). */
export const PLACE_KEYS = ["fastener", "cylinder", "journal", "depth", "depthUnit", "angle"] as const;
export type PlaceKey = (typeof PLACE_KEYS)[number];

/** A stored place as a row's text fields (a recording's reading pulled in, or a filed one). */
export function placeFields(p: Partial<Position>): Record<PlaceKey, string> {
  const depth = depthEntered({ depthM: p.depthM ?? null, depthUnit: p.depthUnit ?? null });
  const str = (x: number | null | undefined) => (x == null ? "" : String(x));
  return {
    fastener: str(p.fastener),
    cylinder: str(p.cylinder),
    journal: str(p.journal),
    depth: depth ? String(depth.value) : "",
    depthUnit: depth?.unit ?? "mm",
    angle: str(p.angleDeg),
  };
}

/**
 * The amend form's reading fields from the readings in force, each value as it was typed
 * (88.010 stays 88.010) and its place in the fields.
 */
export function amendFormValues(
  readings: ({
    specId: string;
    position: number;
    valueEntered: number;
    valueDecimals: number | null;
    unitEntered: string;
    noteText: string;
    sourceReadingId: string | null;
  } & Partial<Position>)[],
  // Places a run left empty: each an empty row of its spec, with its place filled in, among the
  // spec's rows where its number falls (Cyl 3 between Cyl 2 and Cyl 4), so typing the value fills it.
  missingPlaces: { specId: string; field: "cylinder" | "journal" | "fastener"; n: number }[] = [],
): Record<string, string> {
  const values: Record<string, string> = {};
  const specIds = [...new Set([...readings, ...missingPlaces].map((r) => r.specId))];
  for (const specId of specIds) {
    const mine = readings.filter((r) => r.specId === specId).sort((a, b) => a.position - b.position);
    const slots = withEmptyPlaces(
      mine,
      missingPlaces.filter((p) => p.specId === specId),
    );
    slots.forEach((slot, i) => {
      const base = `r.${specId}.${i}`;
      if ("place" in slot) {
        values[`${base}.value`] = "";
        values[`${base}.${slot.place.field}`] = String(slot.place.n);
        return;
      }
      const r = slot.r;
      values[`${base}.value`] = typedText(r.valueEntered, r.valueDecimals);
      values[`${base}.unit`] = r.unitEntered;
      values[`${base}.note`] = r.noteText;
      for (const [k, v] of Object.entries(placeFields(r))) values[`${base}.${k}`] = v;
      if (r.sourceReadingId) values[`${base}.src`] = r.sourceReadingId;
    });
  }
  return values;
}

/**
 * A new-record or amend form as a whole: its header through `schema`, its reading rows checked
 * against the revision's specs; at least one reading (`noReadings` says so otherwise).
 */
export function parseRecordForm<S extends z.ZodType>(schema: S, form: FormData, specs: SpecLimits[], noReadings: string) {
  const parsed = parseForm(schema, form);
  const r = parseReadings(form, specs);
  const errors: FieldErrors = { ...(parsed.ok ? {} : parsed.errors), ...r.errors };
  if (!Object.keys(r.errors).length && r.count === 0) errors.readings = noReadings;
  if (!parsed.ok || Object.keys(errors).length) return { ok: false as const, errors, values: parsed.values };
  return { ok: true as const, data: parsed.data as z.infer<S>, readings: r.readings, values: parsed.values };
}
