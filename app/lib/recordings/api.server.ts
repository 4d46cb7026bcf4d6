import type { z } from "zod";
import { data } from "react-router";

/** 422 with the issues by path, as DEVELOPERS.md asks of every API. */
export function invalid(error: z.ZodError): Response {
  return Response.json(
    { error: "invalid input", issues: error.issues.map((i) => ({ path: i.path.join("."), message: i.message })) },
    { status: 422 },
  );
}

export async function readJson(request: Request): Promise<{ ok: true; body: unknown } | { ok: false; res: Response }> {
  try {
    const text = await request.text();
    if (text.length > 1_000_000) return { ok: false, res: Response.json({ error: "too large" }, { status: 413 }) };
    return { ok: true, body: text ? JSON.parse(text) : {} };
  } catch {
    return { ok: false, res: Response.json({ error: "invalid input", issues: [{ path: "", message: "The body is not valid JSON." }] }, { status: 422 }) };
  }
}

export function notFound(request: Request, what = "recording"): never {
  if (new URL(request.url).pathname.startsWith("/api/")) throw Response.json({ error: "not found", reason: `No such ${what}.` }, { status: 404 });
  throw data({ message: `There is no such ${what}.` }, { status: 404 });
}

export function methodNotAllowed(allow: string): Response {
  return Response.json({ error: "method not allowed" }, { status: 405, headers: { Allow: allow } });
}
