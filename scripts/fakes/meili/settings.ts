/** Index settings: defaults, validation and merging, in the shapes of Meilisearch's settings API. */
import { bad, invalidType } from "./errors";

export type GranularFilterable = {
  attributePatterns: string[];
  features?: { facetSearch?: boolean; filter?: { equality?: boolean; comparison?: boolean } };
};

export type TypoTolerance = {
  enabled: boolean;
  minWordSizeForTypos: { oneTypo: number; twoTypos: number };
  disableOnWords: string[];
  disableOnAttributes: string[];
  disableOnNumbers: boolean;
};

export type Settings = {
  displayedAttributes: string[];
  searchableAttributes: string[];
  filterableAttributes: (string | GranularFilterable)[];
  sortableAttributes: string[];
  rankingRules: string[];
  stopWords: string[];
  nonSeparatorTokens: string[];
  separatorTokens: string[];
  dictionary: string[];
  synonyms: Record<string, string[]>;
  distinctAttribute: string | null;
  proximityPrecision: "byWord" | "byAttribute";
  typoTolerance: TypoTolerance;
  faceting: { maxValuesPerFacet: number; sortFacetValuesBy: Record<string, "alpha" | "count"> };
  pagination: { maxTotalHits: number };
  embedders: Record<string, unknown>;
  searchCutoffMs: number | null;
  localizedAttributes: unknown[] | null;
  facetSearch: boolean;
  prefixSearch: "indexingTime" | "disabled";
};

export const DEFAULT_RANKING_RULES = ["words", "typo", "proximity", "attribute", "sort", "exactness"];

export function defaultSettings(): Settings {
  return {
    displayedAttributes: ["*"],
    searchableAttributes: ["*"],
    filterableAttributes: [],
    sortableAttributes: [],
    rankingRules: [...DEFAULT_RANKING_RULES],
    stopWords: [],
    nonSeparatorTokens: [],
    separatorTokens: [],
    dictionary: [],
    synonyms: {},
    distinctAttribute: null,
    proximityPrecision: "byWord",
    typoTolerance: {
      enabled: true,
      minWordSizeForTypos: { oneTypo: 5, twoTypos: 9 },
      disableOnWords: [],
      disableOnAttributes: [],
      disableOnNumbers: false,
    },
    faceting: { maxValuesPerFacet: 100, sortFacetValuesBy: { "*": "alpha" } },
    pagination: { maxTotalHits: 1000 },
    embedders: {},
    searchCutoffMs: null,
    localizedAttributes: null,
    facetSearch: true,
    prefixSearch: "indexingTime",
  };
}

/** Settings names as the sub-routes spell them (`/settings/filterable-attributes`). */
export const SETTING_ROUTES: Record<string, keyof Settings> = {
  "displayed-attributes": "displayedAttributes",
  "searchable-attributes": "searchableAttributes",
  "filterable-attributes": "filterableAttributes",
  "sortable-attributes": "sortableAttributes",
  "ranking-rules": "rankingRules",
  "stop-words": "stopWords",
  "non-separator-tokens": "nonSeparatorTokens",
  "separator-tokens": "separatorTokens",
  dictionary: "dictionary",
  synonyms: "synonyms",
  "distinct-attribute": "distinctAttribute",
  "proximity-precision": "proximityPrecision",
  "typo-tolerance": "typoTolerance",
  faceting: "faceting",
  pagination: "pagination",
  embedders: "embedders",
  "search-cutoff-ms": "searchCutoffMs",
  "localized-attributes": "localizedAttributes",
  "facet-search": "facetSearch",
  "prefix-search": "prefixSearch",
};

const snake = (k: string) => k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
const code = (k: string) => `invalid_settings_${snake(k)}`;

function stringList(key: string, v: unknown): string[] {
  if (!Array.isArray(v)) throw invalidType(code(key), key, "an array", v);
  v.forEach((x, i) => {
    if (typeof x !== "string") throw invalidType(code(key), `${key}[${i}]`, "a string", x);
  });
  return v as string[];
}

const RULE_RE = /^(words|typo|proximity|attribute|sort|exactness|attributeRank|wordPosition)$|^[^:\s]+:(asc|desc)$/;

