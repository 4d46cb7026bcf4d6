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

  it("refuses a period that is not a whole number of milliseconds, naming it (Number() made NaN of it before)", () => {
    expect(() => parseEnv({ ...good, MAIL_POLL_MS: "1s" })).toThrow(/MAIL_POLL_MS: must be a whole number of milliseconds/);
    expect(() => parseEnv({ ...good, SEARCH_RETRY_BASE_MS: "0" })).toThrow(/SEARCH_RETRY_BASE_MS: must be more than 0 ms/);
    // setTimeout runs a longer delay at once (it wraps to 1 ms).
    expect(() => parseEnv({ ...good, SEARCH_CHECK_MS: String(2 ** 31) })).toThrow(/SEARCH_CHECK_MS: must be at most 2147483647 ms/);
    expect(() => parseEnv({ ...good, MAIL_RETRY_BASE_MS: "2.5" })).toThrow(/MAIL_RETRY_BASE_MS/);
  });

  it("takes the worker's periods and tools with their defaults", () => {
    const e = parseEnv(good);
    expect([e.MAIL_RETRY_BASE_MS, e.MAIL_POLL_MS, e.SEARCH_POLL_MS, e.SEARCH_RETRY_BASE_MS, e.SEARCH_CHECK_MS]).toEqual([
      5000, 1000, 500, 2000, 60_000,
    ]);
    expect([e.FFPROBE_PATH, e.FFMPEG_PATH, e.SEARCH_INDEX, e.PORT, e.HOST]).toEqual([
      "/usr/bin/ffprobe",
      "/usr/bin/ffmpeg",
      "benchreel",
      3000,
      "127.0.0.1",
    ]);
    expect(parseEnv({ ...good, MAIL_POLL_MS: "250" })).toMatchObject({ MAIL_POLL_MS: 250 });
  });

  it("refuses an index name the search service would refuse and a port out of range", () => {
    expect(() => parseEnv({ ...good, SEARCH_INDEX: "bench reel" })).toThrow(/SEARCH_INDEX: must be letters, digits/);
    expect(() => parseEnv({ ...good, PORT: "70000" })).toThrow(/PORT/);
  });

  it("never repeats a value in its message (it may be a secret)", () => {
    expect(() => parseEnv({ ...good, SESSION_SECRET: "hunter2" })).toThrow(
      expect.objectContaining({ message: expect.not.stringContaining("hunter2") }),
    );
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
