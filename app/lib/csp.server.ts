/**
 * Content-Security-Policy for pages, with a fresh nonce per response.
 *
 * Every response gets the static policy of security-headers.json (server.js and the security
 * middleware send it); an HTML page rendered by app/entry.server.tsx gets this page policy
 * instead, whose nonce is on every inline script React and React Router write (the route data,
 * the hydration bootstrap, scroll restoration, streamed Suspense chunks). A script injected
 * into a page cannot know the nonce, so the browser refuses it.
 *
 * The entry makes one nonce per rendered page; every response is rendered, so no two share one.
 */
import { randomBytes } from "node:crypto";

export function newNonce(): string {
  return randomBytes(16).toString("base64");
}

/**
 * The page policy. Scripts: our own files and the nonced inline ones; no eval (and no need for
 * 'strict-dynamic': every script is one of our built files, and nothing else this origin serves
 * can run as one: uploads and API answers go out with their own types and nosniff). Styles: our own
 * stylesheets and nonced <style> elements (TipTap's base styles get the nonce; video.js is told
 * not to write its own, see root.tsx). Style *attributes* stay allowed: React renders a
 * `style` prop into the server HTML as an attribute (the progress bars), which no nonce can
 * cover; an attribute cannot match selectors, and images and fonts come only from this origin,
 * so injected CSS has nothing to read and nowhere to send it. Fonts include data: because
 * video.js's icon font and the smallest font subsets are inlined into the built CSS. Posters,
 * media and API calls are all same-origin; nothing is framed, posted elsewhere or embedded.
 */
export function pagePolicy(nonce: string): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'`,
    `style-src 'self' 'nonce-${nonce}'`,
    "style-src-attr 'unsafe-inline'",
    "img-src 'self'",
    "media-src 'self'",
    "font-src 'self' data:",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}
