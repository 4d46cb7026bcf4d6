import type { Config } from "@react-router/dev/config";

export default {
  ssr: true,
  // `npm test` builds into its own folder so it never disturbs a running `npm start`.
  buildDirectory: process.env.BENCHREEL_BUILD_DIR ?? "build",
  // Every route's manifest entry goes to the browser with the first page (one immutable, cached
  // file), instead of React Router's default of matching each page's links against the route
  // table on the server to send a partial manifest: that matching was about 3 % of the read
  // page's server CPU (docs/benchmarks.md), and a shop's app has a few dozen routes.
  routeDiscovery: { mode: "initial" },
  future: {
    v8_middleware: true,
  },
} satisfies Config;
