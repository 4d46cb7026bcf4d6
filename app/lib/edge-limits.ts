/**
 * How many bytes of request body each route takes. The root middleware refuses a declared
 * Content-Length above the limit before anything reads the body, and the body readers of
 * `edge.server.ts` count bytes while the body streams (a chunked body declares nothing), so
 * nobody can make the server buffer more than this. Both answer 413 with the reason.
 * The first row whose pattern matches the path wins; DEVELOPERS.md lists the same table.
 */
const KB = 1024;
const MB = 1024 * KB;

export type BodyLimit = { pattern: RegExp; bytes: number | null; why: string };

export const BODY_LIMITS: BodyLimit[] = [
  // tus has its own limit per upload (MAX_UPLOAD_BYTES) and streams to disk, never buffers.
  { pattern: /^\/api\/uploads(\/|$)/, bytes: null, why: "resumable uploads: tus's own per-upload limit" },
  { pattern: /^\/(signin|signout|reset|invite)(\/|$)/, bytes: 8 * KB, why: "public forms: an address, a password, a name" },
  { pattern: /^\/admin\/people$/, bytes: 8 * KB, why: "invitations and role changes" },
  { pattern: /^\/account$/, bytes: 8 * KB, why: "name and password" },
  { pattern: /^\/api\/procedures\/revisions\//, bytes: 8 * MB, why: "the editor's save: a whole procedure document" },
  { pattern: /^\/api\/recordings\//, bytes: 1 * MB, why: "marks and readings: up to 500 readings at once" },
  { pattern: /^\/api\/calc\//, bytes: 256 * KB, why: "a calculator's input, bench points included" },
  { pattern: /^\/test-records\//, bytes: 1 * MB, why: "a test record with many readings and notes" },
  { pattern: /^\/api\/runs\/[^/]+\/photos$/, bytes: 13 * MB, why: "a photo from the tablet's camera (up to 12 MB) with its form" },
];

/** Every other route: page forms of a few fields. */
export const DEFAULT_BODY_LIMIT = { bytes: 64 * KB, why: "a page's form" };

/** The request path as the route sees it: React Router's data requests end in `.data`. */
export function routePath(pathname: string): string {
  if (pathname === "/_root.data") return "/";
  return pathname.replace(/\.data$/, "");
}

/** The body limit of a path in bytes; null when the route applies its own (tus). */
export function bodyLimitFor(pathname: string): { bytes: number | null; why: string } {
  const p = routePath(pathname);
  return BODY_LIMITS.find((l) => l.pattern.test(p)) ?? DEFAULT_BODY_LIMIT;
}
