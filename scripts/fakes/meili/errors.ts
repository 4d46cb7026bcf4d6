/**
 * Errors in the shape the Meilisearch API answers: `{ message, code, type, link }` with a
 * non-2xx status (https://www.meilisearch.com/docs/reference/errors/error_codes).
 */
export type ErrorType = "invalid_request" | "auth" | "internal" | "system";

export type MeiliErrorBody = { message: string; code: string; type: ErrorType; link: string };

export class MeiliError extends Error {
  readonly status: number;
  readonly code: string;
  readonly type: ErrorType;

  constructor(status: number, code: string, message: string, type: ErrorType = "invalid_request") {
    super(message);
    this.status = status;
    this.code = code;
    this.type = type;
  }

  toJSON(): MeiliErrorBody {
    return { message: this.message, code: this.code, type: this.type, link: `https://docs.meilisearch.com/errors#${this.code}` };
  }
}

export const bad = (code: string, message: string) => new MeiliError(400, code, message);

export const indexNotFound = (uid: string) => new MeiliError(404, "index_not_found", `Index \`${uid}\` not found.`);

export const documentNotFound = (id: string) => new MeiliError(404, "document_not_found", `Document \`${id}\` not found.`);

export const taskNotFound = (uid: string) => new MeiliError(404, "task_not_found", `Task \`${uid}\` not found.`);

/** How a JSON value is named in Meilisearch's deserialisation errors. */
export function describeJsonValue(v: unknown): string {
  if (v === null) return "null: `null`";
  if (Array.isArray(v)) return `an array: \`${JSON.stringify(v)}\``;
  if (typeof v === "string") return `a string: \`${JSON.stringify(v)}\``;
  if (typeof v === "boolean") return `a boolean: \`${v}\``;
  if (typeof v === "number") {
    if (Number.isInteger(v)) return `${v < 0 ? "a negative" : "a positive"} integer: \`${v}\``;
    return `a float: \`${v}\``;
  }
  return `an object: \`${JSON.stringify(v)}\``;
}

/** `Invalid value type at `.limit`: expected a positive integer, but found a string: `"x"``. */
export function invalidType(code: string, field: string, expected: string, value: unknown): MeiliError {
  return bad(code, `Invalid value type at \`.${field}\`: expected ${expected}, but found ${describeJsonValue(value)}`);
}
