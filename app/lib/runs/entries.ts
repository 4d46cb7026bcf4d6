/**
 * What the run screen sends: entries typed at the bench, each with its own idempotency key so
 * that a retry (a dropped connection, a tablet that slept, the offline queue sent again) is
 * stored once. Pure (zod only): the API parses with it and the screen builds its queue from it.
 */
import { z } from "zod";
import { isUnitCode, toSI } from "~/lib/calc";
import { POSITION_RANGES, quantityProblem } from "~/lib/edge";
import { DEPTH_UNITS, type DepthUnit, positionFieldsForSpec } from "~/lib/recordings/positions";
import { MAX_TYPED_DECIMALS } from "~/lib/typed-number";

/** Made on the device (crypto.randomUUID or the like); letters, digits, - and _ only. */
export const ENTRY_KEY = /^[A-Za-z0-9_-]{8,80}$/;
const SPEC_KEY = /^[A-Za-z0-9_-]{1,40}$/;
/** One offline stretch's entries fit in a page's body (64 kB) many times over at this count. */
export const MAX_ENTRIES_PER_POST = 100;

/** The numbered places a run works a spec through, one row each on the screen. */
export const RUN_PLACE_FIELDS = ["cylinder", "journal", "fastener"] as const;
export type RunPlaceField = (typeof RUN_PLACE_FIELDS)[number];

/**
 * Which numbered place a spec is measured at on a run: a cylinder for a bore, a piston or a
 * ring gap, a journal for a bearing, a stud for a torque (the first of the spec's position
 * fields that is a number; depth and angle are not asked on a run). null: measured once.
 */
export function runPlaceField(spec: { quantity: string; label: string }): RunPlaceField | null {
  return positionFieldsForSpec(spec).find((f): f is RunPlaceField => (RUN_PLACE_FIELDS as readonly string[]).includes(f)) ?? null;
}

const placeNumber = (field: RunPlaceField, what: string) =>
  z
    .number({ error: `A ${what} number from ${POSITION_RANGES[field].min} to ${POSITION_RANGES[field].max}.` })
    .int(`A ${what} number is a whole number.`)
    .min(POSITION_RANGES[field].min, `A ${what} number from ${POSITION_RANGES[field].min} to ${POSITION_RANGES[field].max}.`)
    .max(POSITION_RANGES[field].max, `A ${what} number from ${POSITION_RANGES[field].min} to ${POSITION_RANGES[field].max}.`);

/**
 * Where the entry was measured: `{ cylinder: 3 }`; nothing for a spec measured once. A bore
 * read for a step's Bore distortion grid also says where in the cylinder:
 * `{ cylinder: 3, depth: { value: 10, unit: "mm" }, angle: 45 }` (both or neither). Other
 * fields are refused.
 */
export const placeSchema = z
  .strictObject(
    {
      cylinder: placeNumber("cylinder", "cylinder"),
      journal: placeNumber("journal", "journal"),
      fastener: placeNumber("fastener", "stud"),
      depth: z.strictObject({
        value: z.number({ error: "Enter the depth below the deck as a number." }).min(0, "A depth below the deck cannot be negative."),
        unit: z.enum(DEPTH_UNITS, { error: "A depth is in mm or in." }),
      }),
      angle: z
        .number({ error: "Enter the angle in degrees." })
        .min(POSITION_RANGES.angleDeg.min, "An angle runs from 0 to 360°.")
        .max(POSITION_RANGES.angleDeg.max, "An angle runs from 0 to 360°."),
    },
    { error: "A position names only a cylinder, a journal or a stud, and for a bore a depth and an angle." },
  )
  .partial()
  .refine((p) => [p.cylinder, p.journal, p.fastener].filter((v) => v != null).length <= 1, {
    message: "An entry is measured at one place.",
  })
  .refine((p) => (p.depth == null) === (p.angle == null), { message: "A bore reading in a grid names both its depth and its angle." })
  .refine((p) => p.depth == null || p.cylinder != null, { message: "A depth and an angle are taken in a cylinder: name it." })
  .refine((p) => p.depth == null || toSI(p.depth.value, p.depth.unit) <= POSITION_RANGES.depthM.max, {
    message: "That is deeper than any bore (1 m); check the number and the unit.",
  });
