/**
 * The server half of the edge layer (the schemas are in `edge.ts`, the body limits in
 * `edge-limits.ts`): bodies are read only through `readForm` / `readJson` / `readText`, which
 * count bytes while the body streams and stop at the route's limit, and every parse failure
 * becomes one of three answers — a page's field errors (400, values kept), the API's
 * 422 `{ error: "invalid input", issues }`, or a 404 for an address that cannot name anything.
 * Pages and the API are told apart by the path (`/api/…`), as everywhere else in the app.
 */
import { data } from "react-router";
import type { z } from "zod";
import { bodyLimitFor, routePath } from "./edge-limits";
import { hasNul, NUL_MESSAGE, nulPath, searchObject } from "./edge";
import type { FieldErrors } from "./forms";

export const isApiRequest = (request: { url: string }): boolean => routePath(new URL(request.url).pathname).startsWith("/api/");

export type Issue = { path: string; message: string };

const issuesOf = (error: z.ZodError): Issue[] => error.issues.map((i) => ({ path: i.path.join("."), message: i.message }));

/** The API's answer to bad input. */
export function invalidJson(issues: Issue[], status = 422): Response {
  return Response.json({ error: "invalid input", issues }, { status, headers: { "Cache-Control": "no-store" } });
}

/** A refusal with a reason, in the form the caller reads: JSON for the API, the error page otherwise. */
function refusal(
  request: { url: string },
  status: number,
  error: string,
  reason: string,
  extra: Record<string, unknown> = {},
  headers: Record<string, string> = {},
): Response {
  if (isApiRequest(request)) return Response.json({ error, reason, ...extra }, { status, headers });
  // Thrown from a loader or action, this renders the root ErrorBoundary with the reason.
  return data({ message: reason }, { status, headers }) as unknown as Response;
}

/**
 * Turns a zod failure into the answer the route gives: the page's field errors with the values
 * typed (400), or the API's 422 JSON with the issues by path. Return it from an action.
 */
export function invalidInput(request: Request, error: z.ZodError, values: Record<string, string> = {}) {
  if (isApiRequest(request)) return invalidJson(issuesOf(error));
  const errors: FieldErrors = {};
  for (const i of error.issues) errors[i.path.join(".") || "form"] ??= i.message;
  return data({ errors, values }, { status: 400 });
}

/**
 * Route params through a schema. An address that cannot name anything (an id that is not a
 * UUID, a revision number past PostgreSQL's integer) is a 404, as a person following a broken
 * link expects, not a 500 from the database refusing it.
 */
export function parseParams<S extends z.ZodType>(request: Request, schema: S, params: unknown, what = "page"): z.infer<S> {
  const parsed = schema.safeParse(params);
  if (parsed.success) return parsed.data;
  notFound(request, what);
}

/** A thing the address names that does not exist (or this person may not know of): the API's 404 JSON, or the error page. */
export function notFound(request: { url: string }, what = "page"): never {
  throw refusal(request, 404, "not found", `There is no such ${what}.`);
}

/** An API address asked with a method it does not answer (405, with the methods it does). */
export function methodNotAllowed(allow: string): Response {
  return Response.json({ error: "method not allowed" }, { status: 405, headers: { Allow: allow } });
}

/**
 * Search params through a schema (absent names read as undefined). A failure is a 400 page
 * with the reason, or the API's 422 with the issues.
 */
export function parseSearch<S extends z.ZodType>(request: Request, schema: S): z.infer<S> {
  const parsed = schema.safeParse(searchObject(request.url));
  if (parsed.success) return parsed.data;
  if (isApiRequest(request)) throw invalidJson(issuesOf(parsed.error));
  const first = parsed.error.issues[0];
  throw refusal(request, 400, "invalid input", `The address's “${first?.path.join(".")}” is not understood: ${first?.message}`);
}

/**
 * A NUL in any search param (or a malformed one) is refused for every route at once, by the
 * root middleware: no query of ours can use it, and PostgreSQL refuses it in any text.
 */
export function urlRefusal(request: { url: string }): Response | null {
  let url: URL;
  try {
    url = new URL(request.url);
  } catch {
    return refusal(request, 400, "invalid input", "The address is not a valid URL.");
  }
  for (const [k, v] of url.searchParams) {
    if (hasNul(k) || hasNul(v)) {
      if (isApiRequest(request)) return invalidJson([{ path: k.replace(/\0/g, "\\0"), message: NUL_MESSAGE }]);
      return refusal(
        request,
        400,
        "invalid input",
        `The address's “${k.replace(/\0/g, "\\0")}” holds a NUL character, which no page can use.`,
      );
    }
  }
  return null;
}

// ---- bodies ---------------------------------------------------------------------------------

/**
 * Past a limit, the rest of a body is read and thrown away (never kept) up to this much, so the
 * client reads the 413 on a connection it can reuse; a larger body is not read at all, and the
 * connection is closed after the answer (the client may then see a reset instead of the 413).
 */
const DRAIN_BYTES = 8 * 1024 * 1024;

function tooLarge(request: Request, limit: number, why: string, close: boolean): Response {
  const reason = `The request body is larger than this address takes (${formatLimit(limit)}: ${why}).`;
  return refusal(request, 413, "request body too large", reason, { limitBytes: limit }, close ? { Connection: "close" } : {});
}

const formatLimit = (n: number) => (n >= 1024 * 1024 ? `${n / (1024 * 1024)} MB` : `${n / 1024} kB`);

