import { z } from "zod";
import { isRealDate, quantityProblem } from "~/lib/edge";
import { WORK_ORDER_PATTERN } from "~/lib/test-records/form";
import { typedDecimals } from "~/lib/typed-number";

// The build forms, parsed at the edge. Pure: shared by the server and the screens.

/** A work order number as the shop writes it: trimmed, upper case, LEW-24-0117. */
export const workOrderNumber = z
  .string()
  .trim()
  .transform((s) => s.toUpperCase())
  .pipe(z.string().regex(WORK_ORDER_PATTERN, { message: "Work orders look like LEW-24-0117." }));

const SIZE_UNITS = ["mm", "in"] as const;
export type SizeUnit = (typeof SIZE_UNITS)[number];

/** A bore or stroke as typed: the number, its unit and its decimals, or nothing. */
export type TypedSize = { value: number; unit: SizeUnit; decimals: number } | null;

const optionalDay = z
  .string()
  .trim()
  .default("")
  .refine((s) => s === "" || (/^\d{4}-\d{2}-\d{2}$/.test(s) && isRealDate(s)), { message: "That day does not exist in the calendar." })
  .transform((s) => s || null);

const text = (max: number) =>
  z
    .string()
    .trim()
    .max(max, { message: `At most ${max} characters.` })
    .default("");

/** Bore and stroke: a plain number (decimal point or comma) a bore gauge or a crank could have. */
function sizeField(what: "bore" | "stroke") {
  return z
    .string()
    .trim()
    .default("")
    .transform((s, ctx): { n: number; decimals: number } | null => {
      if (s === "") return null;
      const decimals = typedDecimals(s);
      if (decimals == null) {
        ctx.addIssue({ code: "custom", message: `Type the ${what} as a number, e.g. 86.00.` });
        return z.NEVER;
      }
      return { n: Number(s.replace(",", ".")), decimals };
    });
}

/** How many cylinders or main journals: a whole number the run screen offers that many rows for, or nothing. */
function countField(what: string, max: number) {
  const message = `The number of ${what}, from 1 to ${max}.`;
  return z
    .string()
    .trim()
    .default("")
    .transform((s) => (s === "" ? null : Number(s)))
    .pipe(z.number({ error: message }).int(message).min(1, message).max(max, message).nullable());
}

export const buildFields = z
  .object({
    customerName: z.string().trim().min(1, { message: "Name the customer." }).max(120, { message: "At most 120 characters." }),
    customerContact: text(200),
    engine: text(160),
    engineSerial: text(80),
    bore: sizeField("bore"),
    stroke: sizeField("stroke"),
    sizeUnit: z.enum(SIZE_UNITS, { message: "Choose mm or in." }).default("mm"),
    cylinders: countField("cylinders", 16),
    mainJournals: countField("main journals", 12),
    notes: text(5000),
    leadBuilderId: z.string().trim().max(100).default(""),
    receivedOn: optionalDay,
    promisedOn: optionalDay,
  })
  .superRefine((b, ctx) => {
    for (const k of ["bore", "stroke"] as const) {
      const v = b[k]?.n;
      if (v == null) continue;
      const problem = v <= 0 ? "Must be more than zero." : quantityProblem(v, b.sizeUnit);
      if (problem) ctx.addIssue({ code: "custom", path: [k], message: problem });
    }
    if (b.receivedOn && b.promisedOn && b.promisedOn < b.receivedOn)
      ctx.addIssue({ code: "custom", path: ["promisedOn"], message: "Promised for a day before it came in." });
  })
  .transform(({ bore, stroke, sizeUnit, ...rest }) => ({
    ...rest,
    bore: bore && { value: bore.n, unit: sizeUnit, decimals: bore.decimals },
    stroke: stroke && { value: stroke.n, unit: sizeUnit, decimals: stroke.decimals },
  }));

export type BuildFields = z.output<typeof buildFields>;

export const newBuildSchema = z.object({ number: workOrderNumber }).and(buildFields);

export const statusSchema = z.object({
  to: z.enum(["on_bench", "finished", "delivered"], { message: "Choose where the build goes next." }),
});

export const reopenSchema = z.object({
  reason: z
    .string()
    .trim()
    .min(5, { message: "Say why the build is reopened (at least 5 characters)." })
    .max(1000, { message: "At most 1000 characters." }),
});

export const mailSheetSchema = z.object({
  to: z.string().trim().email({ message: "Type the customer's e-mail address." }).max(200),
});

/** A build's address: /builds/LEW-24-0117 (a malformed number is a 404). */
export const buildParams = z.object({ number: workOrderNumber });
