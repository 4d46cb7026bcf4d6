// The app's HTTP server: Node's own http server with React Router's request handler (the
// "custom server" of React Router's framework mode). `npm start` and `npm test` run it as
//
//   node server.js build/server/index.js
//
// What it does around React Router, in order, for every request:
//   1. the security headers of app/lib/security-headers.json (static files and 404s included;
//      a React Router response may override them);
//   2. compression, for responses that do not state a length under 16 kB;
//   3. fingerprinted assets from build/client/assets, cached for a year (a missing one is a
//      404, never a page); the few other files of build/client (favicon…), listed once here,
//      so a page request never touches the disk;
//   4. a request log line;
//   5. GET /api/search, which the header box calls on every pause in typing, answered without
//      React Router's request handling by the function app/entry.server.tsx lists for it: the
//      fetch objects and the router cost about 1 ms a call, a third of the search itself
//      (docs/decisions/008). It is the function the route's loader calls too, which answers
//      HEAD and `react-router dev`;
//   6. everything else to React Router, through @remix-run/node-fetch-server (Node request in,
//      fetch Request to React Router, its Response back out, request bodies with
//      backpressure for the resumable uploads).
// There is no Express: its router and request wrapping cost about 0.3 ms per request on the
// development machine, a tenth of what the header search box waits for (docs/benchmarks.md).
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

// A response that states a length under 16 kB (the JSON APIs the header search calls as one
// types) goes uncompressed: on the shop's network, gzip and gunzip of a few kilobytes cost
// more time than the bytes they save. Pages (streamed) and larger bodies are compressed.
const SMALL = 16 * 1024;
const compress = compression({ filter: (req, res) => !(Number(res.getHeader("Content-Length")) < SMALL) && compression.filter(req, res) });
const log = morgan("tiny");

const assetsPrefix = `${build.publicPath}assets/`;
const assets = serveStatic(path.join(clientDir, "assets"), { immutable: true, maxAge: "1y", index: false, fallthrough: false });
const topLevelFiles = new Set(
  fs
    .readdirSync(clientDir, { recursive: true, withFileTypes: true })
    .filter((d) => d.isFile())
    .map((d) => path.relative(clientDir, path.join(d.parentPath ?? d.path, d.name)).split(path.sep).join("/"))
    .filter((rel) => !rel.startsWith("assets/"))
    .map((rel) => `${build.publicPath}${rel}`),
);
const topLevel = serveStatic(clientDir, { maxAge: "1h", index: false });

const handleRequest = createRequestHandler(build, process.env.NODE_ENV ?? "production");

// The GET paths answered without React Router (5. above), from app/entry.server.tsx.
const direct = new Map(Object.entries(build.entry.module.directAnswers ?? {}));
if (!direct.has("/api/search")) throw new Error("[server] the build exports no direct answer for /api/search");

/** What the session checks read of a request (app/lib/auth.server.ts RequestLike), from Node's. */
function requestLike(req) {
  const url = `http://${req.headers.host ?? "localhost"}${req.url}`;
  return { url, headers: { get: (name) => { const v = req.headers[name.toLowerCase()]; return v === undefined ? null : Array.isArray(v) ? v.join(", ") : v; } } };
}

async function answerDirectly(answer, req, res) {
  try {
    const { status, headers, body } = await answer(requestLike(req));
    res.writeHead(status, headers);
    res.end(body);
  } catch (err) {
    console.error("[server]", req.method, req.url, err);
    if (res.headersSent) return res.destroy();
    const body = JSON.stringify({ error: "internal error", reason: "The server failed on this request; the server log has the details." });
    res.writeHead(500, { "Content-Type": "application/json", "Content-Length": Buffer.byteLength(body), "Cache-Control": "no-store" });
    res.end(body);
  }
}

const toReactRouter = createRequestListener((request) => handleRequest(request));

/**
 * A static file's error in plain text: missing (404), outside the folder (403), a method other
 * than GET or HEAD (405). A read that fails after the headers went out ends the connection.
 */
function staticError(res, err) {
  if (res.headersSent) return res.destroy(err instanceof Error ? err : undefined);
  res.statusCode = err?.statusCode ?? err?.status ?? 500;
  res.setHeader("Content-Type", "text/plain; charset=utf-8");
  res.end(res.statusCode === 404 ? "Not found" : (http.STATUS_CODES[res.statusCode] ?? "Error"));
}

function handle(req, res) {
  for (const [name, value] of securityHeaders) res.setHeader(name, value);
  compress(req, res, () => {
    const pathname = (req.url ?? "/").split("?")[0];
    if (pathname.startsWith(assetsPrefix)) {
      // serve-static resolves against the folder it was given: hand it the path below assets/.
      req.url = req.url.slice(assetsPrefix.length - 1);
      return assets(req, res, (err) => staticError(res, err));
    }
    if (topLevelFiles.has(pathname) && (req.method === "GET" || req.method === "HEAD")) {
      return topLevel(req, res, (err) => staticError(res, err ?? { statusCode: 404 }));
    }
    log(req, res, () => {
      const answer = req.method === "GET" ? direct.get(pathname) : undefined;
      if (answer) return answerDirectly(answer, req, res);
      // React Router hands route middleware the URL with a data request's ".data" taken off; the
      // read-page cache (app/lib/page-cache.server.ts) must tell a page from its data, so the URL
      // as requested travels in a header of ours, always overwritten here (a client cannot set it).
      req.headers["x-benchreel-request-url"] = req.url;
      // The socket's peer, for the sign-in throttles (app/lib/client-address.ts); overwritten
      // here for the same reason.
      req.headers["x-benchreel-client"] = req.socket.remoteAddress ?? "";
      toReactRouter(req, res);
    });
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
