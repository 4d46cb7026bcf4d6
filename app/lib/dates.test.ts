import { describe, expect, it } from "vitest";
import { formatCalendarDay, formatDay, formatDayTime } from "./dates";

describe("dates", () => {
  it("writes a day as the shop reads it, and nothing for nothing", () => {
    expect(formatDay(new Date(2026, 10, 3, 9, 30))).toBe("3 Nov 2026");
    expect(formatDay(null)).toBe("");
    expect(formatDay("")).toBe("");
  });

  it("keeps a calendar day the same day whatever the server's time zone", () => {
    expect(formatCalendarDay("2026-11-03")).toBe("3 Nov 2026");
    expect(formatCalendarDay("2026-01-01")).toBe("1 Jan 2026");
  });

  it("adds the time of day where asked", () => {
    expect(formatDayTime(new Date(2026, 10, 3, 14, 5))).toMatch(/^3 Nov 2026,? 14:05$/);
  });
});
