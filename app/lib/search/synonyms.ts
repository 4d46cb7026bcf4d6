/**
 * The shop's trade synonyms, in one editable list. Each group's words are interchangeable in
 * a query. Applied through the search service's synonyms setting (so the real server honours
 * them too), not by rewriting queries in the app.
 */
export const SYNONYM_GROUPS: string[][] = [
  ["ptw", "piston to wall", "piston-to-wall"],
  ["clamp load", "preload", "clamping force"],
  ["thou", "0.001 in", "mil"],
  ["moly", "molybdenum disulfide", "mos2"],
  ["oil clearance", "bearing clearance"],
  ["ring gap", "ring end gap", "end gap"],
  ["leak-down", "leakdown", "leak down"],
  ["oor", "out-of-round", "out of round"],
  ["torque plate", "deck plate", "honing plate"],
  ["stud", "studs"],
  ["bore", "cylinder bore"],
];

/** Meilisearch's synonyms shape: each word maps to the others of its group. */
export function synonymsSetting(groups: string[][] = SYNONYM_GROUPS): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const group of groups) {
    for (const word of group) {
      const key = word.toLowerCase();
      out[key] = [...new Set([...(out[key] ?? []), ...group.filter((w) => w !== word).map((w) => w.toLowerCase())])];
    }
  }
  return out;
}
