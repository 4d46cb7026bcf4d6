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

/**
 * CPU time a process has used so far (user + system, ms), from /proc: what a response costs a
 * server, which moves far less than its latency when other work shares the cores. null when
 * the process cannot be read.
 */
export function cpuMs(pid: number): number | null {
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    // Fields after the command's closing parenthesis; utime and stime are the 14th and 15th.
    const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    return ((Number(f[11]) + Number(f[12])) * 1000) / CLOCK_TICKS;
  } catch {
    return null;
  }
}
/** Linux's USER_HZ: 100 on every architecture Debian builds for. */
const CLOCK_TICKS = 100;
