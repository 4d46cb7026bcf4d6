// The app's HTTP server: Express with React Router's request handler (the "custom server" of
// React Router's framework mode). `npm start` and `npm test` run it as
//
//   node server.js build/server/index.js
//
// It does what `react-router-serve` did (compression, fingerprinted assets cached for a year,
// a request log line), with one difference: page requests never touch the disk. The few
// files of build/client outside assets/ (favicon…) are listed once at start-up, so a request
// for a page goes straight to React Router instead of through two failed file lookups.
import fs from "node:fs";
import path from "node:path";
import url from "node:url";
import { createRequestHandler } from "@react-router/express";
import compression from "compression";
import express from "express";
import morgan from "morgan";

const serverBuild = path.resolve(process.argv[2] ?? "build/server/index.js");
if (!fs.existsSync(serverBuild)) {
  console.error(`[server] no server build at ${serverBuild}; run \`npm run build\` first`);
  process.exit(1);
}
const build = await import(url.pathToFileURL(serverBuild).href);
// build/client sits next to build/server (build.assetsBuildDirectory is relative to where the build ran).
const clientDir = path.join(path.dirname(serverBuild), "..", "client");

const app = express();
app.disable("x-powered-by");
// A response that states a length under 16 kB (the JSON APIs the header search calls as one
// types) goes uncompressed: on the shop's network, gzip and gunzip of a few kilobytes cost
// more time than the bytes they save. Pages (streamed) and larger bodies are compressed.
const SMALL = 16 * 1024;
app.use(compression({ filter: (req, res) => !(Number(res.getHeader("Content-Length")) < SMALL) && compression.filter(req, res) }));
app.use(`${build.publicPath}assets`, express.static(path.join(clientDir, "assets"), { immutable: true, maxAge: "1y", fallthrough: false }));

const topLevelFiles = new Set(
  fs
    .readdirSync(clientDir, { recursive: true, withFileTypes: true })
    .filter((d) => d.isFile())
    .map((d) => path.relative(clientDir, path.join(d.parentPath ?? d.path, d.name)).split(path.sep).join("/"))
    .filter((rel) => !rel.startsWith("assets/"))
    .map((rel) => `${build.publicPath}${rel}`),
);
const topLevel = express.static(clientDir, { maxAge: "1h", index: false });
app.use((req, res, next) => (topLevelFiles.has(req.path) ? topLevel(req, res, next) : next()));

app.use(morgan("tiny"));
// React Router hands route middleware the URL with a data request's ".data" taken off; the
// read-page cache (app/lib/page-cache.server.ts) must tell a page from its data, so the URL as
// requested travels in a header of ours, always overwritten here (a client cannot set it).
app.use((req, _res, next) => {
  req.headers["x-benchreel-request-url"] = req.originalUrl;
  next();
});
app.use(createRequestHandler({ build, mode: process.env.NODE_ENV ?? "production" }));

const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST ?? "127.0.0.1";
const server = app.listen(port, host, () => console.log(`[server] http://${host}:${port}`));

function stop() {
  server.close(() => process.exit(0));
  server.closeIdleConnections?.();
  setTimeout(() => process.exit(0), 3000).unref();
}
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
