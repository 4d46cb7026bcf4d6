import { describe, expect, it } from "vitest";
import { clientEnv, parseEnv } from "./env.server";

const good = {
  DATABASE_URL: "postgres://postgres@127.0.0.1:5544/benchreel",
  SESSION_SECRET: "a-long-enough-local-secret",
  PUBLIC_URL: "http://127.0.0.1:3000",
  SMTP_URL: "smtp://127.0.0.1:2525",
};

describe("environment", () => {
  it("accepts the local defaults and fills the rest", () => {
    const e = parseEnv(good);
    expect(e.NODE_ENV).toBe("development");
    expect(e.MAX_UPLOAD_BYTES).toBe(20 * 1024 ** 3);
    expect(e.UPLOAD_DIR).toBe("uploads");
  });

  it("names every bad variable", () => {
    expect(() => parseEnv({ ...good, DATABASE_URL: "mysql://x/y", SESSION_SECRET: "short" })).toThrow(
      /DATABASE_URL: must be a postgres:\/\/ URL[\s\S]*SESSION_SECRET/,
    );
    expect(() => parseEnv({ ...good, SMTP_URL: undefined })).toThrow(/SMTP_URL/);
    expect(() => parseEnv({ ...good, MAX_UPLOAD_BYTES: "-5" })).toThrow(/MAX_UPLOAD_BYTES/);
  });

  it("coerces numbers from strings", () => {
    expect(parseEnv({ ...good, MAX_UPLOAD_BYTES: "1048576" }).MAX_UPLOAD_BYTES).toBe(1048576);
  });

  it("lets only the client-safe subset out", () => {
    const c = clientEnv(parseEnv({ ...good, MAIL_FAKE_DIR: "/tmp/x" }));
    expect(Object.keys(c).sort()).toEqual(["mailFake", "maxUploadBytes"]);
    expect(JSON.stringify(c)).not.toContain("secret");
    expect(c.mailFake).toBe(true);
  });
});
