/**
 * The shop's search words: groups of words and phrases that mean the same on this floor
 * ("ptw", "piston to wall"). Searching for any word of a group also finds the others. The
 * groups live in PostgreSQL (search_word_groups), are kept by editors on /search/words, and
 * reach the search service as its synonyms setting (so the real server honours them too),
 * never by rewriting queries in the app. This module is the part without a database: reading
 * what someone typed, checking a group, and the service's shape.
 */

export const MIN_WORDS = 2;
export const MAX_WORDS = 8;
export const MAX_WORD_LENGTH = 40;

/** "PTW, piston to wall;\n Piston-to-wall" → ["ptw", "piston to wall", "piston-to-wall"]. */
export function parseWordList(input: string): string[] {
  const out: string[] = [];
  for (const raw of input.split(/[,;\n]/)) {
    const word = raw.trim().replace(/\s+/g, " ").toLowerCase();
    if (word && !out.includes(word)) out.push(word);
  }
  return out;
}

/** Why a group cannot be saved as it is, in the shop's words; null when it can. */
export function groupProblem(words: string[], others: { id: string; words: string[] }[], selfId?: string): string | null {
  if (words.length < MIN_WORDS) return "Give at least two words or phrases that mean the same, separated by commas.";
  if (words.length > MAX_WORDS) return `A group holds up to ${MAX_WORDS} words or phrases; split this one in two.`;
  const long = words.find((w) => w.length > MAX_WORD_LENGTH);
  if (long) return `“${long.slice(0, MAX_WORD_LENGTH)}…” is longer than ${MAX_WORD_LENGTH} characters.`;
  for (const other of others) {
    if (other.id === selfId) continue;
    const shared = words.find((w) => other.words.includes(w));
    if (shared)
      return `“${shared}” is already in the group “${other.words.join(", ")}”. A word belongs to one group; change that group instead.`;
  }
  return null;
}

/** Meilisearch's synonyms shape: each word maps to the others of its group. */
export function synonymsSetting(groups: string[][]): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const group of groups) {
    for (const word of group) {
      const key = word.toLowerCase();
      out[key] = [...new Set([...(out[key] ?? []), ...group.filter((w) => w !== word).map((w) => w.toLowerCase())])];
    }
  }
  return out;
}
