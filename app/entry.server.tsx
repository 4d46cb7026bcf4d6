import type { EntryContext, RouterContextProvider } from "react-router";
import { createReadableStreamFromReadable } from "@react-router/node";
import { isRouteErrorResponse, ServerRouter, type HandleErrorFunction } from "react-router";
import { isbot } from "isbot";
import type { RenderToPipeableStreamOptions } from "react-dom/server";
import { renderToPipeableStream } from "react-dom/server";
import { newNonce, pagePolicy } from "./lib/csp.server";
import { noteServerError } from "./lib/outage.server";
import { env } from "./lib/env.server";
import { pageStream } from "./lib/page-stream.server";
import { pageBodyContext } from "./lib/procedures/page-body.server";
import { PageBodyHtml } from "./components/procedures/ProcedureBody";

// The environment is checked as the server loads, so a bad value stops the start with its name
// instead of failing the first request that reads it.
env();

// React Router's own server entry (from `react-router reveal entry.server`), with the page's
// Content-Security-Policy nonce, the database-outage note, a procedure body handed apart from
// the loader data (app/lib/procedures/page-body.server.ts) and React's output sent in whole
// pieces rather than 2 kB ones (app/lib/page-stream.server.ts) added.

// Every error a loader, action or render threw, as React Router's default logs it; an error
// that means PostgreSQL is not answering is also noted, so that the request is answered with
// the "database unavailable" 503 instead of a bare 500 (app/lib/outage.server.ts).
export const handleError: HandleErrorFunction = (error, { request }) => {
  noteServerError(error);
  // React Router's own logging: an error response it made from an error shows that error.
  const inner = isRouteErrorResponse(error) ? (error as { error?: unknown }).error : undefined;
  if (!request.signal.aborted) console.error(inner ?? error);
};

export const streamTimeout = 5_000;

export default function handleRequest(
  request: Request,
  responseStatusCode: number,
  responseHeaders: Headers,
  routerContext: EntryContext,
  loadContext: RouterContextProvider,
) {
  // The page's Content-Security-Policy allows the inline scripts that carry this response's
  // nonce (app/lib/csp.server.ts); React Router writes it on its scripts and React on the
  // chunks it streams.
  const nonce = newNonce();
  responseHeaders.set("Content-Security-Policy", pagePolicy(nonce));

  // https://httpwg.org/specs/rfc9110.html#HEAD
  if (request.method.toUpperCase() === "HEAD") {
    return new Response(null, {
      status: responseStatusCode,
      headers: responseHeaders,
    });
  }

  return new Promise((resolve, reject) => {
    let shellRendered = false;
    const userAgent = request.headers.get("user-agent");

    // Ensure requests from bots and SPA Mode renders wait for all content to load before responding
    // https://react.dev/reference/react-dom/server/renderToPipeableStream#waiting-for-all-content-to-load-for-crawlers-and-static-generation
    const readyOption: keyof RenderToPipeableStreamOptions =
      (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? "onAllReady" : "onShellReady";

    // Abort the rendering stream after the `streamTimeout` so it has time to
    // flush down the rejected boundaries
    let timeoutId: ReturnType<typeof setTimeout> | undefined = setTimeout(() => abort(), streamTimeout + 1000);

    // A procedure body the read page's loader left out of its data, to be written once, in the page.
    const app = (
      <PageBodyHtml value={loadContext.get(pageBodyContext)}>
        <ServerRouter context={routerContext} url={request.url} nonce={nonce} />
      </PageBodyHtml>
    );
    const { pipe, abort } = renderToPipeableStream(app, {
      nonce: { script: nonce, style: nonce },
      [readyOption]() {
        shellRendered = true;
        // React's pieces written in one turn travel together (app/lib/page-stream.server.ts).
        const body = pageStream(() => {
          // Clear the timeout to prevent retaining the closure and memory leak
          clearTimeout(timeoutId);
          timeoutId = undefined;
        });
        const stream = createReadableStreamFromReadable(body);

        responseHeaders.set("Content-Type", "text/html");

        pipe(body);

        resolve(
          new Response(stream, {
            headers: responseHeaders,
            status: responseStatusCode,
          }),
        );
      },
      onShellError(error: unknown) {
        reject(error);
      },
      onError(error: unknown) {
        responseStatusCode = 500;
        // Log streaming rendering errors from inside the shell.  Don't log
        // errors encountered during initial shell rendering since they'll
        // reject and get logged in handleDocumentRequest.
        if (shellRendered) {
          console.error(error);
        }
      },
    });
  });
}
