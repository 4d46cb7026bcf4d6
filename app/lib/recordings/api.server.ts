import type { z } from "zod";
import { data } from "react-router";

/** 422 with the issues by path, as DEVELOPERS.md asks of every API. */
export function invalid(error: z.ZodError): Response {
  return Response.json(
    { error: "invalid input", issues: error.issues.map((i) => ({ path: i.path.join("."), message: i.message })) },
    { status: 422 },
  );
}

export function notFound(request: Request, what = "recording"): never {
  if (new URL(request.url).pathname.startsWith("/api/")) throw Response.json({ error: "not found", reason: `No such ${what}.` }, { status: 404 });
  throw data({ message: `There is no such ${what}.` }, { status: 404 });
}

export function methodNotAllowed(allow: string): Response {
  return Response.json({ error: "method not allowed" }, { status: 405, headers: { Allow: allow } });
}
