/**
 * The JSON API of the calculators: POST /api/calc/{preload|distortion|clearance} takes the
 * function's input JSON and answers its result (200), 422 with the ZodError's issues, 400 for
 * malformed JSON, 401/403 from the guard, 413 over 256 kB.
 */
import { requirePermission } from "~/lib/auth.server";
import { zodIssues } from "./outcome";

export const MAX_BODY_BYTES = 256 * 1024;

class TooLarge extends Error {}
const DRAIN_BYTES = 8 * 1024 * 1024;

/** Reads the body as text, counting bytes as they arrive; throws TooLarge past the limit. */
async function readLimited(request: Request, limit: number): Promise<string> {
  const declared = request.headers.get("content-length");
  if (declared !== null && /^\d+$/.test(declared.trim()) && Number(declared) > limit) throw new TooLarge();
  if (!request.body) return "";
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      // Read on (and throw away) a while so the client gets the 413 rather than a reset
      // connection; give up past DRAIN_BYTES.
      let drained = total;
      while (drained < DRAIN_BYTES) {
        const next = await reader.read().catch(() => ({ done: true as const, value: undefined }));
        if (next.done) break;
        drained += next.value.byteLength;
      }
      await reader.cancel().catch(() => {});
      throw new TooLarge();
    }
    chunks.push(value);
  }
  const all = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    all.set(c, at);
    at += c.byteLength;
  }
  return new TextDecoder("utf-8", { fatal: false }).decode(all);
}

const json = (body: unknown, status: number) =>
  new Response(JSON.stringify(body), { status, headers: { "content-type": "application/json; charset=utf-8", "cache-control": "no-store" } });

export async function calcApi(request: Request, compute: (input: never) => unknown): Promise<Response> {
  await requirePermission(request, "calc:use");
  if (request.method !== "POST") return json({ error: "method not allowed", allow: "POST" }, 405);
  let text: string;
  try {
    text = await readLimited(request, MAX_BODY_BYTES);
  } catch (err) {
    if (err instanceof TooLarge) {
      // The rest of the body was not read: close the connection so that the client does not
      // reuse it for its next request (which would then meet a reset).
      const res = json({ error: "request body too large", limitBytes: MAX_BODY_BYTES }, 413);
      res.headers.set("connection", "close");
      return res;
    }
    return json({ error: "could not read the request body" }, 400);
  }
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
    return json({ error: "invalid input", issues }, 422);
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
