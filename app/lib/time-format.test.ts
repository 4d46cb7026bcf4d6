import { describe, expect, it } from "vitest";
import { formatDuration, formatSeconds, formatTime } from "./time-format";

describe("times on screen", () => {
  it("gives a moment in a video to the tenth", () => {
    expect(formatTime(83.5)).toBe("1:23.5");
    expect(formatTime(3725)).toBe("1:02:05.0");
    expect(formatTime(0)).toBe("0:00.0");
    expect(formatTime(-2.5)).toBe("-0:02.5");
    expect(formatTime(null)).toBe("–");
  });
  it("gives a video's length to the nearest second", () => {
    expect(formatDuration(83.5)).toBe("1:24");
    expect(formatDuration(3725)).toBe("1:02:05");
    expect(formatDuration(undefined)).toBe("–");
  });
  it("gives a procedure's cited moment in the seconds begun, never below the start", () => {
    expect(formatSeconds(83.9)).toBe("1:23");
    expect(formatSeconds(3725)).toBe("1:02:05");
    expect(formatSeconds(-4)).toBe("0:00");
  });
});
