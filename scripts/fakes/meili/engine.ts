/**
 * One index of the fake: documents, an inverted index, facet lists, and search.
 *
 * The term dictionary is minisearch's SearchableMap (the radix tree behind MiniSearch's own
 * prefix and fuzzy search: `atPrefix` and `fuzzyGet`). Each term maps to a compact posting
 * list (document numbers in increasing order in an Int32Array, with term frequency and the
 * set of attributes holding the term). MiniSearch's `search()` itself is not used: it
 * allocates and scores a result object for every matching document and sorts them all,
 * which costs 50–300 ms for a term found in most of 20,000 documents (see bench.ts). Here a
 * query fills typed arrays indexed by document number, ranks with Meilisearch's bucket rules
 * (words, typo, attribute, sort, exactness; BM25 breaks ties), keeps only the requested page
 * with a bounded heap, and formats only that page.
 *
 * Document numbers are never reused: replacing a document gives it a new number, so posting
 * lists stay sorted and append-only; dead numbers are skipped through `alive` and purged
 * from the lists once they pile up.
 */
import SearchableMap from "minisearch/SearchableMap";
import { bad, documentNotFound, invalidType, MeiliError } from "./errors";
import {
  filterFields,
  FilterSyntaxError,
  FilterTypeError,
  parseFilterParam,
  type FilterNode,
  type ParsedFilter,
  type ParsedFilterNode,
  type Token,
} from "./filter";
import { applySettings, defaultSettings, type GranularFilterable, type Settings } from "./settings";
import { formatText, matchSpans, type HitMatch } from "./format";
import { indexTerms, isNumericTerm, normalizeTerm, scanChunks, type Chunk } from "./tokenizer";

export type Doc = Record<string, unknown>;

// ---------------------------------------------------------------------------------------
// small growable int list

class IntList {
  a: Int32Array;
  len = 0;
  constructor(cap = 4) {
    this.a = new Int32Array(cap);
  }
  push(v: number) {
    if (this.len === this.a.length) {
      const b = new Int32Array(this.a.length * 2);
      b.set(this.a);
      this.a = b;
    }
    this.a[this.len++] = v;
  }
  /** Keeps the entries for which keep(value) holds. */
  retain(keep: (v: number) => boolean) {
    let j = 0;
    for (let i = 0; i < this.len; i++) if (keep(this.a[i])) this.a[j++] = this.a[i];
    this.len = j;
  }
}

/** Postings of a term: doc numbers, and meta = attributeMask << 16 | min(tf, 65535). */
class Postings {
  ids = new Int32Array(2);
  meta = new Int32Array(2);
  len = 0;
  /** The document being indexed when this term was last seen (its entry is the last one). */
  lastDoc = -1;
  push(id: number, meta: number) {
    if (this.len === this.ids.length) {
      const n = this.ids.length * 2;
      const ids = new Int32Array(n);
      ids.set(this.ids);
      const m = new Int32Array(n);
      m.set(this.meta);
      this.ids = ids;
      this.meta = m;
    }
    this.ids[this.len] = id;
    this.meta[this.len++] = meta;
  }
}

type FacetValues = {
  strings: Map<string, { orig: string; ids: IntList }>;
  numbers: Map<number, IntList>;
  exists: IntList;
  nulls: IntList;
  empties: IntList;
  /** Values in alphabetical order (display value, sort key, ids); null when stale. */
  sorted: { value: string; key: string; ids: IntList }[] | null;
};

const EMPTY = Symbol("empty");
type Leaf = string | number | boolean | null | typeof EMPTY;

/** Calls cb for every leaf of a document, with dotted paths; arrays repeat their path. */
function flatten(value: unknown, path: string, cb: (path: string, v: Leaf) => void) {
  if (Array.isArray(value)) {
    if (value.length === 0) cb(path, EMPTY);
    for (const v of value) flatten(v, path, cb);
  } else if (value !== null && typeof value === "object") {
    const entries = Object.entries(value);
    if (entries.length === 0 && path) cb(path, EMPTY);
    for (const [k, v] of entries) flatten(v, path ? `${path}.${k}` : k, cb);
  } else if (typeof value === "string" || typeof value === "number" || typeof value === "boolean" || value === null) {
    cb(path, value);
  }
}

/** The values at a dotted path (through objects and arrays). */
function valuesAt(doc: unknown, path: string): unknown[] {
  const out: unknown[] = [];
  const walk = (v: unknown, rest: string) => {
    if (Array.isArray(v)) {
      for (const x of v) walk(x, rest);
      return;
    }
    if (rest === "") {
      out.push(v);
      return;
    }
    if (v === null || typeof v !== "object") return;
    const o = v as Record<string, unknown>;
    if (rest in o) walk(o[rest], "");
    // keys may themselves contain dots: try each split
    for (let i = rest.indexOf("."); i > 0; i = rest.indexOf(".", i + 1)) {
      const head = rest.slice(0, i);
      if (head in o) walk(o[head], rest.slice(i + 1));
    }
  };
  walk(doc, path);
  return out;
}

function globToRegExp(p: string) {
  return new RegExp(
    `^${p
      .split("*")
      .map((s) => s.replace(/[.+?^${}()|[\]\\]/g, "\\$&"))
      .join(".*")}$`,
  );
}

/** An attribute-pattern list (filterable, sortable, displayed...) as a predicate on paths. */
function patternMatcher(patterns: string[]): (path: string) => boolean {
  if (patterns.includes("*")) return () => true;
  const exact = new Set(patterns);
  const globs = patterns.filter((p) => p.includes("*")).map(globToRegExp);
  return (path) => {
    if (exact.has(path)) return true;
    for (let i = path.indexOf("."); i > 0; i = path.indexOf(".", i + 1)) if (exact.has(path.slice(0, i))) return true;
    return globs.some((g) => g.test(path));
  };
}

const DOC_ID_RE = /^[a-zA-Z0-9_-]{1,511}$/;

function docIdOf(doc: Doc, pk: string): string {
  const v = doc[pk];
  if (v === undefined || v === null)
    throw new MeiliError(400, "missing_document_id", `Document doesn't have a \`${pk}\` attribute: \`${JSON.stringify(doc)}\`.`);
  if (typeof v === "number" && Number.isInteger(v) && v >= 0) return String(v);
  if (typeof v === "string" && DOC_ID_RE.test(v)) return v;
  throw new MeiliError(
    400,
    "invalid_document_id",
    `Document identifier \`${JSON.stringify(v)}\` is invalid. A document identifier can be of type integer or string, only composed of alphanumeric characters (a-z A-Z 0-9), hyphens (-) and underscores (_), and can not be more than 511 bytes.`,
  );
}

export function inferPrimaryKey(doc: Doc): string {
  const candidates = Object.keys(doc).filter((k) => k.toLowerCase().endsWith("id"));
  if (candidates.length === 1) return candidates[0];
  if (candidates.length === 0)
    throw new MeiliError(
      400,
      "index_primary_key_no_candidate_found",
      "The primary key inference failed as the engine did not find any field ending with `id` in its name. Please specify the primary key manually using the `primaryKey` query parameter.",
    );
  throw new MeiliError(
    400,
    "index_primary_key_multiple_candidates_found",
    `The primary key inference failed as the engine found ${candidates.length} fields ending with \`id\` in their names: '${candidates[0]}' and '${candidates[1]}'. Please specify the primary key manually using the \`primaryKey\` query parameter.`,
  );
}

// ---------------------------------------------------------------------------------------
// search parameters

export type SearchParams = {
  q?: string | null;
  offset?: number;
  limit?: number;
  page?: number;
  hitsPerPage?: number;
  filter?: unknown;
  sort?: string[];
  facets?: string[];
  attributesToRetrieve?: string[];
  attributesToHighlight?: string[];
  highlightPreTag?: string;
  highlightPostTag?: string;
  attributesToCrop?: string[];
  cropLength?: number;
  cropMarker?: string;
  showMatchesPosition?: boolean;
  showRankingScore?: boolean;
  showRankingScoreDetails?: boolean;
  matchingStrategy?: "last" | "all" | "frequency";
  attributesToSearchOn?: string[] | null;
  distinct?: string;
  rankingScoreThreshold?: number;
};

