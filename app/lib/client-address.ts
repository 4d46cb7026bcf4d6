/**
 * Which address a request came from, for the throttles. server.js writes the socket's peer
 * address into CLIENT_HEADER on every request (overwriting whatever the client sent). Behind
 * reverse proxies the socket is the nearest proxy's: with TRUST_PROXY=n (the number of proxies
 * in front of the app, each appending to X-Forwarded-For) the client is the address n hops
 * back along that chain. Without TRUST_PROXY the header is never read, since anyone can write it.
 */
export const CLIENT_HEADER = "x-benchreel-client";

/** The client in a chain of addresses: the socket's peer, then `hops` proxies back along X-Forwarded-For. */
export function pickClientAddress(socketAddress: string | null, forwardedFor: string | null, trustedHops: number): string {
  const chain = [...(trustedHops > 0 && forwardedFor ? forwardedFor.split(",") : []), socketAddress ?? ""]
    .map((a) => a.trim())
    .filter(Boolean);
  const picked = chain[Math.max(0, chain.length - 1 - trustedHops)];
  return picked ? normalizeAddress(picked) : "unknown";
}

/** An IPv4 address seen through an IPv6 socket (`::ffff:10.0.0.7`) is the same client as `10.0.0.7`. */
function normalizeAddress(address: string): string {
  const a = address.toLowerCase();
  return a.startsWith("::ffff:") && a.includes(".") ? a.slice(7) : a;
}
