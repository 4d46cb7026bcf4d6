import type { z } from "zod";

export type FieldErrors = Record<string, string>;

/** Validates form data with a module-level zod schema; errors come back keyed by field. */
export function parseForm<S extends z.ZodType>(
  schema: S,
  formData: FormData,
): { ok: true; data: z.infer<S>; values: Record<string, string> } | { ok: false; errors: FieldErrors; values: Record<string, string> } {
  const values: Record<string, string> = {};
  for (const [k, v] of formData.entries()) if (typeof v === "string" && k !== "password" && !k.startsWith("password")) values[k] = v;
  const raw: Record<string, FormDataEntryValue> = {};
  for (const [k, v] of formData.entries()) raw[k] = v;
  const result = schema.safeParse(raw);
  if (result.success) return { ok: true, data: result.data, values };
  const errors: FieldErrors = {};
  for (const issue of result.error.issues) {
    const key = issue.path.join(".") || "form";
    errors[key] ??= issue.message;
  }
  return { ok: false, errors, values };
}