const SEARCH_FIELDS: Record<string, "string" | "int" | "strings" | "bool" | "any" | "number"> = {
  q: "string",
  offset: "int",
  limit: "int",
  page: "int",
  hitsPerPage: "int",
  filter: "any",
  sort: "strings",
  facets: "strings",
  attributesToRetrieve: "strings",
  attributesToHighlight: "strings",
  highlightPreTag: "string",
  highlightPostTag: "string",
  attributesToCrop: "strings",
  cropLength: "int",
  cropMarker: "string",
  showMatchesPosition: "bool",
  showRankingScore: "bool",
  showRankingScoreDetails: "bool",
  showPerformanceDetails: "bool",
  matchingStrategy: "string",
  attributesToSearchOn: "strings",
  distinct: "string",
  rankingScoreThreshold: "number",
  // accepted and ignored: vector and AI features the fake does not have
  vector: "any",
  hybrid: "any",
  retrieveVectors: "bool",
  locales: "any",
  media: "any",
  personalize: "any",
};

const snake = (k: string) => k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

/** Type-checks a search body the way the real API does (400 with invalid_search_<param>). */
export function checkSearchParams(body: unknown, ignore: string[] = []): SearchParams {
  if (!body || typeof body !== "object" || Array.isArray(body)) throw invalidType("bad_request", "", "an object", body);
  for (const [k, v] of Object.entries(body)) {
    if (ignore.includes(k)) continue;
    const kind = SEARCH_FIELDS[k];
    if (!kind)
      throw bad(
        "bad_request",
        `Unknown field \`${k}\`: expected one of ${Object.keys(SEARCH_FIELDS)
          .map((x) => `\`${x}\``)
          .join(", ")}`,
      );
    if (v === null || v === undefined) continue;
    const code = `invalid_search_${snake(k)}`;
    if (kind === "string" && typeof v !== "string") throw invalidType(code, k, "a string", v);
    if (kind === "int" && !(typeof v === "number" && Number.isInteger(v) && v >= 0)) throw invalidType(code, k, "a positive integer", v);
    if (kind === "number" && typeof v !== "number") throw invalidType(code, k, "a number", v);
    if (kind === "bool" && typeof v !== "boolean") throw invalidType(code, k, "a boolean", v);
    if (kind === "strings" && !(Array.isArray(v) && v.every((x) => typeof x === "string"))) throw invalidType(code, k, "an array", v);
  }
  const p = body as SearchParams;
  if (p.matchingStrategy != null && !["last", "all", "frequency"].includes(p.matchingStrategy))
    throw bad(
      "invalid_search_matching_strategy",
      `Unknown value \`${p.matchingStrategy}\` at \`.matchingStrategy\`: expected one of \`last\`, \`all\`, \`frequency\``,
    );
  return p;
}

// ---------------------------------------------------------------------------------------
// query plan

type Derived = { term: string; postings: Postings; typo: number; weight: number; exact: boolean };
/** An alternative: every one of its terms must be present (each term: any of its derivations). */
type Alt = Derived[][];
/** One query word (or phrase, or synonym group); `maxTypos` is how many typos it may take. */
/** What a hit's ranking rests on: query words it holds, of how many, and the typos allowed. */
type Rank = { words: number; totalWords: number; maxTypoCount: number };

type Slot = { alts: Alt[]; weight: number; df: number; maxTypos: number };

/** Every term a query can match: highlighted prefix length (0 = whole word), and its postings. */
type MatchInfo = Map<string, { prefix: number; postings: Postings | null }>;

export type SearchResult = Record<string, unknown>;

const K1 = 1.2;
const B = 0.75;

export class MeiliIndex {
  uid: string;
  primaryKey: string | null;
  createdAt: string;
  updatedAt: string;
  settings: Settings = defaultSettings();

  private docs: (Doc | undefined)[] = [];
  private extIds: string[] = [];
  private idMap = new Map<string, number>();
  private alive = new Uint8Array(1024);
  private docLen = new Int32Array(1024);
  private nextId = 0;
  private aliveCount = 0;
  private deadCount = 0;
  private totalLen = 0;

  private terms = new SearchableMap<Postings>();
  /** The same postings by term, for the indexing hot path (a plain Map is faster to probe). */
  private postingsByTerm = new Map<string, Postings>();
  private fieldOrder: string[] = [];
  private fieldSeen = new Set<string>();
  private topFieldCounts = new Map<string, number>();
  private rankCache = new Map<string, number>();
  private facets = new Map<string, FacetValues>();
  private isFilterable: (path: string) => boolean = () => false;
  private isDisplayed: (path: string) => boolean = () => true;

  // per-query scratch, indexed by document number
  private epoch = 0;
  private stamp = new Int32Array(0);
  private wordMask = new Int32Array(0);
  private typos = new Uint8Array(0);
  private attr = new Uint8Array(0);
  private exactCnt = new Uint8Array(0);
  private score = new Float64Array(0);
  private slotMark = new Int32Array(0);
  private slotTypo = new Uint8Array(0);
  private slotExact = new Uint8Array(0);
  private altMark = new Int32Array(0);
  private altCount = new Uint8Array(0);
  private altScore = new Float64Array(0);
  private altAttr = new Uint8Array(0);
  private slotEpoch = 0;
  private altEpoch = 0;

  constructor(uid: string, primaryKey: string | null = null, now = new Date().toISOString()) {
    this.uid = uid;
    this.primaryKey = primaryKey;
    this.createdAt = now;
    this.updatedAt = now;
    this.compileSettings();
  }

  get numberOfDocuments() {
    return this.aliveCount;
  }

  info() {
    return { uid: this.uid, primaryKey: this.primaryKey, createdAt: this.createdAt, updatedAt: this.updatedAt };
  }

  touch(now = new Date().toISOString()) {
    this.updatedAt = now;
  }

  private compileSettings() {
    const patterns = this.settings.filterableAttributes.flatMap((f) =>
      typeof f === "string"
        ? [f]
        : (f as GranularFilterable).features?.filter?.equality === false && (f as GranularFilterable).features?.filter?.comparison === false
          ? []
          : f.attributePatterns,
    );
    this.isFilterable = patternMatcher(patterns);
    this.isDisplayed = patternMatcher(this.settings.displayedAttributes);
    this.rankCache.clear();
  }

  filterablePatterns(): string[] {
    return this.settings.filterableAttributes.flatMap((f) => (typeof f === "string" ? [f] : f.attributePatterns));
  }

  // -------------------------------------------------------------------------------------
  // storage

  private ensureCapacity(n: number) {
    if (n <= this.alive.length) return;
    let cap = this.alive.length;
    while (cap < n) cap *= 2;
    const a = new Uint8Array(cap);
    a.set(this.alive);
    this.alive = a;
    const l = new Int32Array(cap);
    l.set(this.docLen);
    this.docLen = l;
  }

  /** Search rank of a flattened attribute path, or -1 when it is not searchable. */
  private searchRank(path: string): number {
    let r = this.rankCache.get(path);
    if (r !== undefined) return r;
    const sa = this.settings.searchableAttributes;
    if (sa.includes("*")) r = this.fieldOrder.indexOf(path);
    else {
      r = sa.findIndex((s) => path === s || path.startsWith(`${s}.`));
    }
    this.rankCache.set(path, r);
    return r;
  }

  private noteFields(doc: Doc) {
    for (const k of Object.keys(doc)) this.topFieldCounts.set(k, (this.topFieldCounts.get(k) ?? 0) + 1);
    flatten(doc, "", (path) => {
      if (!this.fieldSeen.has(path)) {
        this.fieldSeen.add(path);
        this.fieldOrder.push(path);
      }
    });
  }

  private indexDoc(id: number, doc: Doc) {
    let len = 0;
    const byTerm = this.postingsByTerm;
    const terms = this.terms;
    flatten(doc, "", (path, v) => {
      if (v === null || v === EMPTY) return;
      const rank = this.searchRank(path);
      if (rank < 0) return;
      const bit = (1 << Math.min(rank, 14)) << 16;
      len += indexTerms(String(v), (t) => {
        let p = byTerm.get(t);
        if (p === undefined) {
          p = new Postings();
          byTerm.set(t, p);
          terms.set(t, p);
        }
        if (p.lastDoc === id) {
          // this document's entry is the last one: count one more occurrence
          const m = p.meta[p.len - 1];
          p.meta[p.len - 1] = (m | bit) + ((m & 0xffff) < 0xffff ? 1 : 0);
        } else {
          p.lastDoc = id;
          p.push(id, bit | 1);
        }
      });
    });
    this.docLen[id] = len;
    this.totalLen += len;
    this.facetDoc(id, doc);
  }

