/** What a calculator form gives back: the input it built, the result, and errors by field. */
export type FormValues = Record<string, string>;
export type FieldErrors = Record<string, string>;

export interface Outcome<R> {
  /** The function's input JSON, when the form could be read. */
  input?: unknown;
  /** The function's result, when the input was valid. */
  result?: R;
  /** Messages by form field name ("form" for the whole form). */
  errors: FieldErrors;
}

export interface Issue {
  path: string;
  message: string;
}

/** The issues of a ZodError (paths joined with dots), or null for any other error. */
export function zodIssues(err: unknown): Issue[] | null {
  if (!err || typeof err !== "object") return null;
  const e = err as { name?: unknown; issues?: unknown };
  if (e.name !== "ZodError" || !Array.isArray(e.issues)) return null;
  return (e.issues as { path?: unknown[]; message?: unknown }[]).map((i) => ({
    path: (i.path ?? []).map(String).join("."),
    message: String(i.message ?? "invalid"),
  }));
}

/** Runs `fn(input)`, turning a ZodError into field errors through `fieldOf` (path → field name). */
export function runChecked<R>(fn: (input: never) => R, input: unknown, errors: FieldErrors, fieldOf: (path: string) => string): Outcome<R> {
  if (Object.keys(errors).length > 0) return { input, errors };
  try {
    return { input, result: fn(input as never), errors };
  } catch (err) {
    const issues = zodIssues(err);
    if (!issues) throw err;
    const out: FieldErrors = {};
    for (const i of issues) out[fieldOf(i.path) || "form"] ??= capitalise(i.message);
    return { input, errors: out };
  }
}

export function capitalise(s: string): string {
  return s ? s[0].toUpperCase() + s.slice(1) : s;
}

/** Reads `name.value` / `name.unit` into a quantity; a blank value is an error only when required. */
export function readQuantity(
  values: FormValues,
  name: string,
  errors: FieldErrors,
  required = true,
  parse: (s: string | undefined) => number | undefined,
): { value: number; unit: string } | undefined {
  const n = parse(values[`${name}.value`]);
  if (n === undefined) {
    if (required) errors[`${name}.value`] = "Enter a number.";
    return undefined;
  }
  if (Number.isNaN(n)) {
    errors[`${name}.value`] = "That is not a number.";
    return undefined;
  }
  return { value: n, unit: values[`${name}.unit`] ?? "" };
}

/**
 * A calculator page's first values with the server's outcome of them, sent with the page so the
 * browser's first render shows the server's numbers. Computing them again in the browser is not
 * enough: its sin, cos and atan2 may differ from the server's in the last bits, and a result
 * on a rounding edge (a bore's lobe phase of 7.49999999998° on the server, 7.5000000001° in the
 * browser) then reads differently, which React reports as a hydration mismatch (error #418).
 */
export function initialForm<O>(values: FormValues, run: (values: FormValues) => O): { values: FormValues; outcome: O } {
  return { values, outcome: run(values) };
}