/** Where in a cylinder a grid reading was taken, as typed (depth) and as stored (depthM). */
type GridPart = {
  depth?: { value: number; unit: DepthUnit } | null;
  angle?: number | null;
  depthM?: number | null;
  depthUnit?: string | null;
  angleDeg?: number | null;
};
export type Place = { cylinder?: number | null; journal?: number | null; fastener?: number | null } & GridPart;

/** The depth (metres, and the unit typed) and angle of a grid reading, from a typed or a stored place; null off the grid. */
export function gridOf(p: Place | null | undefined): { depthM: number; depthUnit: DepthUnit; angleDeg: number } | null {
  if (!p) return null;
  const depthM = p.depthM ?? (p.depth ? toSI(p.depth.value, p.depth.unit) : null);
  const angleDeg = p.angleDeg ?? p.angle ?? null;
  if (depthM == null || angleDeg == null) return null;
  return { depthM, depthUnit: (p.depthUnit ?? p.depth?.unit) === "in" ? "in" : "mm", angleDeg };
}

// Nine significant digits: the same depth converted twice (screen and server) keys the same.
const keyNumber = (x: number) => String(Number(x.toPrecision(9)));

/** The place's field and number, or null for an entry without one. */
export function placeOf(p: Place | null | undefined): { field: RunPlaceField; n: number } | null {
  for (const f of RUN_PLACE_FIELDS) if (p?.[f] != null) return { field: f, n: p[f] as number };
  return null;
}

/** "bore@cylinder3", "final", "bore@cylinder3@d0.01a45" (a grid reading): one value per spec and full place. */
export const placeKey = (specKey: string, p?: Place | null) => {
  const at = placeOf(p);
  if (!at) return specKey;
  const grid = gridOf(p);
  return `${specKey}@${at.field}${at.n}${grid ? `@d${keyNumber(grid.depthM)}a${keyNumber(grid.angleDeg)}` : ""}`;
};

/** The spec and place a `placeKey` names (a grid reading's depth in metres). */
export function parsePlaceKey(key: string): { specKey: string; place: Place | null } {
  const [specKey, at, grid] = key.split("@");
  const m = at ? /^(cylinder|journal|fastener)(\d+)$/.exec(at) : null;
  if (!m) return { specKey, place: null };
  const g = grid ? /^d([0-9.e+-]+)a([0-9.e+-]+)$/.exec(grid) : null;
  return { specKey, place: { [m[1]]: Number(m[2]), ...(g ? { depthM: Number(g[1]), angleDeg: Number(g[2]) } : {}) } };
}

const PLACE_WORDS: Record<RunPlaceField, { short: string; row: string }> = {
  cylinder: { short: "Cyl", row: "cylinder" },
  journal: { short: "Main", row: "journal" },
  fastener: { short: "Stud", row: "stud" },
};
/** "Cyl 3", "Main 2", "Stud 7". */
export const placeLabel = (field: RunPlaceField, n: number) => `${PLACE_WORDS[field].short} ${n}`;
/** "cylinder", "journal", "stud": the word a row is, as in "Next stud". */
export const placeWord = (field: RunPlaceField) => PLACE_WORDS[field].row;