  private facetDoc(id: number, doc: Doc) {
    const seen = new Set<string>();
    flatten(doc, "", (path, v) => {
      if (!this.isFilterable(path)) return;
      let f = this.facets.get(path);
      if (!f) {
        f = { strings: new Map(), numbers: new Map(), exists: new IntList(), nulls: new IntList(), empties: new IntList(), sorted: null };
        this.facets.set(path, f);
      }
      if (!seen.has(path)) {
        seen.add(path);
        f.exists.push(id);
      }
      if (v === null) f.nulls.push(id);
      else if (v === EMPTY) f.empties.push(id);
      else if (typeof v === "number") {
        let l = f.numbers.get(v);
        if (!l) {
          l = new IntList();
          f.numbers.set(v, l);
          f.sorted = null;
        }
        l.push(id);
      } else {
        const s = String(v);
        if (s === "") f.empties.push(id);
        const key = normalizeTerm(s.trim());
        let e = f.strings.get(key);
        if (!e) {
          e = { orig: s, ids: new IntList() };
          f.strings.set(key, e);
          f.sorted = null;
        }
        if (e.ids.len === 0 || e.ids.a[e.ids.len - 1] !== id) e.ids.push(id);
      }
    });
  }

  private removeInternal(id: number) {
    const doc = this.docs[id];
    if (!doc) return;
    for (const k of Object.keys(doc)) {
      const n = (this.topFieldCounts.get(k) ?? 1) - 1;
      if (n <= 0) this.topFieldCounts.delete(k);
      else this.topFieldCounts.set(k, n);
    }
    this.idMap.delete(this.extIds[id]);
    this.docs[id] = undefined;
    this.alive[id] = 0;
    this.totalLen -= this.docLen[id];
    this.aliveCount--;
    this.deadCount++;
  }

  private insert(ext: string, doc: Doc) {
    const id = this.nextId++;
    this.ensureCapacity(this.nextId);
    this.docs[id] = doc;
    this.extIds[id] = ext;
    this.idMap.set(ext, id);
    this.alive[id] = 1;
    this.aliveCount++;
    this.noteFields(doc);
    this.indexDoc(id, doc);
  }

  /** Purges dead document numbers from posting and facet lists once they pile up. */
  private maybeCompact(force = false) {
    if (!force && (this.deadCount < 1000 || this.deadCount < this.aliveCount * 0.25)) return;
    const alive = this.alive;
    const empty: string[] = [];
    for (const [term, p] of this.terms) {
      let j = 0;
      for (let i = 0; i < p.len; i++)
        if (alive[p.ids[i]]) {
          p.ids[j] = p.ids[i];
          p.meta[j++] = p.meta[i];
        }
      p.len = j;
      if (j === 0) empty.push(term);
    }
    for (const t of empty) {
      this.terms.delete(t);
      this.postingsByTerm.delete(t);
    }
    const keep = (id: number) => alive[id] === 1;
    for (const f of this.facets.values()) {
      f.sorted = null;
      for (const [k, e] of f.strings) {
        e.ids.retain(keep);
        if (e.ids.len === 0) f.strings.delete(k);
      }
      for (const [k, l] of f.numbers) {
        l.retain(keep);
        if (l.len === 0) f.numbers.delete(k);
      }
      f.exists.retain(keep);
      f.nulls.retain(keep);
      f.empties.retain(keep);
    }
    this.deadCount = 0;
  }

  /** Rebuilds postings and facets from the live documents (after a settings change). */
  private rebuild() {
    const docs = this.allDocs();
    this.docs = [];
    this.extIds = [];
    this.idMap.clear();
    this.alive = new Uint8Array(1024);
    this.docLen = new Int32Array(1024);
    this.nextId = 0;
    this.aliveCount = 0;
    this.deadCount = 0;
    this.totalLen = 0;
    this.terms = new SearchableMap<Postings>();
    this.postingsByTerm = new Map();
    this.facets.clear();
    this.topFieldCounts.clear();
    this.rankCache.clear();
    for (const [ext, doc] of docs) this.insert(ext, doc);
  }

  private allDocs(): [string, Doc][] {
    const out: [string, Doc][] = [];
    for (let i = 0; i < this.nextId; i++) if (this.alive[i]) out.push([this.extIds[i], this.docs[i]!]);
    return out;
  }

  /** Documents in storage order (for snapshots). */
  *documents(): Generator<Doc> {
    for (let i = 0; i < this.nextId; i++) if (this.alive[i]) yield this.docs[i]!;
  }

  // -------------------------------------------------------------------------------------
  // writes (called by tasks; throw MeiliError to fail the task)

  addDocuments(docs: Doc[], opts: { primaryKey?: string | null; update?: boolean }): number {
    if (opts.primaryKey && this.primaryKey && opts.primaryKey !== this.primaryKey)
      throw new MeiliError(400, "index_primary_key_already_exists", `Index already has a primary key: \`${this.primaryKey}\`.`);
    let pk = this.primaryKey ?? opts.primaryKey ?? null;
    if (!pk && docs.length > 0) pk = inferPrimaryKey(docs[0]);
    if (!pk) return 0;
    // validate the whole batch first: a bad document fails the task and changes nothing
    const ids = docs.map((d) => docIdOf(d, pk!));
    this.primaryKey = pk;
    for (let i = 0; i < docs.length; i++) {
      const ext = ids[i];
      const old = this.idMap.get(ext);
      let doc = docs[i];
      if (old !== undefined) {
        if (opts.update) doc = { ...this.docs[old]!, ...doc };
        this.removeInternal(old);
      }
      this.insert(ext, doc);
    }
    this.maybeCompact();
    return docs.length;
  }

  deleteByIds(ids: (string | number)[]): number {
    let n = 0;
    for (const raw of ids) {
      const id = this.idMap.get(String(raw));
      if (id !== undefined) {
        this.removeInternal(id);
        n++;
      }
    }
    this.maybeCompact();
    return n;
  }

  deleteByFilter(filter: unknown): number {
    const set = this.evalFilterParam(filter, "invalid_document_filter");
    const ids: string[] = [];
    for (let i = 0; i < this.nextId; i++) if (this.alive[i] && (!set || set[i])) ids.push(this.extIds[i]);
    return this.deleteByIds(ids);
  }

  deleteAll(): number {
    const n = this.aliveCount;
    for (let i = 0; i < this.nextId; i++) if (this.alive[i]) this.removeInternal(i);
    this.maybeCompact(true);
    return n;
  }

  updateSettings(payload: Record<string, unknown>) {
    const changed = applySettings(this.settings, payload);
    this.compileSettings();
    if (changed.has("searchableAttributes")) this.rebuild();
    else if (changed.has("filterableAttributes")) this.rebuildFacets();
  }

  private rebuildFacets() {
    this.facets.clear();
    for (let i = 0; i < this.nextId; i++) if (this.alive[i]) this.facetDoc(i, this.docs[i]!);
  }

  // -------------------------------------------------------------------------------------
  // reads

  getDocument(id: string, fields?: string[]): Doc {
    const n = this.idMap.get(id);
    if (n === undefined) throw documentNotFound(id);
    return this.project(this.docs[n]!, fields);
  }

  getDocuments(q: { offset?: number; limit?: number; fields?: string[]; filter?: unknown; ids?: (string | number)[]; sort?: string[] }) {
    const offset = q.offset ?? 0;
    const limit = q.limit ?? 20;
    const set = this.evalFilterParam(q.filter, "invalid_document_filter");
    let ids: number[];
    if (q.ids?.length) ids = q.ids.map((x) => this.idMap.get(String(x))).filter((x): x is number => x !== undefined);
    else {
      ids = [];
      for (let i = 0; i < this.nextId; i++) if (this.alive[i]) ids.push(i);
    }
    if (set) ids = ids.filter((i) => set[i]);
    if (q.sort?.length) {
      const rules = this.parseSort(q.sort, "invalid_document_sort");
      const keys = rules.map((r) => ids.map((i) => sortKey(this.docs[i]!, r.field, r.asc)));
      const order = ids.map((_, k) => k);
      order.sort((a, b) => {
        for (let r = 0; r < rules.length; r++) {
          const c = compareSortKeys(keys[r][a], keys[r][b], rules[r].asc);
          if (c) return c;
        }
        return ids[a] - ids[b];
      });
      ids = order.map((k) => ids[k]);
    }
    const results = ids.slice(offset, offset + limit).map((i) => this.project(this.docs[i]!, q.fields));
    return { results, offset, limit, total: ids.length };
  }

  stats(isIndexing: boolean) {
    const fieldDistribution: Record<string, number> = {};
    for (const [k, v] of [...this.topFieldCounts].sort((a, b) => (a[0] < b[0] ? -1 : 1))) fieldDistribution[k] = v;
    const rawSize = this.totalLen * 8;
    return {
      numberOfDocuments: this.aliveCount,
      rawDocumentDbSize: rawSize,
      avgDocumentSize: this.aliveCount ? Math.round(rawSize / this.aliveCount) : 0,
      isIndexing,
      numberOfEmbeddings: 0,
      numberOfEmbeddedDocuments: 0,
      fieldDistribution,
    };
  }

