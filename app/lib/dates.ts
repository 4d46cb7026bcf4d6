/**
 * Dates as the shop reads them ("3 Nov 2026"). The formatters are built once: each
 * `toLocaleDateString(…)` call builds a new one, which showed in the render time of pages that
 * list many dates. Safe for any bundle (no dependencies).
 */
type DateLike = Date | string | number;

const DAY = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric" });
const DAY_UTC = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: "UTC" });
const DAY_TIME = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "short" });
const DAY_MONTH_TIME = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" });

/** "3 Nov 2026" for a moment; "" for nothing. */
export const formatDay = (d: DateLike | null | undefined) => (d == null || d === "" ? "" : DAY.format(new Date(d)));

/** "3 Nov 2026" for a calendar day ("2026-11-03" is that day everywhere, not a UTC midnight). */
export const formatCalendarDay = (d: DateLike | null | undefined) =>
  d == null || d === "" ? "" : DAY_UTC.format(new Date(typeof d === "string" && d.length === 10 ? `${d}T12:00:00Z` : d));

/** "3 Nov 2026, 14:05" */
export const formatDayTime = (d: DateLike) => DAY_TIME.format(new Date(d));

/** "3 Nov, 14:05" */
export const formatDayMonthTime = (d: DateLike) => DAY_MONTH_TIME.format(new Date(d));
