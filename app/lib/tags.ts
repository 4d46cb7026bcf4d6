/**
 * Tags on procedures, recordings and marks. A tag keeps the spelling its author gave it ("2.3 L",
 * "MLS gasket"): a reader sees it as written. Two tags that differ only in case or spacing are the
 * same tag: duplicates are dropped (the first spelling stays) and filters compare with `tagKey`
 * (in SQL, `lower(…)`, which folds case the same way for the shop's words).
 */
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
