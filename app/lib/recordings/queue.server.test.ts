import { describe, expect, it, vi } from "vitest";
import { retryOnDeadlock } from "./queue.server";

const deadlock = () => Object.assign(new Error("deadlock detected"), { code: "40P01" });

describe("retryOnDeadlock", () => {
  it("runs again what PostgreSQL ended to break a deadlock, and returns its result", async () => {
    const fn = vi.fn().mockRejectedValueOnce(deadlock()).mockRejectedValueOnce(deadlock()).mockResolvedValueOnce("sent");
    await expect(retryOnDeadlock(fn, 4, 1)).resolves.toBe("sent");
    expect(fn).toHaveBeenCalledTimes(3);
  });

  it("gives up after the attempts allowed, with PostgreSQL's error", async () => {
    const fn = vi.fn().mockRejectedValue(deadlock());
    await expect(retryOnDeadlock(fn, 3, 1)).rejects.toMatchObject({ code: "40P01" });
    expect(fn).toHaveBeenCalledTimes(3);
  });

  it("does not run again after any other error", async () => {
    const fn = vi.fn().mockRejectedValue(Object.assign(new Error("duplicate key"), { code: "23505" }));
    await expect(retryOnDeadlock(fn, 4, 1)).rejects.toThrow("duplicate key");
    expect(fn).toHaveBeenCalledTimes(1);
  });
});
