import type { KnipConfig } from "knip";

/**
 * Dead files, exports and dependencies (`npm run lint`, a phase of `npm test`). The react-router,
 * vite, vitest and playwright plugins find app/routes.ts, app/root.tsx, the entries and the tests
 * by themselves; what scripts/start.mjs and scripts/test.mjs start as processes is listed here.
 */
const config: KnipConfig = {
  entry: [
    "scripts/worker.ts",
    "scripts/migrate.ts",
    "scripts/seed.ts",
    "scripts/reindex.{mjs,ts}",
    "scripts/bench/run.ts",
    "scripts/fakes/*/server.ts",
    // The calculation module's public face, as docs/calculations.md describes it.
    "app/lib/calc/index.ts",
  ],
  project: ["**/*.{ts,tsx,js,mjs,css}"],
  playwright: { config: "tests/playwright.config.ts" },
  // An export that its own module uses is not dead code.
  ignoreExportsUsedInFile: true,
  // Debian's tools, called by the scripts that start PostgreSQL and measure processes.
  // pdftotext, pdfinfo and pdffonts: Debian's poppler-utils, with which the builds test reads the build sheet PDF.
  // pdfimages: the same package, with which the runs test finds the photo inside that PDF.
  ignoreBinaries: ["runuser", "ss", "pdftotext", "pdfinfo", "pdfimages", "pdffonts"],
  // React Router generates the route modules' `./+types/…` at typecheck, which runs after this phase: a fresh clone has none yet.
  ignoreUnresolved: [/\+types\//],
  compilers: {
    // Packages that app.css pulls in (Tailwind, the fonts) count as used.
    css: (text: string) => [...text.matchAll(/@import\s+["']([^"']+)["']/g)].map(([, spec]) => `import "${spec}";`).join("\n"),
  },
};

export default config;