/** Validates one setting's new value (never null here) and returns it normalised. */
function validate(key: keyof Settings, v: unknown, current: Settings): unknown {
  switch (key) {
    case "displayedAttributes":
    case "searchableAttributes":
    case "sortableAttributes":
    case "stopWords":
    case "nonSeparatorTokens":
    case "separatorTokens":
    case "dictionary":
      return stringList(key, v);
    case "rankingRules": {
      const rules = stringList(key, v);
      for (const r of rules)
        if (!RULE_RE.test(r))
          throw bad(
            code(key),
            `Invalid value at \`.rankingRules[${rules.indexOf(r)}]\`: \`${r}\` ranking rule is invalid. Valid ranking rules are words, typo, sort, proximity, attribute, exactness and custom ranking rules.`,
          );
      return rules;
    }
    case "filterableAttributes": {
      if (!Array.isArray(v)) throw invalidType(code(key), key, "an array", v);
      return v.map((x, i) => {
        if (typeof x === "string") return x;
        if (x && typeof x === "object" && Array.isArray((x as GranularFilterable).attributePatterns)) return x as GranularFilterable;
        throw invalidType(code(key), `${key}[${i}]`, "a string or an object", x);
      });
    }
    case "synonyms": {
      if (!v || typeof v !== "object" || Array.isArray(v)) throw invalidType(code(key), key, "an object", v);
      const out: Record<string, string[]> = {};
      for (const [k, list] of Object.entries(v)) out[k] = stringList(`synonyms.${k}`, list);
      return out;
    }
    case "distinctAttribute":
      if (typeof v !== "string") throw invalidType(code(key), key, "a string", v);
      return v;
    case "proximityPrecision":
      if (v !== "byWord" && v !== "byAttribute")
        throw bad(code(key), `Unknown value \`${String(v)}\` at \`.proximityPrecision\`: expected one of \`byWord\`, \`byAttribute\``);
      return v;
    case "typoTolerance": {
      if (!v || typeof v !== "object") throw invalidType(code(key), key, "an object", v);
      const t = v as Partial<TypoTolerance> & { minWordSizeForTypos?: Partial<TypoTolerance["minWordSizeForTypos"]> };
      const cur = current.typoTolerance;
      const next: TypoTolerance = {
        enabled: t.enabled ?? cur.enabled,
        minWordSizeForTypos: {
          oneTypo: t.minWordSizeForTypos?.oneTypo ?? cur.minWordSizeForTypos.oneTypo,
          twoTypos: t.minWordSizeForTypos?.twoTypos ?? cur.minWordSizeForTypos.twoTypos,
        },
        disableOnWords: t.disableOnWords ?? cur.disableOnWords,
        disableOnAttributes: t.disableOnAttributes ?? cur.disableOnAttributes,
        disableOnNumbers: t.disableOnNumbers ?? cur.disableOnNumbers,
      };
      if (next.minWordSizeForTypos.oneTypo > next.minWordSizeForTypos.twoTypos)
        throw bad(
          code(key),
          "`minWordSizeForTypos` setting is invalid. `oneTypo` and `twoTypos` fields should be between `0` and `255`, and `twoTypos` should be greater or equals to `oneTypo` but found `oneTypo: " +
            `${next.minWordSizeForTypos.oneTypo}\` and twoTypos: ${next.minWordSizeForTypos.twoTypos}\`.`,
        );
      return next;
    }
    case "faceting": {
      if (!v || typeof v !== "object") throw invalidType(code(key), key, "an object", v);
      const f = v as Partial<Settings["faceting"]>;
      return {
        maxValuesPerFacet: f.maxValuesPerFacet ?? current.faceting.maxValuesPerFacet,
        sortFacetValuesBy: f.sortFacetValuesBy ?? current.faceting.sortFacetValuesBy,
      };
    }
    case "pagination": {
      if (!v || typeof v !== "object") throw invalidType(code(key), key, "an object", v);
      const p = v as Partial<Settings["pagination"]>;
      return { maxTotalHits: p.maxTotalHits ?? current.pagination.maxTotalHits };
    }
    case "searchCutoffMs":
      if (typeof v !== "number") throw invalidType(code(key), key, "a positive integer", v);
      return v;
    case "facetSearch":
      if (typeof v !== "boolean") throw invalidType(code(key), key, "a boolean", v);
      return v;
    case "prefixSearch":
      if (v !== "indexingTime" && v !== "disabled")
        throw bad(code(key), `Unknown value \`${String(v)}\` at \`.prefixSearch\`: expected one of \`indexingTime\`, \`disabled\``);
      return v;
    case "embedders":
    case "localizedAttributes":
      return v;
  }
}

/** Checks a settings payload (PATCH /settings) synchronously, as the real API does. */
export function checkSettingsPayload(payload: unknown): Record<string, unknown> {
  if (!payload || typeof payload !== "object" || Array.isArray(payload)) throw invalidType("bad_request", "", "an object", payload);
  const known = Object.keys(defaultSettings());
  const base = defaultSettings();
  for (const [k, v] of Object.entries(payload)) {
    if (!known.includes(k)) throw bad("bad_request", `Unknown field \`${k}\`: expected one of ${known.map((x) => `\`${x}\``).join(", ")}`);
    if (v !== null) validate(k as keyof Settings, v, base);
  }
  return payload as Record<string, unknown>;
}

/** Applies a settings payload; a null value resets that setting. Returns the changed keys. */
export function applySettings(current: Settings, payload: Record<string, unknown>): Set<keyof Settings> {
  const defaults = defaultSettings();
  const changed = new Set<keyof Settings>();
  for (const [k, v] of Object.entries(payload)) {
    const key = k as keyof Settings;
    const next = v === null ? defaults[key] : validate(key, v, current);
    if (JSON.stringify(next) !== JSON.stringify(current[key])) changed.add(key);
    (current as Record<string, unknown>)[key] = next;
  }
  return changed;
}
