import type { RequestLike } from "./auth.server";
import { CLIENT_HEADER, pickClientAddress } from "./client-address";
import { env } from "./env.server";

/** The client address of a request, as the throttles key it (app/lib/client-address.ts). */
export function clientAddress(request: RequestLike): string {
  return pickClientAddress(request.headers.get(CLIENT_HEADER), request.headers.get("x-forwarded-for"), env().TRUST_PROXY);
}