/** Reads and discards up to `budget` bytes; true when the body ended within it. */
async function discard(reader: ReadableStreamDefaultReader<Uint8Array>, budget: number): Promise<boolean> {
  let seen = 0;
  while (seen <= budget) {
    const next = await reader.read().catch(() => ({ done: true as const, value: undefined }));
    if (next.done) return true;
    seen += next.value.byteLength;
  }
  await reader.cancel().catch(() => {});
  return false;
}

/**
 * The root middleware's check: a declared Content-Length above the route's limit is refused
 * before anything keeps a byte of the body. (A chunked body declares nothing: the readers
 * below count it.)
 */
export async function declaredSizeRefusal(request: Request): Promise<Response | null> {
  if (request.method === "GET" || request.method === "HEAD") return null;
  const { bytes, why } = bodyLimitFor(new URL(request.url).pathname);
  if (bytes == null) return null;
  const declared = request.headers.get("content-length")?.trim();
  if (!declared || !/^\d+$/.test(declared) || Number(declared) <= bytes) return null;
  const small = Number(declared) <= DRAIN_BYTES;
  if (small && request.body && !request.bodyUsed) await discard(request.body.getReader(), DRAIN_BYTES);
  return tooLarge(request, bytes, why, !small);
}

/**
 * After a route answered without reading the body (a 405, a 404 for a bad id, a refusal), the
 * body is still on the connection: read and throw away what is left (up to DRAIN_BYTES) so the
 * connection can carry the next request, or close it after the answer.
 */
export async function settleBody(request: Request, res: Response): Promise<Response> {
  const body = request.body;
  if (!body || body.locked || request.bodyUsed) return res;
  const ended = await discard(body.getReader(), DRAIN_BYTES);
  if (ended) return res;
  try {
    res.headers.set("Connection", "close");
    return res;
  } catch {
    const copy = new Response(res.body, res);
    copy.headers.set("Connection", "close");
    return copy;
  }
}

/** The body's bytes, counted as they arrive; a 413 is thrown as soon as the route's limit is passed. */
export async function readBytes(request: Request, limit = bodyLimitFor(new URL(request.url).pathname)): Promise<Uint8Array<ArrayBuffer>> {
  const refused = await declaredSizeRefusal(request);
  if (refused) throw refused;
  if (!request.body) return new Uint8Array(0);
  if (request.bodyUsed) throw new Error("readBytes: the request body was already read");
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    let next: ReadableStreamReadResult<Uint8Array>;
    try {
      next = await reader.read();
    } catch {
      throw refusal(request, 400, "invalid input", "The request body could not be read to its end.");
    }
    if (next.done) break;
    total += next.value.byteLength;
    if (limit.bytes != null && total > limit.bytes) {
      const ended = await discard(reader, DRAIN_BYTES);
      throw tooLarge(request, limit.bytes, limit.why, !ended);
    }
    chunks.push(next.value);
  }
  const all = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    all.set(c, at);
    at += c.byteLength;
  }
  return all;
}

/** The body as UTF-8 text (limited as `readBytes`); bytes that are not UTF-8 are refused. */
export async function readText(request: Request): Promise<string> {
  const bytes = await readBytes(request);
  try {
    return new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw isApiRequest(request)
      ? invalidJson([{ path: "", message: "The body is not UTF-8 text." }])
      : refusal(request, 400, "invalid input", "The form is not UTF-8 text.");
  }
}

/**
 * The JSON body (limited as `readBytes`): malformed JSON, or a NUL in any string or key, is a
 * 422 naming where. An empty body reads as `{}`. The Content-Type is not insisted on: what
 * decides is whether the bytes are JSON.
 */
export async function readJson(request: Request): Promise<unknown> {
  const text = await readText(request);
  if (!text.trim()) return {};
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    throw invalidJson([{ path: "", message: "The body is not valid JSON." }]);
  }
  const at = nulPath(body);
  if (at) throw invalidJson([{ path: at.join("."), message: NUL_MESSAGE }]);
  return body;
}

const FORM_TYPES = ["application/x-www-form-urlencoded", "multipart/form-data"];

/**
 * A page's form (limited as `readBytes`): urlencoded or multipart, as a browser sends them.
 * Anything else — no Content-Type with a body, JSON, a multipart body without its boundary or
 * broken — is refused with the reason (415 or 400) instead of failing in the parser. A NUL in
 * a field is left to `parseForm`, which answers it as that field's error.
 */
export async function readForm(request: Request): Promise<FormData> {
  const type = request.headers.get("content-type") ?? "";
  const mediaType = type.split(";")[0].trim().toLowerCase();
  const bytes = await readBytes(request);
  if (!FORM_TYPES.includes(mediaType)) {
    if (bytes.byteLength === 0) return new FormData();
    throw refusal(
      request,
      415,
      "unsupported media type",
      "Send the form as application/x-www-form-urlencoded or multipart/form-data, as a browser does.",
    );
  }
  try {
    return await new Response(bytes, { headers: { "content-type": type } }).formData();
  } catch {
    throw refusal(request, 400, "invalid input", "The form's body is malformed and could not be read.");
  }
}

/**
 * A JSON body that must be an object (a create or a patch): `null`, `true`, `1`, `"str"` and
 * `[]` are a 422, not an empty change that answers 200 and does nothing.
 */
export async function readJsonObject(request: Request): Promise<Record<string, unknown>> {
  const body = await readJson(request);
  if (body === null || typeof body !== "object" || Array.isArray(body))
    throw invalidJson([{ path: "", message: "The body must be a JSON object." }]);
  return body as Record<string, unknown>;
}
