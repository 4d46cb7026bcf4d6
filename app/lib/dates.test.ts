import { afterEach, describe, expect, it, vi } from "vitest";
import { formatDay, formatDayTime } from "./dates";

describe("dates", () => {
  it("writes a day as the shop reads it, and nothing for nothing", () => {
    expect(formatDay(new Date(2026, 10, 3, 9, 30))).toBe("3 Nov 2026");
    expect(formatDay(null)).toBe("");
    expect(formatDay("")).toBe("");
  });

  it("adds the time of day where asked", () => {
    expect(formatDayTime(new Date(2026, 10, 3, 14, 5))).toMatch(/^3 Nov 2026,? 14:05$/);
  });
});

describe("a calendar day in every time zone", () => {
  const zoneBefore = process.env.TZ;
  afterEach(() => {
    if (zoneBefore === undefined) delete process.env.TZ;
    else process.env.TZ = zoneBefore;
    vi.resetModules();
  });

  // The formatters are built when the module loads, with the process's zone of that moment: each
  // zone gets a fresh copy of the module. Node applies a change of TZ to Date and Intl at once.
  // From UTC−11 to UTC+14, the two ends of the zones in use, and the server's usual ones.
  for (const zone of ["Pacific/Pago_Pago", "America/Los_Angeles", "UTC", "Europe/London", "Asia/Kolkata", "Pacific/Kiritimati"]) {
    it(`keeps "2026-11-03" the 3rd with the server in ${zone}`, async () => {
      process.env.TZ = zone;
      vi.resetModules();
      const dates = await import("./dates");
      expect(dates.formatCalendarDay("2026-11-03")).toBe("3 Nov 2026");
      expect(dates.formatCalendarDay("2026-01-01")).toBe("1 Jan 2026");
      expect(dates.formatCalendarDay("2026-12-31")).toBe("31 Dec 2026");
    });
  }

  it("would not without it: the same string read as a moment is the 2nd west of Greenwich", async () => {
    // Proves that the zone above really changed: a plain moment's day follows it.
    process.env.TZ = "Pacific/Pago_Pago";
    vi.resetModules();
    const dates = await import("./dates");
    expect(dates.formatDay("2026-11-03")).toBe("2 Nov 2026");
    expect(dates.formatCalendarDay("2026-11-03")).toBe("3 Nov 2026");
  });
});
