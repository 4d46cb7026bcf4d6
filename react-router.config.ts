import type { Config } from "@react-router/dev/config";

export default {
  ssr: true,
  // `npm test` builds into its own folder so it never disturbs a running `npm start`.
  buildDirectory: process.env.BENCHREEL_BUILD_DIR ?? "build",
  future: {
    v8_middleware: true,
  },
} satisfies Config;
