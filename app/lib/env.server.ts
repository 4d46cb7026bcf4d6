import { z } from "zod";
import { storeConfigFrom } from "./storage/config";

/**
 * A period in milliseconds. Capped at setTimeout's limit: a longer delay would wrap around to
 * 1 ms and run the task without pause.
 */
const millis = (fallback: number) =>
  z.coerce
    .number({ error: "must be a whole number of milliseconds" })
    .int("must be a whole number of milliseconds")
    .positive("must be more than 0 ms")
    .max(2 ** 31 - 1, "must be at most 2147483647 ms (about 24 days)")
    .default(fallback);

/**
 * Every environment variable the server and the worker read, validated once at start (the
 * server's entry and the worker call `env()` before anything else). `npm start` and `npm test`
 * set local values; production sets them explicitly. See the README's table.
 */
export const envSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  PORT: z.coerce.number({ error: "must be a port number" }).int().min(0).max(65535).default(3000),
  HOST: z.string().min(1).default("127.0.0.1"),
  DATABASE_URL: z
    .string()
    .url()
    .refine((v) => v.startsWith("postgres://") || v.startsWith("postgresql://"), "must be a postgres:// URL"),
  SESSION_SECRET: z.string().min(16, "must be at least 16 characters"),
  PUBLIC_URL: z.string().url(),
  SMTP_URL: z
    .string()
    .url()
    .refine((v) => v.startsWith("smtp://") || v.startsWith("smtps://"), "must be an smtp:// or smtps:// URL"),
  MAIL_FROM: z.string().min(3).default("Benchreel <benchreel@larkspur.example>"),
  /** Set by the start/test scripts when SMTP_URL points at the local fake; shows the Outbox page. */
  MAIL_FAKE_DIR: z.string().optional(),
  /** The worker's mail outbox: first retry after this, doubling per attempt. */
  MAIL_RETRY_BASE_MS: millis(5000),
  MAIL_POLL_MS: millis(1000),
  MEILI_HOST: z.string().url().optional(),
  MEILI_API_KEY: z.string().optional(),
  /** Meilisearch's rule for an index uid: letters, digits, - and _. */
  SEARCH_INDEX: z
    .string()
    .regex(/^[A-Za-z0-9_-]{1,400}$/, "must be letters, digits, - and _ only")
    .default("benchreel"),
  SEARCH_POLL_MS: millis(500),
  SEARCH_RETRY_BASE_MS: millis(2000),
  SEARCH_CHECK_MS: millis(60_000),
  UPLOAD_DIR: z.string().default("uploads"),
  MAX_UPLOAD_BYTES: z.coerce
    .number()
    .int()
    .positive()
    .default(20 * 1024 ** 3),
  /**
   * An unfinished upload with no new bytes for this many days is discarded, its bytes swept by
   * the worker (app/lib/recordings/tus.server.ts); a fraction is allowed (tests, a tight disk).
   */
  UPLOAD_EXPIRY_DAYS: z.coerce
    .number({ error: "must be a number of days" })
    .positive("must be more than 0 days")
    .max(365, "must be at most 365 days")
    .default(14),
  FFPROBE_PATH: z.string().min(1).default("/usr/bin/ffprobe"),
  FFMPEG_PATH: z.string().min(1).default("/usr/bin/ffmpeg"),
  /**
   * Where recordings live (docs/deploying.md): unset keeps them under UPLOAD_DIR; an s3:// (or
   * s3+http://) URL, or S3_BUCKET with the S3 variables, puts them in an S3-compatible store
   * (app/lib/storage/config.ts, checked in `parseEnv`).
   */
  STORAGE_URL: z.string().optional(),
  S3_BUCKET: z.string().optional(),
  S3_ENDPOINT: z.string().optional(),
  AWS_ACCESS_KEY_ID: z.string().optional(),
  AWS_SECRET_ACCESS_KEY: z.string().optional(),
  AWS_REGION: z.string().optional(),
  /** How many reverse proxies stand in front of the app; 0 means X-Forwarded-For is never read (app/lib/client-address.ts). */
  TRUST_PROXY: z.coerce.number().int().min(0).max(10).default(0),
});

/** The store's settings hang together (a bucket name, keys), which one field cannot say. */
const checkedSchema = envSchema.superRefine((v, ctx) => {
  const store = storeConfigFrom(v);
  if (typeof store === "string") ctx.addIssue({ code: "custom", path: [v.STORAGE_URL ? "STORAGE_URL" : "S3_BUCKET"], message: store });
});

export type Env = z.infer<typeof envSchema>;

export function parseEnv(source: Record<string, string | undefined>): Env {
  const result = checkedSchema.safeParse(source);
  if (!result.success) {
    // Names and reasons only: a value may be a secret, and logs are read by many.
    const lines = result.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid environment (see the README's Configuration table):\n${lines.join("\n")}`);
  }
  return result.data;
}

let cached: Env | undefined;
export function env(): Env {
  cached ??= parseEnv(process.env);
  return cached;
}

/** The only values that reach the browser. */
export function clientEnv(e: Env = env()) {
  return { mailFake: Boolean(e.MAIL_FAKE_DIR), maxUploadBytes: e.MAX_UPLOAD_BYTES };
}
