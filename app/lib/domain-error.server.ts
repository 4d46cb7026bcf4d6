/**
 * Turns a `DomainError` into the answer the caller reads: a page's action gets
 * `{ intent, errors: { [field]: reason }, values }` with the error's status (the form shows the
 * reason beside the field and keeps what was typed); the API gets
 * `{ error, reason, issues?, ...details }` JSON with the same status. Anything else is rethrown.
 */
import { data } from "react-router";
import type { FieldErrors } from "./forms";
import { DomainError } from "./domain-error";
import { isApiRequest } from "./edge.server";

const ERROR_WORDS: Record<number, string> = {
  400: "bad request",
  403: "forbidden",
  404: "not found",
  409: "conflict",
  410: "gone",
  413: "too large",
  422: "invalid input",
  423: "locked",
  429: "too many requests",
};

/** The API's JSON for a domain error. */
export function domainErrorJson(err: DomainError): Response {
  const body: Record<string, unknown> = { error: ERROR_WORDS[err.status] ?? "refused", reason: err.message, ...err.details };
  if (err.issues.length > 0) body.issues = err.issues;
  return Response.json(body, { status: err.status, headers: { "Cache-Control": "no-store" } });
}

/** A form's field errors for a domain error. */
export function domainErrorData(err: DomainError, intent = "", values: Record<string, string> = {}) {
  const errors: FieldErrors = { [err.field]: err.message };
  for (const i of err.issues) errors[i.path] ??= i.message;
  return data({ intent, errors, values }, { status: err.status });
}

/**
 * In a route's `catch`: the answer for a DomainError, in the form the request expects; any
 * other error is rethrown (a 500, logged).
 */
export function domainFailure(request: { url: string }, err: unknown, intent = "", values: Record<string, string> = {}) {
  if (!(err instanceof DomainError)) throw err;
  return isApiRequest(request) ? domainErrorJson(err) : domainErrorData(err, intent, values);
}

/** The answer to a form posted with an intent the route does not know (400). */
export function unknownAction(request: { url: string }, intent: unknown = "") {
  return domainFailure(
    request,
    new DomainError("This form asked for something this page does not do. Reload the page and try again.", { status: 400 }),
    typeof intent === "string" ? intent : "",
  );
}

/** The text values of a form, to give back to it with its errors. */
export function formValues(form: FormData): Record<string, string> {
  return Object.fromEntries([...form].filter((e): e is [string, string] => typeof e[1] === "string"));
}
