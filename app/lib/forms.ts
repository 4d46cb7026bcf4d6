import type { z } from "zod";
import { hasNul, NUL_MESSAGE } from "./edge";

export type FieldErrors = Record<string, string>;

/** The fields holding a NUL character, each with its error; empty when none does. */
export function nulErrors(formData: FormData): FieldErrors {
  const errors: FieldErrors = {};
  for (const [k, v] of formData.entries())
    if (typeof v === "string" && (hasNul(v) || hasNul(k))) errors[k.replace(/\0/g, "")] ??= NUL_MESSAGE;
  return errors;
}

/**
 * Validates form data with a module-level zod schema; errors come back keyed by field. A NUL
 * character in any field (in the schema or not: actions also read fields by name) is that
 * field's error, since no text column can store it (app/lib/edge.ts).
 */
export function parseForm<S extends z.ZodType>(
  schema: S,
  formData: FormData,
): { ok: true; data: z.infer<S>; values: Record<string, string> } | { ok: false; errors: FieldErrors; values: Record<string, string> } {
  const values: Record<string, string> = {};
  const errors = nulErrors(formData);
  for (const [k, v] of formData.entries()) {
    if (typeof v === "string" && k !== "password" && !k.startsWith("password")) values[k.replace(/\0/g, "")] = v.replace(/\0/g, "");
  }
  const raw: Record<string, FormDataEntryValue> = {};
  for (const [k, v] of formData.entries()) raw[k] = v;
  const result = schema.safeParse(raw);
  if (result.success && !Object.keys(errors).length) return { ok: true, data: result.data, values };
  if (!result.success) {
    for (const issue of result.error.issues) {
      const key = issue.path.join(".") || "form";
      errors[key] ??= issue.message;
    }
  }
  return { ok: false, errors, values };
}
