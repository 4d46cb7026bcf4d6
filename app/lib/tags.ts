/**
 * Tags on procedures, recordings and marks. A tag keeps the spelling its author gave it ("2.3 L",
 * "MLS gasket"): a reader sees it as written. Two tags that differ only in case or spacing are the
 * same tag: duplicates are dropped (the first spelling stays) and filters compare with `tagKey`
 * (in SQL, `lower(…)`, which folds case the same way for the shop's words).
 */
import { z } from "zod";

export const MAX_TAGS = 12;
export const MAX_TAG_LENGTH = 40;

/** The spelling to show: trimmed, inner runs of spaces made one, the author's case kept. */
export function tidyTag(tag: string): string {
  return tag.trim().replace(/\s+/g, " ");
}

/** What two tags are compared by: the tidy spelling in lower case. */
export function tagKey(tag: string): string {
  return tidyTag(tag).toLowerCase();
}

export function sameTag(a: string, b: string): boolean {
  return tagKey(a) === tagKey(b);
}

/** "a, b ,c" or a list → tidy tags without case-insensitive duplicates, as many as a record keeps. */
export function normalizeTags(input: string | readonly string[]): string[] {
  const list = typeof input === "string" ? input.split(",") : input;
  const seen = new Set<string>();
  const out: string[] = [];
  for (const raw of list) {
    const tag = tidyTag(raw).slice(0, MAX_TAG_LENGTH).trim();
    if (!tag || seen.has(tagKey(tag))) continue;
    seen.add(tagKey(tag));
    out.push(tag);
  }
  return out.slice(0, MAX_TAGS);
}

/** "a, b ,c" → ["a","b","c"] for a form field that takes tags as a comma list. */
export function splitTags(s: string | null | undefined): string[] {
  return (s ?? "")
    .split(",")
    .map((t) => t.trim())
    .filter(Boolean);
}

/** Tags sent as a JSON list: too many or too long is refused with a reason (not cut), then normalised. */
export const tagsSchema = z
  .array(z.string().trim().min(1).max(MAX_TAG_LENGTH, `A tag is at most ${MAX_TAG_LENGTH} characters.`))
  .max(MAX_TAGS, `At most ${MAX_TAGS} tags.`)
  .default([])
  .transform((tags) => normalizeTags(tags));
