/**
 * The edge layer's schemas: what a route param, a search param or a body field may be before
 * anything reaches the database. PostgreSQL refuses a NUL character in text, an id that is not
 * a UUID, an int4 past 2³¹−1 and a date that does not exist, and each of those refusals used to
 * come back as a 500; these schemas refuse them first, with a reason a person can act on.
 * Pure (zod only): the pages' forms use the same rules in the browser. The server half, which
 * reads bodies and turns a failure into a response, is `edge.server.ts`.
 */
import { z } from "zod";
import { isUnitCode, toSI, unitKind, type UnitCode, type UnitKind } from "~/lib/calc";

export const NUL_MESSAGE = "Remove the NUL character (\\0) from this text: it cannot be stored.";

export const hasNul = (s: string): boolean => s.includes("\u0000");

const UUID_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export const isUuid = (s: unknown): s is string => typeof s === "string" && UUID_PATTERN.test(s);

/** An id as PostgreSQL's uuid type takes it (any version: ids made by the database are v4, tests use others). */
export const uuid = z.string().regex(UUID_PATTERN, { message: "That is not a valid id." });

/** PostgreSQL's integer (int4). */
export const INT4_MAX = 2_147_483_647;

/** A whole number in a URL (a record's version, 0 for as filed): digits only, 0 … 2³¹−1. */
export const wholeNumberParam = z
  .string()
  .regex(/^\d{1,10}$/, { message: "Expected a whole number." })
  .transform(Number)
  .refine((n) => n <= INT4_MAX, { message: `Expected a whole number up to ${INT4_MAX}.` });

/** A positive whole number in a URL (a revision number): digits only, 1 … 2³¹−1. */
export const positiveIntParam = wholeNumberParam.refine((n) => n >= 1, { message: "Expected a whole number from 1 up." });

/** A positive whole number in JSON (a version the client last saw). */
export const positiveInt = z
  .number({ error: "Expected a whole number." })
  .int("Expected a whole number.")
  .min(1)
  .max(INT4_MAX, `At most ${INT4_MAX}.`);

/** A procedure slug as `slugify` makes them (old slugs too): lower-case ASCII words and hyphens. */
export const slug = z
  .string()
  .max(200, { message: "No procedure has an address that long." })
  .regex(/^[a-z0-9][a-z0-9-]*$/, { message: "Not a procedure address." });

