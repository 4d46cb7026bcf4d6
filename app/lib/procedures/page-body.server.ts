/**
 * A procedure's body travels to the browser once.
 *
 * The read page's body is server-rendered HTML (app/components/procedures/render.server.ts). On a
 * page request that HTML is in the page; if it were also in the loader data, React Router would
 * embed it a second time in the page's inline scripts (escaped twice over), which measured half
 * of the read page's bytes (docs/benchmarks.md). So on a page request the loader hands the body
 * to the render through the request's router context, and the browser hydrates the body from the
 * page itself; a client-side navigation (React Router's `.data` request) gets it in the data.
 *
 * `server.js` says which kind of request it is (PAGE_REQUEST_HEADER, always overwritten there);
 * where that header is missing (e.g. the Vite dev server) the body goes in the data too.
 */
import { createContext, type RouterContextProvider } from "react-router";

export const PAGE_REQUEST_HEADER = "x-benchreel-page";

/** The body HTML of this page request, for the render (app/entry.server.tsx). */
export const pageBodyContext = createContext<string | null>(null);

/** The body HTML for the loader data: null on a page request, whose render takes it from the context. */
export function bodyForLoaderData(request: Request, context: Readonly<RouterContextProvider>, html: string): string | null {
  if (request.headers.get(PAGE_REQUEST_HEADER) !== "1") return html;
  context.set(pageBodyContext, html);
  return null;
}
