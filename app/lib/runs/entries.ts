/**
 * What the run screen sends: entries typed at the bench, each with its own idempotency key so
 * that a retry (a dropped connection, a tablet that slept, the offline queue sent again) is
 * stored once. Pure (zod only): the API parses with it and the screen builds its queue from it.
 */
import { z } from "zod";
import { isUnitCode } from "~/lib/calc";
import { quantityProblem } from "~/lib/edge";
import { MAX_TYPED_DECIMALS } from "~/lib/typed-number";

/** Made on the device (crypto.randomUUID or the like); letters, digits, - and _ only. */
export const ENTRY_KEY = /^[A-Za-z0-9_-]{8,80}$/;
const SPEC_KEY = /^[A-Za-z0-9_-]{1,40}$/;
/** One offline stretch's entries fit in a page's body (64 kB) many times over at this count. */
export const MAX_ENTRIES_PER_POST = 100;

export const entrySchema = z
  .object({
    key: z.string().regex(ENTRY_KEY, { message: "An entry key is 8–80 letters, digits, - or _." }),
    specKey: z.string().regex(SPEC_KEY, { message: "That is not a spec of this procedure." }),
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

/** The latest value of each spec: later typing wins; on the same instant, the later arrival. */
export function latestBySpec<E extends { specKey: string; typedAt: Date | string; receivedOrder: number }>(entries: E[]): Map<string, E> {
  const out = new Map<string, E>();
  for (const e of entries) {
    const cur = out.get(e.specKey);
    const t = new Date(e.typedAt).getTime();
    const ct = cur ? new Date(cur.typedAt).getTime() : Number.NEGATIVE_INFINITY;
    if (!cur || t > ct || (t === ct && e.receivedOrder > cur.receivedOrder)) out.set(e.specKey, e);
  }
  return out;
}

/** A run's progress: specs with a value out of all its specs (a spec cleared again counts as open). */
export function progressOf(specKeys: string[], latest: Map<string, { valueEntered: number | null }>) {
  const measured = specKeys.filter((k) => latest.get(k)?.valueEntered != null).length;
  return { measured, total: specKeys.length };
}