const DAYS_IN_MONTH = [31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

/** YYYY-MM-DD naming a day of the Gregorian calendar: 2024-02-30 and year 0000 do not exist. */
export function isRealDate(s: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (y < 1 || mo < 1 || mo > 12 || d < 1) return false;
  const leap = (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
  return d <= (mo === 2 && !leap ? 28 : DAYS_IN_MONTH[mo - 1]);
}

// ---- quantities -----------------------------------------------------------------------------

export type QuantityKind = UnitKind | "percent" | "any";

/**
 * What a gauge in an engine shop can plausibly read, in SI (m, N, N·m, Pa, K; a percentage as
 * a fraction). Wide on purpose — it refuses typing slips (1e308, a value in the wrong unit by
 * a factor of a million), not unusual work. Anything that reaches storage is also finite.
 */
export const SI_RANGES: Record<QuantityKind, { min: number; max: number; unit: string }> = {
  length: { min: -10, max: 10, unit: "m" }, // a bore, a gap, a stroke, a deck height
  force: { min: -1e7, max: 1e7, unit: "N" }, // 10 MN: far past any fastener's clamp load
  torque: { min: -1e5, max: 1e5, unit: "N·m" }, // 100 kN·m: past the largest bolting tools
  stress: { min: -1e10, max: 1e10, unit: "Pa" }, // 10 GPa: past any engine alloy's strength
  temperature: { min: 0, max: 5000, unit: "K" }, // absolute zero to past any furnace
  percent: { min: 0, max: 1, unit: "" }, // 0 … 100 %
  any: { min: -1e12, max: 1e12, unit: "" }, // free-form units: finite and not absurd
};

/** The kind of quantity a unit code measures ("%" is a percentage; anything else is free-form). */
export function kindOfUnit(unit: string): QuantityKind {
  if (unit === "%") return "percent";
  return unitKind(unit) ?? "any";
}

/**
 * Why a value typed in a unit cannot be stored, or null when it can: not a finite number, or
 * outside what a gauge can read (SI_RANGES). The message speaks in the unit the person typed.
 */
export function quantityProblem(value: number, unit: string): string | null {
  if (typeof value !== "number" || !Number.isFinite(value)) return "Enter a finite number.";
  const kind = kindOfUnit(unit);
  const si = kind === "percent" ? value / 100 : isUnitCode(unit) ? siOf(value, unit) : value;
  if (!Number.isFinite(si)) return "That number is too large to store.";
  const r = SI_RANGES[kind];
  if (si < r.min || si > r.max) {
    if (kind === "percent") return "A percentage runs from 0 to 100.";
    if (kind === "temperature" && si < r.min) return "That is below absolute zero.";
    return `That is outside what a gauge can read (${rangeText(kind)}); check the number and the unit.`;
  }
  return null;
}

function siOf(value: number, unit: UnitCode): number {
  try {
    return toSI(value, unit);
  } catch {
    return Number.NaN;
  }
}

function rangeText(kind: QuantityKind): string {
  const r = SI_RANGES[kind];
  return r.unit ? `${r.min} to ${r.max} ${r.unit}` : `${r.min} to ${r.max}`;
}

// ---- search params --------------------------------------------------------------------------

/** The search params as an object (the first value of each name), for a zod schema. */
export function searchObject(url: URL | string): Record<string, string> {
  const u = typeof url === "string" ? new URL(url) : url;
  const out: Record<string, string> = {};
  for (const [k, v] of u.searchParams) if (!(k in out)) out[k] = v;
  return out;
}

/** An optional search param: absent and empty both read as undefined; NUL refused; bounded. */
export const optionalParam = (max = 200) =>
  z
    .string()
    .max(max, { message: `At most ${max} characters.` })
    .refine((s) => !hasNul(s), { message: NUL_MESSAGE })
    .optional()
    .transform((s) => (s === "" ? undefined : s));

/** Where in a plain JSON value a string (or a key) holds a NUL, as a dotted path; null when none. */
export function nulPath(value: unknown, path: (string | number)[] = [], depth = 0): (string | number)[] | null {
  if (typeof value === "string") return hasNul(value) ? path : null;
  if (value === null || typeof value !== "object" || depth > 200) return null;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const p = nulPath(value[i], [...path, i], depth + 1);
      if (p) return p;
    }
    return null;
  }
  for (const [k, v] of Object.entries(value)) {
    if (hasNul(k)) return [...path, k];
    const p = nulPath(v, [...path, k], depth + 1);
    if (p) return p;
  }
  return null;
}

/** The params of an `:id` route. */
export const idParams = z.object({ id: uuid });

/** A search param through a schema when it is there: absent or blank reads as undefined; spaces around are dropped. */
export const optionalSearch = <S extends z.ZodType>(schema: S) =>
  z.preprocess((v) => (typeof v === "string" ? v.trim() || undefined : v), schema.optional());

/** The recordings library's filters (the page and GET /api/recordings). */
export const librarySearch = z.object({
  tag: optionalParam(40),
  uploader: optionalSearch(uuid),
  sort: z.enum(["newest", "oldest"]).optional().catch(undefined),
  q: optionalParam(200),
});

/** `?v=` of a record page: a version number (0 is the record as filed), or absent for the current one. */
export const versionSearch = z.object({ v: optionalSearch(wholeNumberParam) });

// ---- where a reading was taken ----------------------------------------------------------------

/**
 * Positions a reading can carry (issue 14): whole-number places are counted from 1 as the shop
 * counts them; an angle is on the gauge's dial, 0–360°; a depth below the deck is within the
 * longest bore a shop measures (1 m, in SI).
 */
export const POSITION_RANGES = {
  fastener: { min: 1, max: 200 }, // stud or bolt number on a head, cap or flange
  cylinder: { min: 1, max: 24 },
  journal: { min: 1, max: 16 }, // main or rod journal
  angleDeg: { min: 0, max: 360 },
  depthM: { min: 0, max: 1 },
} as const;
