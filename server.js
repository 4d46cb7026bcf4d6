// The app's HTTP server: React Router's "custom server" (as in its node-custom-server template)
// on Node's own http server, with @remix-run/node-fetch-server turning Node's request into the
// fetch Request React Router takes (request bodies with backpressure, for the resumable uploads).
// `npm start` and `npm test` run it as
//
//   node server.js build/server/index.js
//
// For every request, in order: the security headers of app/lib/security-headers.json (a React
// Router response may override them), compression, the static files of build/client
// (fingerprinted assets cached for a year, a missing one a plain 404, never a page), a request
// log line, and React Router.
import fs from "node:fs";
import http from "node:http";
import path from "node:path";
import url from "node:url";
import { createRequestListener } from "@remix-run/node-fetch-server";
import compression from "compression";
import morgan from "morgan";
import { createRequestHandler } from "react-router";
import serveStatic from "serve-static";

const serverBuild = path.resolve(process.argv[2] ?? "build/server/index.js");
if (!fs.existsSync(serverBuild)) {
  console.error(`[server] no server build at ${serverBuild}; run \`npm run build\` first`);
  process.exit(1);
}
const build = await import(url.pathToFileURL(serverBuild).href);
// build/client sits next to build/server (build.assetsBuildDirectory is relative to where the build ran).
const clientDir = path.join(path.dirname(serverBuild), "..", "client");
const here = path.dirname(url.fileURLToPath(import.meta.url));
const securityHeaders = Object.entries(JSON.parse(fs.readFileSync(path.join(here, "app/lib/security-headers.json"), "utf8")));

const compress = compression();
const log = morgan("tiny");
const assetsPrefix = `${build.publicPath}assets/`;
const assets = serveStatic(path.join(clientDir, "assets"), { immutable: true, maxAge: "1y", index: false, fallthrough: false });
const otherFiles = serveStatic(clientDir, { maxAge: "1h", index: false, redirect: false });
const handleRequest = createRequestHandler(build, process.env.NODE_ENV ?? "production");
const toReactRouter = createRequestListener((request) => handleRequest(request));

/** A static file's refusal in plain text: missing (404), outside the folder (403), not GET or HEAD (405). */
function staticError(res, err) {
  if (res.headersSent) return res.destroy(err);
  res.statusCode = err.statusCode ?? err.status ?? 500;
  res.setHeader("Content-Type", "text/plain; charset=utf-8");
  res.end(res.statusCode === 404 ? "Not found" : (http.STATUS_CODES[res.statusCode] ?? "Error"));
}

function handle(req, res) {
  for (const [name, value] of securityHeaders) res.setHeader(name, value);
  compress(req, res, () => {
    if (req.url.startsWith(assetsPrefix)) {
      // serve-static resolves against the folder it was given: hand it the path below assets/.
      req.url = req.url.slice(assetsPrefix.length - 1);
      return assets(req, res, (err) => staticError(res, err));
    }
    // Only a name with an extension can be a file of build/client (favicon.svg); a page's URL
    // skips the look on disk that would find nothing.
    const toApp = () =>
      log(req, res, () => {
        // The socket's peer, for the sign-in throttles (app/lib/client-address.server.ts); always
        // overwritten here, so a client cannot set it.
        req.headers["x-benchreel-client"] = req.socket.remoteAddress ?? "";
        // A page, or a client-side navigation's data (React Router's `.data` URLs)? The read page
        // leaves a procedure's body out of the data it embeds in a page, which shows it already
        // (app/lib/procedures/page-body.server.ts). Always overwritten too.
        req.headers["x-benchreel-page"] = /\.data(?:\?|$)/.test(req.url) ? "0" : "1";
        toReactRouter(req, res);
      });
    if (/\.[^/]*$/.test(req.url.split("?")[0])) otherFiles(req, res, toApp);
    else toApp();
  });
}

const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST ?? "127.0.0.1";
const server = http.createServer(handle);
server.listen(port, host, () => console.log(`[server] http://${host}:${port}`));

function stop() {
  server.close(() => process.exit(0));
  server.closeIdleConnections?.();
  setTimeout(() => process.exit(0), 3000).unref();
}
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