  /** Keeps the displayed attributes, then the requested ones (`*` or names, dotted or not). */
  private project(doc: Doc, fields?: string[] | null): Doc {
    const want = fields?.length ? patternMatcher(fields) : null;
    const wantsPrefix = (p: string) => !fields || fields.includes("*") || fields.some((f) => f.startsWith(`${p}.`));
    const pick = (obj: Record<string, unknown>, prefix: string): Doc => {
      const out: Doc = {};
      for (const [k, v] of Object.entries(obj)) {
        const path = prefix ? `${prefix}.${k}` : k;
        const shown = this.isDisplayed(path);
        const requested = !want || want(path);
        if (shown && requested) out[k] = v;
        else if (v && typeof v === "object" && !Array.isArray(v) && wantsPrefix(path)) {
          const sub = pick(v as Record<string, unknown>, path);
          if (Object.keys(sub).length) out[k] = sub;
        } else if (Array.isArray(v) && wantsPrefix(path) && v.some((x) => x && typeof x === "object")) {
          const sub = v.map((x) => (x && typeof x === "object" && !Array.isArray(x) ? pick(x as Record<string, unknown>, path) : x));
          out[k] = sub;
        }
      }
      return out;
    };
    return pick(doc, "");
  }

  // -------------------------------------------------------------------------------------
  // filters

  private notFilterable(fid: Token, source: string, code: string): MeiliError {
    const patterns = this.filterablePatterns().sort();
    const tail = patterns.length
      ? `Available filterable attribute patterns are: \`${patterns.join(", ")}\`.`
      : "This index does not have configured filterable attributes.";
    return bad(
      code,
      FilterSyntaxError.format(`Index \`${this.uid}\`: Attribute \`${fid.value}\` is not filterable. ${tail}`, source, fid.start, fid.end),
    );
  }

  /** Evaluates a `filter` parameter to a set (1 = passes) or null when there is no filter. */
  evalFilterParam(filter: unknown, code = "invalid_search_filter"): Uint8Array | null {
    let parsed: ParsedFilter;
    try {
      parsed = parseFilterParam(filter);
    } catch (e) {
      if (e instanceof FilterSyntaxError || e instanceof FilterTypeError) throw bad(code, e.message);
      throw e;
    }
    if (!parsed) return null;
    for (const { fid, source } of filterFields(parsed)) if (!this.isFilterable(fid.value)) throw this.notFilterable(fid, source, code);
    return this.evalParsed(parsed);
  }

  private evalParsed(f: ParsedFilterNode): Uint8Array {
    const n = this.nextId;
    if ("and" in f) {
      const sets = f.and.map((x) => this.evalParsed(x));
      const out = sets[0];
      for (let s = 1; s < sets.length; s++) for (let i = 0; i < n; i++) out[i] &= sets[s][i];
      return out;
    }
    if ("or" in f) {
      const sets = f.or.map((x) => this.evalParsed(x));
      const out = sets[0];
      for (let s = 1; s < sets.length; s++) for (let i = 0; i < n; i++) out[i] |= sets[s][i];
      return out;
    }
    return this.evalNode(f.node);
  }

  private evalNode(node: FilterNode): Uint8Array {
    const n = this.nextId;
    const out = new Uint8Array(n);
    const mark = (l: IntList | undefined) => {
      if (l) for (let i = 0; i < l.len; i++) out[l.a[i]] = 1;
    };
    switch (node.kind) {
      case "and": {
        const sets = node.nodes.map((x) => this.evalNode(x));
        out.set(sets[0]);
        for (let s = 1; s < sets.length; s++) for (let i = 0; i < n; i++) out[i] &= sets[s][i];
        return out;
      }
      case "or": {
        for (const s of node.nodes.map((x) => this.evalNode(x))) for (let i = 0; i < n; i++) out[i] |= s[i];
        return out;
      }
      case "not": {
        const s = this.evalNode(node.node);
        for (let i = 0; i < n; i++) out[i] = s[i] ^ 1;
        return out;
      }
      case "in": {
        const f = this.facets.get(node.fid.value);
        if (f) for (const v of node.values) this.markEqual(f, v.value, mark);
        return out;
      }
      case "cond": {
        const f = this.facets.get(node.fid.value);
        if (!f) {
          if (node.cond.op === "!=") out.fill(1);
          return out;
        }
        const c = node.cond;
        switch (c.op) {
          case "=":
            this.markEqual(f, c.value.value, mark);
            return out;
          case "!=":
            this.markEqual(f, c.value.value, mark);
            for (let i = 0; i < n; i++) out[i] ^= 1;
            return out;
          case "EXISTS":
            mark(f.exists);
            return out;
          case "NULL":
            mark(f.nulls);
            return out;
          case "EMPTY":
            mark(f.empties);
            return out;
          case "CONTAINS":
          case "STARTS_WITH": {
            const needle = normalizeTerm(c.value.value);
            for (const [k, e] of f.strings) if (c.op === "CONTAINS" ? k.includes(needle) : k.startsWith(needle)) mark(e.ids);
            return out;
          }
          case "TO": {
            const lo = Number(c.from.value);
            const hi = Number(c.to.value);
            for (const [k, l] of f.numbers) if (k >= lo && k <= hi) mark(l);
            return out;
          }
          default: {
            const x = Number(c.value.value);
            if (Number.isNaN(x)) return out;
            const test =
              c.op === ">"
                ? (k: number) => k > x
                : c.op === ">="
                  ? (k: number) => k >= x
                  : c.op === "<"
                    ? (k: number) => k < x
                    : (k: number) => k <= x;
            for (const [k, l] of f.numbers) if (test(k)) mark(l);
            return out;
          }
        }
      }
    }
  }

  private markEqual(f: FacetValues, value: string, mark: (l: IntList | undefined) => void) {
    mark(f.strings.get(normalizeTerm(value.trim()))?.ids);
    if (value.trim() !== "" && !Number.isNaN(Number(value))) mark(f.numbers.get(Number(value)));
  }

  // -------------------------------------------------------------------------------------
  // sort

  private parseSort(sort: string[], code: string): { field: string; asc: boolean }[] {
    const sortable = this.settings.sortableAttributes;
    const isSortable = patternMatcher(sortable);
    return sort.map((s) => {
      const m = /^(.+):(asc|desc)$/.exec(s);
      if (!m)
        throw bad(code, `Invalid syntax for the sort parameter: expected expression ending by \`:asc\` or \`:desc\`, found \`${s}\`.`);
      const field = m[1];
      if (field.startsWith("_geo"))
        throw bad(code, `\`${field.split("(")[0]}\` is a reserved keyword and thus can't be used as a sort expression.`);
      if (!isSortable(field)) {
        const tail = sortable.length
          ? `Available sortable attributes are: \`${[...sortable].sort().join(", ")}\`.`
          : "This index does not have configured sortable attributes.";
        throw bad(code, `Index \`${this.uid}\`: Attribute \`${field}\` is not sortable. ${tail}`);
      }
      return { field, asc: m[2] === "asc" };
    });
  }

  // -------------------------------------------------------------------------------------
  // search

  private ensureScratch() {
    const n = this.nextId;
    if (this.stamp.length >= n) return;
    const cap = Math.max(1024, this.alive.length);
    this.stamp = new Int32Array(cap);
    this.wordMask = new Int32Array(cap);
    this.typos = new Uint8Array(cap);
    this.attr = new Uint8Array(cap);
    this.exactCnt = new Uint8Array(cap);
    this.score = new Float64Array(cap);
    this.slotMark = new Int32Array(cap);
    this.slotTypo = new Uint8Array(cap);
    this.slotExact = new Uint8Array(cap);
    this.altMark = new Int32Array(cap);
    this.altCount = new Uint8Array(cap);
    this.altScore = new Float64Array(cap);
    this.altAttr = new Uint8Array(cap);
    this.epoch = this.slotEpoch = this.altEpoch = 0;
  }

  private maxTypos(term: string): number {
    const t = this.settings.typoTolerance;
    if (!t.enabled || t.disableOnWords.includes(term)) return 0;
    if (t.disableOnNumbers && isNumericTerm(term)) return 0;
    const len = [...term].length;
    return len >= t.minWordSizeForTypos.twoTypos ? 2 : len >= t.minWordSizeForTypos.oneTypo ? 1 : 0;
  }

