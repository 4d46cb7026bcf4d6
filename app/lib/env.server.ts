import { z } from "zod";

/**
 * Every environment variable the server reads, validated once. `npm start` and `npm test`
 * set local defaults; production sets them explicitly. See the README's table.
 */
export const envSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
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
  MEILI_HOST: z.string().url().optional(),
  MEILI_API_KEY: z.string().optional(),
  UPLOAD_DIR: z.string().default("uploads"),
  MAX_UPLOAD_BYTES: z.coerce.number().int().positive().default(20 * 1024 ** 3),
  /** How many reverse proxies stand in front of the app; 0 means X-Forwarded-For is never read (app/lib/client-address.ts). */
  TRUST_PROXY: z.coerce.number().int().min(0).max(10).default(0),
});

export type Env = z.infer<typeof envSchema>;

export function parseEnv(source: Record<string, string | undefined>): Env {
  const result = envSchema.safeParse(source);
  if (!result.success) {
    const lines = result.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid environment:\n${lines.join("\n")}`);
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
