/// <reference types="vitest/config" />
import path from "node:path";
import { reactRouter } from "@react-router/dev/vite";
import tailwindcss from "@tailwindcss/vite";
import { defineConfig } from "vite";

const isVitest = Boolean(process.env.VITEST);

export default defineConfig({
  plugins: [tailwindcss(), !isVitest && reactRouter()],
  resolve: {
    alias: { "~": path.resolve(import.meta.dirname, "app") },
  },
  server: { host: "127.0.0.1" },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: "unit",
          include: ["app/**/*.test.{ts,tsx}", "scripts/**/*.test.ts"],
          environment: "node",
        },
      },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          // One worker: the suites share the running app and its database.
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
    ],
  },
});
