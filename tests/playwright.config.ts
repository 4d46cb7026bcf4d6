import path from "node:path";
import { defineConfig } from "@playwright/test";

// Each `npm test` run writes its traces and failure screenshots to a folder of its own
// (test-results/<run id>), so two runs at once never delete each other's files.
const runId = process.env.BENCHREEL_RUN_DIR ? path.basename(path.dirname(process.env.BENCHREEL_RUN_DIR)) : "manual";

// Run through `npm test`, which starts the app and sets BASE_URL. Debian's chromium only.
export default defineConfig({
  testDir: "./e2e",
  workers: 1,
  retries: process.env.CI ? 1 : 0,
  timeout: 60_000,
  expect: { timeout: 10_000 },
  // `npm test` also asks for a JSON report, from which it names the failed tests at the end of its output.
  reporter: process.env.BENCHREEL_JSON_REPORT ? [["list"], ["json", { outputFile: process.env.BENCHREEL_JSON_REPORT }]] : [["list"]],
  outputDir: `../test-results/${runId}`,
  use: {
    baseURL: process.env.BENCHREEL_URL,
    trace: "retain-on-failure",
    screenshot: "only-on-failure",
    launchOptions: {
      executablePath: "/usr/bin/chromium",
      args: [
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
      ],
    },
  },
  projects: [{ name: "chromium", use: { browserName: "chromium", viewport: { width: 1280, height: 860 } } }],
});