  /** The dictionary terms a query term stands for: itself, prefix completions, typo neighbours. */
  private derive(term: string, opts: { prefix: boolean; typo: boolean }, match: MatchInfo): Derived[] {
    const out: Derived[] = [];
    const exact = this.terms.get(term);
    if (exact?.len) out.push({ term, postings: exact, typo: 0, weight: 1, exact: true });
    match.set(term, { prefix: 0, postings: null });
    const taken = new Set([term]);
    if (opts.prefix && this.settings.prefixSearch !== "disabled") {
      const found: [string, Postings][] = [];
      for (const [t, p] of this.terms.atPrefix(term)) if (t !== term && p.len) found.push([t, p]);
      // bound the work for very short prefixes: keep the most frequent completions
      found.sort((a, b) => b[1].len - a[1].len);
      let budget = 400_000;
      for (const [t, p] of found.slice(0, 64)) {
        if (budget <= 0) break;
        budget -= p.len;
        taken.add(t);
        out.push({ term: t, postings: p, typo: 0, weight: (0.75 * t.length) / (t.length + 0.3 * (t.length - term.length)), exact: false });
        if (!match.has(t)) match.set(t, { prefix: term.length, postings: p });
      }
    }
    const maxTypos = opts.typo ? this.maxTypos(term) : 0;
    if (maxTypos > 0) {
      const fuzzy = new Map<string, [Postings, number]>(this.terms.fuzzyGet(term, maxTypos));
      // like Meilisearch, a swap of two neighbouring letters is a single typo
      for (let i = 0; i + 1 < term.length; i++) {
        if (term[i] === term[i + 1]) continue;
        const t = term.slice(0, i) + term[i + 1] + term[i] + term.slice(i + 2);
        const p = this.terms.get(t);
        const had = fuzzy.get(t);
        if (p && (!had || had[1] > 1)) fuzzy.set(t, [p, 1]);
      }
      // As in Meilisearch, a typo on the first letter counts as two: a word that does not
      // start with the query word's first letter matches only when two typos are allowed,
      // and only as a one-edit neighbour (which then costs two).
      const first = String.fromCodePoint(term.codePointAt(0)!);
      for (const [t, [p, edits]] of fuzzy) {
        if (edits === 0 || taken.has(t) || !p.len) continue;
        const d = t.startsWith(first) ? edits : edits === 1 ? 2 : Infinity;
        if (d > maxTypos) continue;
        out.push({ term: t, postings: p, typo: d, weight: (0.5 * t.length) / (t.length + d), exact: false });
        match.set(t, { prefix: 0, postings: p });
      }
    }
    return out;
  }

  /** Exact-only alternative for a sequence of terms (synonyms, phrases, designations). */
  private phrase(terms: string[], match: MatchInfo, lastPrefix = false): Alt | null {
    const alt: Alt = [];
    for (let i = 0; i < terms.length; i++) {
      const d = this.derive(terms[i], { prefix: lastPrefix && i === terms.length - 1, typo: false }, match);
      if (d.length === 0) return null;
      alt.push(d);
    }
    return alt;
  }

  private synonymsIndex(): Map<string, string[][]> {
    const out = new Map<string, string[][]>();
    for (const [key, values] of Object.entries(this.settings.synonyms)) {
      const k = partsOf(key).join(" ");
      if (!k) continue;
      const list = out.get(k) ?? [];
      for (const v of values) {
        const p = partsOf(v);
        if (p.length) list.push(p);
      }
      out.set(k, list);
    }
    return out;
  }

