/**
 * The JSON API of the calculators: POST /api/calc/{preload|distortion|clearance} takes the
 * function's input JSON and answers its result (200), 422 with the ZodError's issues (the first
 * one's message as the reason, as every refusal of the API reads), 400 for
 * malformed JSON, 401/403 from the guard, 413 over the route's limit (app/lib/edge-limits.ts).
 */
import { requirePermission } from "~/lib/auth.server";
import { readText } from "~/lib/edge.server";
import { DomainError } from "~/lib/domain-error";
import { domainErrorJson } from "~/lib/domain-error.server";
import { zodIssues } from "./outcome";

const json = (body: unknown, status: number) =>
  new Response(JSON.stringify(body), {
    status,
    headers: { "content-type": "application/json; charset=utf-8", "cache-control": "no-store" },
  });

export async function calcApi(request: Request, compute: (input: never) => unknown): Promise<Response> {
  await requirePermission(request, "calc:use");
  if (request.method !== "POST") return json({ error: "method not allowed", allow: "POST" }, 405);
  // Bytes are counted while the body streams; past the limit this throws the 413 with its reason.
  const text = await readText(request);
  let input: unknown;
  try {
    input = JSON.parse(text);
  } catch {
    return json({ error: "malformed JSON" }, 400);
  }
  try {
    return json(compute(input as never), 200);
  } catch (err) {
    const issues = zodIssues(err);
    if (!issues) throw err;
    return domainErrorJson(new DomainError(issues[0].message, { status: 422, field: issues[0].path, issues }));
  }
}

/** GET on a calculation address: signed in, then 405 naming the method that works. */
export async function calcApiGet(request: Request): Promise<Response> {
  await requirePermission(request, "calc:use");
  return Response.json(
    { error: "method not allowed", reason: "POST the calculator's input as JSON to this address (see the calculation contract)." },
    { status: 405, headers: { Allow: "POST" } },
  );
}
