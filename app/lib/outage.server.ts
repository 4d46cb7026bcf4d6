import { databaseUnavailable } from "./auth.server";
import { isDatabaseDown } from "./db.server";
import { requestStore } from "./request-store.server";

// A loader or action that could not reach PostgreSQL throws the driver's error, which React
// Router answers with a bare 500. The session check answers 503 "database unavailable" itself,
// but public routes (sign-in, reset, invitations, sign-out) and work after the session check
// reach the database first elsewhere. React Router hands every such error to the server
// entry's handleError, which notes it here for the request; the root middleware then answers
// the request with the same 503 page (or JSON under /api) as the session check does.

const DOWN = "database-down";

/** Called from app/entry.server.tsx's handleError for each error a request's code threw. */
export function noteServerError(error: unknown): void {
  if (isDatabaseDown(error)) requestStore.getStore()?.set(DOWN, true);
}

/** Root middleware (inside the request store of the security middleware). */
export async function databaseOutageMiddleware({ request }: { request: Request }, next: () => Promise<Response>): Promise<Response> {
  const res = await next();
  if (res.status === 500 && requestStore.getStore()?.get(DOWN)) {
    await res.body?.cancel();
    throw databaseUnavailable(request);
  }
  return res;
}
