// The environment is checked once, as the server and the worker start: a bad value stops the
// process with the variable's name and what is wrong, before it listens or runs a task (a
// `*_MS` value read with Number() used to become NaN and pass unnoticed).
import { spawn } from "node:child_process";
import path from "node:path";
import { describe, expect, it } from "vitest";

const ROOT = path.resolve(import.meta.dirname, "../..");

/** Runs a process of the app with the test run's environment plus `extra`; its exit code and output. */
function run(command: string, args: string[], extra: Record<string, string>): Promise<{ code: number | null; output: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, { cwd: ROOT, env: { ...process.env, ...extra }, stdio: ["ignore", "pipe", "pipe"] });
    let output = "";
    child.stdout.on("data", (b) => {
      output += b;
    });
    child.stderr.on("data", (b) => {
      output += b;
    });
    // A process that started after all is stopped, and the test fails on its exit code.
    const timer = setTimeout(() => child.kill("SIGKILL"), 20_000);
    child.once("error", reject);
    child.once("exit", (code) => {
      clearTimeout(timer);
      resolve({ code, output });
    });
  });
}

describe("environment checked at start", () => {
  it("the server refuses to start on a period that is not a number of milliseconds, naming it", async () => {
    const build = path.join(process.env.BENCHREEL_BUILD_DIR ?? "build", "server/index.js");
    // PORT 0: were the check missing, the server would listen on a free port rather than collide.
    const { code, output } = await run(process.execPath, ["server.js", build], { PORT: "0", SEARCH_CHECK_MS: "1m" });
    expect(code).not.toBe(0);
    expect(output).toContain("SEARCH_CHECK_MS: must be a whole number of milliseconds");
  });

  it("the worker refuses to start on a period of 0 ms, naming it", async () => {
    const { code, output } = await run(path.join(ROOT, "node_modules/.bin/tsx"), ["scripts/worker.ts"], { MAIL_POLL_MS: "0" });
    expect(code).not.toBe(0);
    expect(output).toContain("MAIL_POLL_MS: must be more than 0 ms");
    expect(output).not.toContain("[worker] running");
  });
});