export const entrySchema = z
  .object({
    key: z.string().regex(ENTRY_KEY, { message: "An entry key is 8–80 letters, digits, - or _." }),
    specKey: z.string().regex(SPEC_KEY, { message: "That is not a spec of this procedure." }),
    position: placeSchema.optional(),
    /** null clears the spec's value (a slip typed and then deleted). */
    value: z.number().nullable(),
    unit: z.string().max(16).refine(isUnitCode, { message: "That is not a unit Benchreel knows." }),
    decimals: z.number().int().min(0).max(MAX_TYPED_DECIMALS).nullable().default(null),
    /** When the person typed it, on the device's clock: the later typing wins, whenever it arrives. */
    typedAt: z.iso.datetime({ offset: true }),
    /** Which tablet or browser, in the person's words or the browser's; shown on the record. */
    device: z.string().max(80).default(""),
  })
  .superRefine((e, ctx) => {
    if (e.value == null) return;
    const problem = quantityProblem(e.value, e.unit);
    if (problem) ctx.addIssue({ code: "custom", path: ["value"], message: problem });
  });

export type EntryInput = z.infer<typeof entrySchema>;

/** Entries, and the step the screen is on (kept so another device opens the run there). */
export const entriesBodySchema = z
  .object({
    entries: z.array(entrySchema).max(MAX_ENTRIES_PER_POST).default([]),
    step: z.number().int().min(0).max(10_000).optional(),
  })
  .refine((b) => b.entries.length > 0 || b.step != null, { message: "Send at least one entry or the step.", path: ["entries"] });

/** The latest value at each spec and place: later typing wins; on the same instant, the later arrival. Keyed by `placeKey`. */
export function latestByPlace<E extends { specKey: string; typedAt: Date | string; receivedOrder: number } & Place>(
  entries: E[],
): Map<string, E> {
  const out = new Map<string, E>();
  for (const e of entries) {
    const k = placeKey(e.specKey, e);
    const cur = out.get(k);
    const t = new Date(e.typedAt).getTime();
    const ct = cur ? new Date(cur.typedAt).getTime() : Number.NEGATIVE_INFINITY;
    if (!cur || t > ct || (t === ct && e.receivedOrder > cur.receivedOrder)) out.set(k, e);
  }
  return out;
}

/**
 * The latest entries of a spec at its offered places, place by place: the place's own value,
 * then its grid readings (a Bore distortion grid's depths and angles), shallowest first.
 */
export function latestAtPlaces<E extends Place>(
  latest: Map<string, E>,
  specKey: string,
  field: RunPlaceField | null,
  offered: (number | null)[],
): E[] {
  const out: E[] = [];
  for (const n of offered) {
    const plain = placeKey(specKey, field && n != null ? { [field]: n } : null);
    const own = latest.get(plain);
    if (own) out.push(own);
    if (!field || n == null) continue;
    const grid = [...latest]
      .filter(([k]) => k.startsWith(`${plain}@`))
      .map(([, e]) => e)
      .sort((a, b) => (gridOf(a)?.depthM ?? 0) - (gridOf(b)?.depthM ?? 0) || (gridOf(a)?.angleDeg ?? 0) - (gridOf(b)?.angleDeg ?? 0));
    out.push(...grid);
  }
  return out;
}

/** The engine's counts, which say how many cylinders and main journals a run offers. */
export type EngineCounts = { cylinders: number | null; mainJournals: number | null };

/**
 * The places a spec is offered at on a run, each of which must have a value for the record to
 * be complete: every cylinder (or main journal) of the engine when the build says how many;
 * for studs, every stud up to the count the person gave on finishing (`studs`); otherwise 1 up
 * to the highest number given a value, so a stud skipped in the sequence is missing. A spec
 * without a place is offered once ([null]).
 */
export function offeredPlaces(field: RunPlaceField | null, counts: EngineCounts, valued: number[], studs?: number): (number | null)[] {
  if (!field) return [null];
  const count = field === "cylinder" ? counts.cylinders : field === "journal" ? counts.mainJournals : (studs ?? null);
  const top = Math.max(count ?? 0, ...valued, 0);
  return Array.from({ length: top }, (_, i) => i + 1);
}

type SpecLike = { key: string; quantity: string; label: string };
type LatestLike = { valueEntered: number | null } & Place;

