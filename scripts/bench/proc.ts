// What the benchmarks read about the stack's own processes (Linux: `ss` and /proc).
import { spawnSync } from "node:child_process";
import fs from "node:fs";

/** The pid of the process listening on a local TCP port, or null. */
export function listenerPid(port: number): number | null {
  const out = spawnSync("ss", ["-Hltnp", `sport = :${port}`], { encoding: "utf8" }).stdout ?? "";
  const m = /pid=(\d+)/.exec(out);
  return m ? Number(m[1]) : null;
}

/** A process's resident memory in bytes (VmRSS), or null when it cannot be read. */
export function rssBytes(pid: number): number | null {
  try {
    const m = /VmRSS:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"));
    return m ? Number(m[1]) * 1024 : null;
  } catch {
    return null;
  }
}
