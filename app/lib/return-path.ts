/**
 * The path a page may send someone back to after signing in (`?next=`), or "/" when the value
 * would leave the app. The decision is the URL parser's, as the browser will make it: the
 * value is resolved against the app's own origin and kept only when the result is still on
 * that origin. String checks miss what the parser does: a backslash is a slash
 * (`/\evil.example`), tabs and newlines are dropped (`/%09/evil.example`), and dot segments
 * collapse (`/.//evil.example` has the path `//evil.example`, which a browser reads as a host).
 */
export function safeReturnPath(next: unknown, ownOrigin: string): string {
  if (typeof next !== "string" || next === "") return "/";
  let url: URL;
  try {
    url = new URL(next, ownOrigin);
  } catch {
    return "/";
  }
  if (url.origin !== ownOrigin) return "/";
  const path = url.pathname + url.search + url.hash;
  // The answer becomes a Location header: it must resolve to the same origin once more.
  return new URL(path, ownOrigin).origin === ownOrigin ? path : "/";
}