/**
 * Each spec's offered places and which of them have no value yet (a cleared value counts as open).
 * `gridCells` (from `gridCellsBySpec`): for a bore read in a Bore distortion grid, the cells each
 * cylinder's grid has; such a cylinder is measured only when every cell has a value, so a
 * half-filled grid leaves its cylinder missing (a begun cylinder is still offered).
 */
export function placesBySpec(
  specs: SpecLike[],
  counts: EngineCounts,
  latest: Map<string, LatestLike>,
  gridCells: ReadonlyMap<string, number> = new Map(),
  studs: Readonly<Record<string, number>> = {},
) {
  const bySpec = new Map<string, LatestLike[]>();
  for (const [k, e] of latest) {
    const specKey = k.split("@")[0];
    bySpec.set(specKey, [...(bySpec.get(specKey) ?? []), e]);
  }
  return specs.map((s) => {
    const field = runPlaceField(s);
    const mine = bySpec.get(s.key) ?? [];
    const valued = field ? mine.filter((e) => e.valueEntered != null && e[field] != null).map((e) => e[field] as number) : [];
    const offered = offeredPlaces(field, counts, valued, studs[s.key]);
    const cells = field === "cylinder" ? gridCells.get(s.key) : undefined;
    // A cylinder read in a Bore distortion grid is measured when all its depths × angles are.
    const measured = cells
      ? valued.filter((n) => mine.filter((e) => e.valueEntered != null && e.cylinder === n && gridOf(e)).length >= cells)
      : valued;
    const missing = field
      ? offered.filter((n) => !measured.includes(n as number))
      : offered.filter(() => latest.get(s.key)?.valueEntered == null);
    return { key: s.key, field, offered, missing };
  });
}

/**
 * A run's progress in places: each offered place with a value out of all offered; a spec with
 * no place, or a stud or cylinder spec with nothing yet, counts as one.
 */
export function progressOf(places: ReturnType<typeof placesBySpec>) {
  let measured = 0;
  let total = 0;
  for (const p of places) {
    const offered = Math.max(1, p.offered.length);
    total += offered;
    measured += p.offered.length ? p.offered.length - p.missing.length : 0;
  }
  return { measured, total };
}

/** The finish form's field holding how many studs a per-stud spec covers: `studs.<spec key>`. */
export const studsField = (specKey: string) => `studs.${specKey}`;
const studCount = z.coerce
  .number({ error: "Enter how many studs this spec covers, as a whole number." })
  .int("Enter how many studs this spec covers, as a whole number.")
  .min(POSITION_RANGES.fastener.min, `From ${POSITION_RANGES.fastener.min} to ${POSITION_RANGES.fastener.max} studs.`)
  .max(POSITION_RANGES.fastener.max, `From ${POSITION_RANGES.fastener.min} to ${POSITION_RANGES.fastener.max} studs.`);

/**
 * Finishing a run: its notes, and for each per-stud spec the number of studs it covers
 * (`studs.<spec key>` fields; an empty one is left out, for finishRun to ask for by name).
 */
export const finishFormSchema = z
  .looseObject({ intent: z.literal("finish"), notes: z.string().max(4000).default("") })
  .superRefine((form, ctx) => {
    for (const [k, v] of Object.entries(form)) {
      if (!k.startsWith("studs.") || v === "") continue;
      const parsed = SPEC_KEY.test(k.slice(6)) ? studCount.safeParse(v) : null;
      if (!parsed?.success)
        ctx.addIssue({ code: "custom", path: [k], message: parsed?.error.issues[0].message ?? "That is not a spec of this procedure." });
    }
  })
  .transform((form) => ({
    notes: form.notes,
    studs: Object.fromEntries(
      Object.entries(form).flatMap(([k, v]) => (k.startsWith("studs.") && v !== "" ? [[k.slice(6), Number(v)] as [string, number]] : [])),
    ),
  }));