  private buildPlan(q: string, match: MatchInfo): { slots: Slot[]; exclude: string[][] } {
    const exclude: string[][] = [];
    type Item = { chunk: Chunk; last: boolean };
    const items: Item[] = [];
    const phrases: string[][] = [];
    // phrases in double quotes, and negative words/phrases with a leading '-'
    const re = /(-?)"([^"]*)"?|(\S+)/g;
    const rawWords: { text: string; neg: boolean; end: number }[] = [];
    for (let m = re.exec(q); m !== null; m = re.exec(q)) {
      if (m[2] !== undefined) {
        const terms = scanChunks(m[2]).flatMap(chunkParts);
        if (m[1]) exclude.push(terms);
        else if (terms.length) phrases.push(terms);
      } else {
        const w = m[3];
        if (w.startsWith("-") && w.length > 1 && /[\p{L}\p{N}]/u.test(w[1])) exclude.push(scanChunks(w.slice(1)).flatMap(chunkParts));
        else rawWords.push({ text: w, neg: false, end: m.index + w.length });
      }
    }
    const endsWithSpace = /\s$/.test(q);
    const stop = new Set(this.settings.stopWords.map((w) => normalizeTerm(w)));
    for (let i = 0; i < rawWords.length; i++) {
      const chunks = scanChunks(rawWords[i].text);
      chunks.forEach((c, j) =>
        items.push({
          chunk: c,
          last: i === rawWords.length - 1 && j === chunks.length - 1 && !endsWithSpace && rawWords[i].end === q.length,
        }),
      );
    }
    let kept = items.filter((it) => !stop.has(it.chunk.term));
    if (kept.length === 0) kept = items;
    kept = kept.slice(0, 10);

    // synonyms: longest key matching whole chunks, over the part-level word sequence
    const syn = this.synonymsIndex();
    const maxKey = Math.max(0, ...[...syn.keys()].map((k) => k.split(" ").length));
    const slots: Slot[] = [];
    for (let i = 0; i < kept.length; ) {
      let used = 0;
      if (syn.size) {
        for (let n = Math.min(kept.length - i, maxKey); n >= 1 && !used; n--) {
          const seq = kept.slice(i, i + n).flatMap((it) => chunkParts(it.chunk));
          const values = syn.get(seq.join(" "));
          if (!values) continue;
          const alts: Alt[] = [];
          const single = n === 1 ? this.chunkAlts(kept[i], match) : null;
          if (single) alts.push(...single);
          else {
            const orig = this.phrase(seq, match);
            if (orig) alts.push(orig);
          }
          for (const v of values) {
            const a = this.phrase(v, match);
            if (a) alts.push(a);
          }
          slots.push({ alts, weight: n, df: 0, maxTypos: single ? this.maxTypos(kept[i].chunk.term) : 0 });
          used = n;
        }
      }
      if (!used) {
        slots.push({ alts: this.chunkAlts(kept[i], match), weight: 1, df: 0, maxTypos: this.maxTypos(kept[i].chunk.term) });
        used = 1;
      }
      i += used;
    }
    for (const p of phrases.slice(0, Math.max(0, 10 - slots.length))) {
      const a = this.phrase(p, match);
      slots.push({ alts: a ? [a] : [], weight: p.length, df: 0, maxTypos: 0 });
    }
    for (const s of slots) s.df = Math.max(0, ...s.alts.map((a) => Math.min(...a.map((d) => d.reduce((x, y) => x + y.postings.len, 0)))));
    return { slots, exclude };
  }

  private chunkAlts(it: { chunk: Chunk; last: boolean }, match: MatchInfo): Alt[] {
    const c = it.chunk;
    const alts: Alt[] = [];
    const whole = this.derive(c.term, { prefix: it.last, typo: true }, match);
    if (whole.length) alts.push([whole]);
    if (c.parts) {
      // the parts of a designation, for text that spells it with spaces ("M12 x 1.5")
      const a = this.phrase(
        c.parts.map((p) => p.term),
        match,
        it.last && !this.terms.has(c.term),
      );
      if (a) alts.push(a);
    }
    return alts;
  }

  search(params: SearchParams): SearchResult {
    const t0 = performance.now();
    const s = this.settings;
    const q = typeof params.q === "string" ? params.q : "";
    const finite = params.page != null || params.hitsPerPage != null;
    const maxTotal = s.pagination.maxTotalHits;
    const hitsPerPage = params.hitsPerPage ?? 20;
    // `page: 0` is processed (totals included) but returns no hits, as in Meilisearch.
    const page = params.page ?? 1;
    const offset = finite ? Math.max(0, page - 1) * hitsPerPage : (params.offset ?? 0);
    const limit = finite ? (page === 0 ? 0 : hitsPerPage) : (params.limit ?? 20);
    const sortRules = params.sort?.length ? this.parseSort(params.sort, "invalid_search_sort") : [];
    if (sortRules.length && !s.rankingRules.includes("sort"))
      throw bad(
        "invalid_search_sort",
        `Index \`${this.uid}\`: You must specify where \`sort\` is listed in the rankingRules setting to use the sort parameter at search time.`,
      );
    const facetNames = this.checkFacets(params.facets);
    const filterSet = this.evalFilterParam(params.filter);
    const strategy = params.matchingStrategy ?? "last";
    const distinctAttr = params.distinct ?? s.distinctAttribute;
    if (params.distinct && !this.isFilterable(params.distinct))
      throw bad(
        "invalid_search_distinct",
        `Index \`${this.uid}\`: Attribute \`${params.distinct}\` is not filterable and thus, cannot be used as distinct attribute.`,
      );
    let searchMask = 0x7fff;
    if (params.attributesToSearchOn && !params.attributesToSearchOn.includes("*")) {
      searchMask = 0;
      for (const a of params.attributesToSearchOn) {
        const sa = s.searchableAttributes;
        if (!sa.includes("*") && !sa.some((x) => a === x || a.startsWith(`${x}.`)))
          throw bad(
            "invalid_search_attributes_to_search_on",
            `Index \`${this.uid}\`: Attribute \`${a}\` is not searchable. Available searchable attributes are: \`${sa.join(", ")}\`.`,
          );
        for (const path of this.fieldOrder)
          if (path === a || path.startsWith(`${a}.`)) searchMask |= 1 << Math.min(Math.max(this.searchRank(path), 0), 14);
      }
    }

    this.ensureScratch();
    const n = this.nextId;
    const match: MatchInfo = new Map();
    const plan = q.trim() ? this.buildPlan(q, match) : null;

    // allowed = alive, passing the filter, holding no excluded term
    let allowed: Uint8Array = this.alive;
    if (filterSet || plan?.exclude.length) {
      allowed = new Uint8Array(n);
      for (let i = 0; i < n; i++) allowed[i] = this.alive[i] & (filterSet ? filterSet[i] : 1);
      for (const ex of plan?.exclude ?? []) {
        const alt = this.phrase(ex, new Map());
        if (!alt) continue;
        const counts = new Uint8Array(n);
        alt.forEach((d) => {
          for (const x of d) for (let i = 0; i < x.postings.len; i++) counts[x.postings.ids[i]]++;
        });
        for (let i = 0; i < n; i++) if (counts[i] >= alt.length) allowed[i] = 0;
      }
    }

    // candidates
    let cand: Int32Array;
    let cn = 0;
    let cWords: Int32Array | null = null;
    let totalWords = 0;
    if (plan?.slots.length) {
      const r = this.accumulate(plan.slots, allowed, searchMask);
      const order = plan.slots.map((_, i) => i);
      if (strategy === "frequency") order.sort((a, b) => plan.slots[a].df - plan.slots[b].df);
      totalWords = plan.slots.reduce((x, sl) => x + sl.weight, 0);
      cand = new Int32Array(r.touched.len);
      cWords = new Int32Array(r.touched.len);
      const all = (1 << plan.slots.length) - 1;
      for (let k = 0; k < r.touched.len; k++) {
        const d = r.touched.a[k];
        const mask = this.wordMask[d];
        let w = 0;
        if (strategy === "all") {
          if ((mask & all) !== all) continue;
          w = totalWords;
        } else {
          for (const sl of order) {
            if (mask & (1 << sl)) w += plan.slots[sl].weight;
            else break;
          }
          if (w === 0) continue;
        }
        cand[cn] = d;
        cWords[cn++] = w;
      }
    } else {
      // placeholder search (or a query of negative words only)
      cand = new Int32Array(n);
      for (let i = 0; i < n; i++) if (allowed[i]) cand[cn++] = i;
    }

    // ranking
    const hasQuery = plan !== null && plan.slots.length > 0;
    const cmp = this.comparator(hasQuery, cWords, sortRules, cand, cn);
    const want = Math.max(0, Math.min(offset + limit, maxTotal));
    let pageIdx: number[];
    let total = cn;
    if (distinctAttr) {
      const all = Array.from({ length: cn }, (_, i) => i);
      if (cmp) all.sort(cmp);
      const seen = new Set<string>();
      const kept: number[] = [];
      for (const i of all) {
        const vals = valuesAt(this.docs[cand[i]], distinctAttr);
        const key = vals.length ? JSON.stringify(vals[0]) : `\u0000${cand[i]}`;
        if (seen.has(key)) continue;
        seen.add(key);
        kept.push(i);
      }
      total = kept.length;
      pageIdx = kept.slice(offset, want);
    } else if (!cmp) {
      pageIdx = [];
      for (let i = offset; i < Math.min(cn, want); i++) pageIdx.push(i);
    } else {
      pageIdx = topK(cn, want, cmp).slice(offset);
    }

    // facets over every candidate
    let facetDistribution: Record<string, Record<string, number>> | undefined;
    let facetStats: Record<string, { min: number; max: number }> | undefined;
    if (facetNames) ({ facetDistribution, facetStats } = this.facetCounts(facetNames, cand, cn));

    const maxTypoCount = plan ? plan.slots.reduce((x, sl) => x + sl.maxTypos, 0) : 0;
    const hits = pageIdx.map((i) =>
      this.formatHit(cand[i], params, match, hasQuery ? { words: cWords![i], totalWords, maxTypoCount } : null, sortRules),
    );
    if (params.rankingScoreThreshold != null) {
      // keep the hits at or above the threshold (the page only; total is an estimate)
      for (let i = hits.length - 1; i >= 0; i--)
        if (((hits[i]._rankingScore as number) ?? 1) < params.rankingScoreThreshold) hits.splice(i, 1);
      if (!params.showRankingScore) for (const h of hits) delete h._rankingScore;
    }
    const processingTimeMs = Math.round(performance.now() - t0);
    const shownTotal = Math.min(total, maxTotal);
    const out: SearchResult = finite
      ? {
          hits,
          query: q,
          processingTimeMs,
          hitsPerPage,
          page,
          totalPages: hitsPerPage ? Math.ceil(shownTotal / hitsPerPage) : 0,
          totalHits: shownTotal,
        }
      : { hits, query: q, processingTimeMs, limit, offset, estimatedTotalHits: total };
    if (facetDistribution) out.facetDistribution = facetDistribution;
    if (facetStats && Object.keys(facetStats).length) out.facetStats = facetStats;
    return out;
  }

  /** Fills the per-document arrays for every slot; returns the documents touched. */
  private accumulate(slots: Slot[], allowed: Uint8Array, searchMask: number) {
    const touched = new IntList(256);
    const ep = ++this.epoch;
    const N = Math.max(1, this.aliveCount);
    const avgLen = this.aliveCount ? this.totalLen / this.aliveCount : 1;
    const { stamp, wordMask, typos, attr, exactCnt, score, slotMark, slotTypo, slotExact, altMark, altCount, altScore, altAttr, docLen } =
      this;
    const restrict = searchMask !== 0x7fff;

    for (let si = 0; si < slots.length; si++) {
      const slot = slots[si];
      const sep = ++this.slotEpoch;
      const slotDocs = new IntList(64);
      const markSlot = (d: number, typo: number, exact: boolean, sc: number, at: number) => {
        if (stamp[d] !== ep) {
          stamp[d] = ep;
          wordMask[d] = 0;
          typos[d] = 0;
          attr[d] = 255;
          exactCnt[d] = 0;
          score[d] = 0;
          touched.push(d);
        }
        if (slotMark[d] !== sep) {
          slotMark[d] = sep;
          slotTypo[d] = typo;
          slotExact[d] = exact ? 1 : 0;
          slotDocs.push(d);
        } else {
          if (typo < slotTypo[d]) slotTypo[d] = typo;
          if (exact) slotExact[d] = 1;
        }
        score[d] += sc;
        if (at < attr[d]) attr[d] = at;
      };
      for (const alt of slot.alts) {
        if (alt.length === 1) {
          for (const dv of alt[0]) {
            const p = dv.postings;
            const idf = Math.log(1 + (N - p.len + 0.5) / (p.len + 0.5));
            const { ids, meta } = p;
            for (let i = 0; i < p.len; i++) {
              const d = ids[i];
              if (!allowed[d]) continue;
              const m = meta[i];
              const fm = m >>> 16;
              if (restrict && !(fm & searchMask)) continue;
              const tf = m & 0xffff;
              const sc = dv.weight * idf * ((tf * (K1 + 1)) / (tf + K1 * (1 - B + (B * docLen[d]) / avgLen)));
              markSlot(d, dv.typo, dv.exact, sc, 31 - Math.clz32(fm & -fm));
            }
          }
          continue;
        }
        // every term of the alternative must be present: count, rarest term first
        const aep = ++this.altEpoch;
        const order = alt.map((ds, j) => ({ ds, j, len: ds.reduce((x, y) => x + y.postings.len, 0) })).sort((a, b) => a.len - b.len);
        const altDocs = new IntList(64);
        order.forEach(({ ds }, j) => {
          for (const dv of ds) {
            const p = dv.postings;
            const idf = Math.log(1 + (N - p.len + 0.5) / (p.len + 0.5));
            const { ids, meta } = p;
            for (let i = 0; i < p.len; i++) {
              const d = ids[i];
              if (!allowed[d]) continue;
              const m = meta[i];
              const fm = m >>> 16;
              if (restrict && !(fm & searchMask)) continue;
              if (altMark[d] !== aep) {
                if (j !== 0) continue;
                altMark[d] = aep;
                altCount[d] = 0;
                altScore[d] = 0;
                altAttr[d] = 255;
                altDocs.push(d);
              }
              if (altCount[d] !== j) continue;
              altCount[d] = j + 1;
              const tf = m & 0xffff;
              altScore[d] += dv.weight * idf * ((tf * (K1 + 1)) / (tf + K1 * (1 - B + (B * docLen[d]) / avgLen)));
              const at = 31 - Math.clz32(fm & -fm);
              if (at < altAttr[d]) altAttr[d] = at;
            }
          }
        });
        for (let k = 0; k < altDocs.len; k++) {
          const d = altDocs.a[k];
          if (altCount[d] === alt.length) markSlot(d, 0, true, altScore[d], altAttr[d]);
        }
      }
      for (let k = 0; k < slotDocs.len; k++) {
        const d = slotDocs.a[k];
        wordMask[d] |= 1 << si;
        typos[d] += slotTypo[d];
        exactCnt[d] += slotExact[d];
      }
    }
    return { touched };
  }

  /** Orders candidate positions by the ranking rules; null when storage order is the answer. */
  private comparator(
    hasQuery: boolean,
    cWords: Int32Array | null,
    sortRules: { field: string; asc: boolean }[],
    cand: Int32Array,
    cn: number,
  ): ((a: number, b: number) => number) | null {
    const parts: ((a: number, b: number) => number)[] = [];
    const sortKeys = (field: string, asc: boolean) => {
      // A top-level number in every candidate (a custom rule such as `kindWeight:desc`, applied
      // to every query): compared from a typed array, without a key object per candidate.
      if (!field.includes(".")) {
        const nums = new Float64Array(cn);
        let i = 0;
        for (; i < cn; i++) {
          const v = this.docs[cand[i]]![field];
          if (typeof v !== "number") break;
          nums[i] = v;
        }
        if (i === cn) return asc ? (a: number, b: number) => nums[a] - nums[b] : (a: number, b: number) => nums[b] - nums[a];
      }
      const keys: SortValue[] = new Array(cn);
      for (let i = 0; i < cn; i++) keys[i] = sortKey(this.docs[cand[i]]!, field, asc);
      return (a: number, b: number) => compareSortKeys(keys[a], keys[b], asc);
    };
    const { typos, attr, exactCnt, score } = this;
    for (const rule of this.settings.rankingRules) {
      if (hasQuery && rule === "words") parts.push((a, b) => cWords![b] - cWords![a]);
      else if (hasQuery && rule === "typo") parts.push((a, b) => typos[cand[a]] - typos[cand[b]]);
      else if (hasQuery && (rule === "attribute" || rule === "attributeRank")) parts.push((a, b) => attr[cand[a]] - attr[cand[b]]);
      else if (hasQuery && rule === "exactness") parts.push((a, b) => exactCnt[cand[b]] - exactCnt[cand[a]]);
      else if (rule === "sort") for (const r of sortRules) parts.push(sortKeys(r.field, r.asc));
      else {
        const m = /^(.+):(asc|desc)$/.exec(rule);
        if (m) parts.push(sortKeys(m[1], m[2] === "asc"));
      }
    }
    if (hasQuery) parts.push((a, b) => score[cand[b]] - score[cand[a]]);
    if (parts.length === 0) return null;
    return (a, b) => {
      for (const p of parts) {
        const c = p(a, b);
        if (c) return c;
      }
      return cand[a] - cand[b];
    };
  }

  private checkFacets(facets?: string[]): string[] | null {
    if (!facets) return null;
    if (facets.includes("*")) return [...this.facets.keys()].sort();
    const bad_ = facets.filter((f) => !this.isFilterable(f));
    if (bad_.length) {
      const patterns = this.filterablePatterns().sort();
      const what =
        bad_.length === 1 ? `Attribute \`${bad_[0]}\` is not filterable.` : `Attributes \`${bad_.join(", ")}\` are not filterable.`;
      const tail = patterns.length
        ? `Available filterable attributes patterns are: \`${patterns.join(", ")}\`.`
        : "This index does not have configured filterable attributes.";
      throw bad("invalid_search_facets", `Invalid facet distribution: ${what} ${tail}`);
    }
    return facets;
  }

  private facetCounts(names: string[], cand: Int32Array, cn: number) {
    const inSet = new Uint8Array(this.nextId);
    for (let i = 0; i < cn; i++) inSet[cand[i]] = 1;
    const facetDistribution: Record<string, Record<string, number>> = {};
    const facetStats: Record<string, { min: number; max: number }> = {};
    const { maxValuesPerFacet, sortFacetValuesBy } = this.settings.faceting;
    const count = (l: IntList) => {
      let c = 0;
      const a = l.a;
      for (let i = 0; i < l.len; i++) c += inSet[a[i]];
      return c;
    };
    for (const name of names) {
      const dist: Record<string, number> = {};
      facetDistribution[name] = dist;
      const f = this.facets.get(name);
      if (!f) continue;
      if (!f.sorted) {
        f.sorted = [
          ...[...f.strings].map(([key, e]) => ({ value: e.orig, key, ids: e.ids })),
          ...[...f.numbers].map(([num, ids]) => ({ value: String(num), key: String(num), ids })),
        ].sort((a, b) => (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
      }
      const by = sortFacetValuesBy[name] ?? sortFacetValuesBy["*"] ?? "alpha";
      if (by === "alpha") {
        // values are kept sorted: stop at the first maxValuesPerFacet present among the candidates
        let kept = 0;
        for (const v of f.sorted) {
          if (kept >= maxValuesPerFacet) break;
          const c = count(v.ids);
          if (c) {
            dist[v.value] = c;
            kept++;
          }
        }
      } else {
        const counted = f.sorted.map((v) => [v.value, count(v.ids)] as const).filter(([, c]) => c > 0);
        counted.sort((a, b) => b[1] - a[1]);
        for (const [v, c] of counted.slice(0, maxValuesPerFacet)) dist[v] = c;
      }
      let min = Infinity;
      let max = -Infinity;
      for (const [num, l] of f.numbers)
        if (count(l)) {
          if (num < min) min = num;
          if (num > max) max = num;
        }
      if (min !== Infinity) facetStats[name] = { min, max };
    }
    return { facetDistribution, facetStats };
  }

  facetSearch(body: {
    facetName?: string;
    facetQuery?: string;
    q?: string;
    filter?: unknown;
    matchingStrategy?: "last" | "all" | "frequency";
  }) {
    const t0 = performance.now();
    if (typeof body.facetName !== "string") throw bad("missing_facet_search_facet_name", "Missing field `facetName`");
    if (!this.isFilterable(body.facetName)) {
      const patterns = this.filterablePatterns().sort();
      throw bad(
        "invalid_facet_search_facet_name",
        `Attribute \`${body.facetName}\` is not facet-searchable. ${patterns.length ? `Available facet-searchable attributes patterns are: \`${patterns.join(", ")}\`.` : "This index does not have configured facet-searchable attributes."}`,
      );
    }
    const r = this.search({
      q: body.q ?? "",
      filter: body.filter,
      facets: [body.facetName],
      limit: 0,
      matchingStrategy: body.matchingStrategy,
    });
    const dist = (r.facetDistribution as Record<string, Record<string, number>>)[body.facetName] ?? {};
    const fq = body.facetQuery ? normalizeTerm(body.facetQuery) : "";
    const facetHits = Object.entries(dist)
      .filter(
        ([v]) =>
          !fq ||
          normalizeTerm(v)
            .split(/\s+/)
            .some((w) => w.startsWith(fq)) ||
          normalizeTerm(v).startsWith(fq),
      )
      .map(([value, count]) => ({ value, count }));
    return { facetHits, facetQuery: body.facetQuery ?? null, processingTimeMs: Math.round(performance.now() - t0) };
  }

  // -------------------------------------------------------------------------------------
  // hit formatting (only for the returned page)

  private formatHit(id: number, p: SearchParams, match: MatchInfo, rank: Rank | null, sortRules: { field: string; asc: boolean }[]): Doc {
    const doc = this.docs[id]!;
    const hit = this.project(doc, p.attributesToRetrieve);
    // the query's own words, and the derived words (prefix, typo) this document holds
    const hitMatch: HitMatch = new Map();
    for (const [t, info] of match) if (!info.postings || hasDoc(info.postings, id)) hitMatch.set(t, info.prefix);
    const hl = p.attributesToHighlight ?? [];
    const cropList = p.attributesToCrop ?? [];
    const cropLength = p.cropLength ?? 10;
    const cropFor = new Map<string, number>();
    for (const c of cropList) {
      const m = /^(.*):(\d+)$/.exec(c);
      cropFor.set(m ? m[1] : c, m ? Number(m[2]) : cropLength);
    }
    const isHl = patternMatcher(hl);
    const cropPatterns = [...cropFor.keys()];
    const isCrop = patternMatcher(cropPatterns);
    const cropLen = (path: string) => {
      if (cropFor.has(path)) return cropFor.get(path)!;
      for (const [k, v] of cropFor) if (k === "*" || path.startsWith(`${k}.`)) return v;
      return cropLength;
    };
    if (hl.length || cropList.length) {
      const fields = [...(p.attributesToRetrieve ?? ["*"]), ...hl, ...cropPatterns];
      const base = this.project(doc, fields);
      const pre = p.highlightPreTag ?? "<em>";
      const post = p.highlightPostTag ?? "</em>";
      const marker = p.cropMarker ?? "…";
      const fmt = (v: unknown, path: string): unknown => {
        if (Array.isArray(v)) return v.map((x) => fmt(x, path));
        if (v && typeof v === "object") {
          const o: Doc = {};
          for (const [k, x] of Object.entries(v)) o[k] = fmt(x, `${path}.${k}`);
          return o;
        }
        const h = hl.length > 0 && isHl(path);
        const c = cropList.length > 0 && isCrop(path);
        if (!h && !c) return v;
        if (typeof v === "number") return String(v);
        if (typeof v !== "string") return v;
        return formatText(v, hitMatch, h ? [pre, post] : null, c ? { length: cropLen(path), marker } : null);
      };
      const formatted: Doc = {};
      let any = false;
      for (const [k, v] of Object.entries(base)) {
        formatted[k] = fmt(v, k);
        any = true;
      }
      const touchesDisplayed = [...hl, ...cropPatterns].some(
        (a) => a === "*" || this.fieldOrder.some((f) => (f === a || f.startsWith(`${a}.`)) && this.isDisplayed(f)),
      );
      if (any && touchesDisplayed) hit._formatted = formatted;
    }
    if (p.showMatchesPosition) {
      const positions: Record<string, { start: number; length: number }[]> = {};
      flatten(this.project(doc, null), "", (path, v) => {
        if (typeof v !== "string" && typeof v !== "number") return;
        const spans = matchSpans(String(v), hitMatch);
        if (spans.length) positions[path] = [...(positions[path] ?? []), ...spans.map(([s, e]) => ({ start: s, length: e - s }))];
      });
      hit._matchesPosition = positions;
    }
    if (p.showRankingScore || p.rankingScoreThreshold != null) {
      let sc = 1;
      if (rank?.totalWords) {
        const typoPart = 1 - this.typos[id] / (2 * rank.totalWords + 1);
        const attrPart = 1 - Math.min(this.attr[id], 15) / 32;
        sc = (rank.words / rank.totalWords) * (0.7 + 0.15 * typoPart + 0.15 * attrPart);
      }
      hit._rankingScore = Math.round(sc * 1e6) / 1e6;
    }
    if (p.showRankingScoreDetails) hit._rankingScoreDetails = this.rankingDetails(id, rank, sortRules);
    return hit;
  }

  /**
   * What each ranking rule the fake applies made of this hit, keyed by rule and numbered by
   * the rule's place in `rankingRules`, in the words of Meilisearch's `_rankingScoreDetails`.
   * The fake has no proximity rule, so none is reported. Its attribute rule ranks by the
   * first searchable attribute holding a query word only (not by the word's position), and
   * its exactness rule counts the query words matched without typo or completion (it does not
   * detect an attribute equal to the query): those parts are said as such.
   */
  private rankingDetails(id: number, rank: Rank | null, sortRules: { field: string; asc: boolean }[]): Record<string, unknown> {
    const out: Record<string, unknown> = {};
    const doc = this.docs[id]!;
    const sa = this.settings.searchableAttributes;
    const attrCount = Math.max(1, Math.min(15, sa.includes("*") ? this.fieldOrder.length : sa.length));
    const round = (x: number) => Math.round(x * 1e6) / 1e6;
    const firstValue = (field: string) => valuesAt(doc, field)[0] ?? null;
    this.settings.rankingRules.forEach((rule, order) => {
      if (rank && rule === "words") {
        out.words = { order, matchingWords: rank.words, maxMatchingWords: rank.totalWords, score: round(rank.words / rank.totalWords) };
      } else if (rank && rule === "typo") {
        const typoCount = Math.min(this.typos[id], rank.maxTypoCount);
        out.typo = {
          order,
          typoCount,
          maxTypoCount: rank.maxTypoCount,
          score: round((rank.maxTypoCount + 1 - typoCount) / (rank.maxTypoCount + 1)),
        };
      } else if (rank && (rule === "attribute" || rule === "attributeRank")) {
        const orderScore = round(1 - Math.min(this.attr[id], attrCount - 1) / attrCount);
        out[rule] = { order, attributeRankingOrderScore: orderScore, queryWordDistanceScore: 1, score: orderScore };
      } else if (rank && rule === "exactness") {
        const exact = Math.min(this.exactCnt[id], rank.totalWords);
        out.exactness = {
          order,
          matchType: "noExactMatch",
          matchingWords: exact,
          maxMatchingWords: rank.totalWords,
          score: round(exact / rank.totalWords),
        };
      } else if (rule === "sort") {
        for (const r of sortRules) out[`${r.field}:${r.asc ? "asc" : "desc"}`] = { order, value: firstValue(r.field) };
      } else {
        const m = /^(.+):(asc|desc)$/.exec(rule);
        if (m) out[rule] = { order, value: firstValue(m[1]) };
      }
    });
    return out;
  }
}

// ---------------------------------------------------------------------------------------
// helpers

/** Whether a posting list holds a document (binary search; ids are increasing). */
function hasDoc(p: Postings, id: number): boolean {
  let lo = 0;
  let hi = p.len - 1;
  while (lo <= hi) {
    const m = (lo + hi) >> 1;
    const v = p.ids[m];
    if (v === id) return true;
    if (v < id) lo = m + 1;
    else hi = m - 1;
  }
  return false;
}

function chunkParts(c: Chunk): string[] {
  return c.parts ? c.parts.map((p) => p.term) : [c.term];
}

function partsOf(text: string): string[] {
  return scanChunks(text).flatMap(chunkParts);
}

type SortValue = { t: 0 | 1 | 2; n: number; s: string };

function sortKey(doc: Doc, field: string, asc: boolean): SortValue {
  const vals = valuesAt(doc, field).flatMap((v) => (Array.isArray(v) ? v : [v]));
  let best: SortValue = { t: 2, n: 0, s: "" };
  for (const v of vals) {
    let k: SortValue | null = null;
    if (typeof v === "number") k = { t: 0, n: v, s: "" };
    else if (typeof v === "string") k = { t: 1, n: 0, s: normalizeTerm(v) };
    else if (typeof v === "boolean") k = { t: 1, n: 0, s: String(v) };
    if (!k) continue;
    if (best.t === 2 || compareSortKeys(k, best, asc) < 0) best = k;
  }
  return best;
}

/** Numbers before strings, missing values last, in both directions. */
function compareSortKeys(a: SortValue, b: SortValue, asc: boolean): number {
  if (a.t !== b.t) return a.t - b.t;
  if (a.t === 2) return 0;
  const c = a.t === 0 ? a.n - b.n : a.s < b.s ? -1 : a.s > b.s ? 1 : 0;
  return asc ? c : -c;
}

/** Indices 0..n-1 of the k best items by cmp, best first (a bounded max-heap). */
function topK(n: number, k: number, cmp: (a: number, b: number) => number): number[] {
  if (k <= 0) return [];
  const heap: number[] = [];
  const up = (i: number) => {
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (cmp(heap[i], heap[p]) <= 0) break;
      [heap[i], heap[p]] = [heap[p], heap[i]];
      i = p;
    }
  };
  const down = (i: number) => {
    for (;;) {
      const l = 2 * i + 1;
      const r = l + 1;
      let m = i;
      if (l < heap.length && cmp(heap[l], heap[m]) > 0) m = l;
      if (r < heap.length && cmp(heap[r], heap[m]) > 0) m = r;
      if (m === i) return;
      [heap[i], heap[m]] = [heap[m], heap[i]];
      i = m;
    }
  };
  for (let i = 0; i < n; i++) {
    if (heap.length < k) {
      heap.push(i);
      up(heap.length - 1);
    } else if (cmp(i, heap[0]) < 0) {
      heap[0] = i;
      down(0);
    }
  }
  return heap.sort(cmp);
}
