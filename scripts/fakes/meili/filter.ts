/**
 * Parser for Meilisearch filter expressions, following the grammar of Meilisearch's own
 * filter parser (crates/filter-parser) closely enough that malformed filters produce the
 * same diagnostics: a first line describing the problem and a second line
 * `<start>:<end> <filter>` pointing at the offending characters (1-based columns).
 *
 *   expression = or
 *   or         = and ("OR" and)*
 *   and        = not ("AND" not)*
 *   not        = "NOT" not | primary
 *   primary    = "(" expression ")" | value "IN" "[" values "]" | value "NOT" "IN" "[" values "]"
 *              | value ("=" | "!=" | ">" | ">=" | "<" | "<=") value | value "IS" ["NOT"] ("NULL" | "EMPTY")
 *              | value ["NOT"] "EXISTS" | value value "TO" value
 *              | value ["NOT"] "CONTAINS" value | value ["NOT"] "STARTS" "WITH" value
 *   value      = word | 'single quoted' | "double quoted"      (word = letters, digits, _ - .)
 *
 * Keywords (AND OR IN NOT TO EXISTS IS NULL EMPTY CONTAINS STARTS WITH) must be quoted to be
 * used as names or values. The geo operators are not supported by the fake.
 */

export type Token = { value: string; start: number; end: number };

export type Condition =
  | { op: "=" | "!=" | ">" | ">=" | "<" | "<="; value: Token }
  | { op: "TO"; from: Token; to: Token }
  | { op: "EXISTS" | "NULL" | "EMPTY" }
  | { op: "CONTAINS" | "STARTS_WITH"; value: Token };

export type FilterNode =
  | { kind: "cond"; fid: Token; cond: Condition }
  | { kind: "in"; fid: Token; values: Token[] }
  | { kind: "not"; node: FilterNode }
  | { kind: "and"; nodes: FilterNode[] }
  | { kind: "or"; nodes: FilterNode[] };

const OPERATIONS =
  "`=`, `!=`, `>=`, `>`, `<=`, `<`, `IN`, `NOT IN`, `TO`, `EXISTS`, `NOT EXISTS`, `IS NULL`, `IS NOT NULL`, `IS EMPTY`, `IS NOT EMPTY`, `CONTAINS`, `NOT CONTAINS`, `STARTS WITH`, `NOT STARTS WITH`, `_geoRadius`, or `_geoBoundingBox`";
const KEYWORDS = new Set([
  "AND",
  "OR",
  "IN",
  "NOT",
  "TO",
  "EXISTS",
  "IS",
  "NULL",
  "EMPTY",
  "CONTAINS",
  "STARTS",
  "WITH",
  "_geoRadius",
  "_geoBoundingBox",
]);
const MAX_DEPTH = 200;

const isValueChar = (c: string) => /[\p{L}\p{N}_\-.]/u.test(c);
const isSyntaxChar = (c: string) => /\s/.test(c) || "()=<>!".includes(c);
const isWs = (c: string | undefined) => c !== undefined && /\s/.test(c);

/** Rust's `str::escape_debug`, which the real messages use to quote input. */
function escapeDebug(s: string): string {
  return s.replace(
    /[\\'"\n\r\t\0]/g,
    (c) => ({ "\\": "\\\\", "'": "\\'", '"': '\\"', "\n": "\\n", "\r": "\\r", "\t": "\\t", "\0": "\\0" })[c]!,
  );
}

/** A parse error: `message` is the diagnostic line, [start, end) the context in the input. */
export class FilterSyntaxError extends Error {
  constructor(
    readonly diagnostic: string,
    readonly input: string,
    readonly start: number,
    readonly end: number,
  ) {
    super(FilterSyntaxError.format(diagnostic, input, start, end));
  }

  static format(diagnostic: string, input: string, start: number, end: number) {
    // columns count characters, not UTF-16 units
    const col = [...input.slice(0, start)].length + 1;
    const size = [...input.slice(start, end)].length;
    return `${diagnostic}\n${col}:${col + size} ${input}`;
  }
}

type Kind =
  | { k: "ExpectedValue"; reserved: boolean }
  | { k: "InvalidPrimary" }
  | { k: "ExpectedEof" }
  | { k: "MissingClosingDelimiter"; c: string }
  | { k: "InOpeningBracket" }
  | { k: "InClosingBracket" }
  | { k: "InExpectedValue"; reserved: boolean }
  | { k: "ReservedKeyword"; word: string }
  | { k: "DepthLimitReached" }
  | { k: "Internal" };

/** nom's two error flavours: `Error` lets an alternative be tried, `Failure` stops parsing. */
class PErr {
  constructor(
    readonly kind: Kind,
    readonly start: number,
    readonly end: number,
    readonly failure: boolean,
  ) {}
}

type R<T> = { v: T; pos: number };

class Parser {
  constructor(readonly s: string) {}

  err(kind: Kind, start: number, end = this.s.length, failure = false) {
    return new PErr(kind, start, end, failure);
  }

  skipWs(pos: number) {
    while (pos < this.s.length && isWs(this.s[pos])) pos++;
    return pos;
  }

  /** A run of value characters, as an exact keyword (`word_exact`); no whitespace handling. */
  wordExact(pos: number, tag: string): number | null {
    let end = pos;
    while (end < this.s.length && isValueChar(this.s[end])) end++;
    return end > pos && this.s.slice(pos, end) === tag ? end : null;
  }

  /** ws(word_exact(tag)): optional whitespace around an exact keyword. */
  keyword(pos: number, tag: string): number | null {
    const end = this.wordExact(this.skipWs(pos), tag);
    return end === null ? null : this.skipWs(end);
  }

  quoted(pos: number, q: string): R<Token> {
    // pos is just after the opening quote
    let i = pos;
    let out = "";
    while (i < this.s.length) {
      const c = this.s[i];
      if (c === q) return { v: { value: out, start: pos, end: i }, pos: i + 1 };
      if (c === "\\") {
        const n = this.s[i + 1];
        if (n === undefined) throw this.err({ k: "MissingClosingDelimiter", c: q }, pos - 1, this.s.length, true);
        out += n === q || n === "\\" ? n : n === "n" ? "\n" : n === "t" ? "\t" : n === "r" ? "\r" : `\\${n}`;
        i += 2;
        continue;
      }
      out += c;
      i++;
    }
    throw this.err({ k: "MissingClosingDelimiter", c: q }, pos - 1, this.s.length, true);
  }

  /** value = WS* (word | 'quoted' | "quoted") WS* */
  value(pos0: number): R<Token> {
    const pos = this.skipWs(pos0);
    const c = this.s[pos];
    let tok: R<Token>;
    if (c === "'" || c === '"') {
      tok = this.quoted(pos + 1, c);
    } else {
      let end = pos;
      while (end < this.s.length && isValueChar(this.s[end])) end++;
      // the context of a missing value is the longest run free of filter syntax
      let e = pos;
      while (e < this.s.length && !isSyntaxChar(this.s[e])) e++;
      if (end === pos) throw this.err({ k: "ExpectedValue", reserved: false }, pos, e);
      const word = this.s.slice(pos, end);
      if (KEYWORDS.has(word)) throw this.err({ k: "ExpectedValue", reserved: true }, pos, e);
      tok = { v: { value: word, start: pos, end }, pos: end };
    }
    return { v: tok.v, pos: this.skipWs(tok.pos) };
  }

  /** Runs `f`; a recoverable error becomes null, a failure propagates. */
  attempt<T>(f: () => T): T | PErr {
    try {
      return f();
    } catch (e) {
      if (e instanceof PErr && !e.failure) return e;
      throw e;
    }
  }

  /** cut(): turn a recoverable error into a failure. */
  cut<T>(f: () => T): T {
    try {
      return f();
    } catch (e) {
      if (e instanceof PErr && !e.failure) throw new PErr(e.kind, e.start, e.end, true);
      throw e;
    }
  }

  valueList(pos: number): R<Token[]> {
    const first = this.attempt(() => this.value(pos));
    if (first instanceof PErr) return { v: [], pos };
    const values = [first.v];
    pos = first.pos;
    for (;;) {
      const comma = this.skipWs(pos);
      if (this.s[comma] !== ",") break;
      const next = this.attempt(() => this.value(this.skipWs(comma + 1)));
      if (next instanceof PErr) break;
      values.push(next.v);
      pos = next.pos;
    }
    const comma = this.skipWs(pos);
    if (this.s[comma] === ",") pos = this.skipWs(comma + 1);
    return { v: values, pos };
  }

  /** "IN" WS* "[" value_list "]"; everything after IN is a failure. */
  inBody(pos: number): R<Token[]> {
    const afterIn = this.keyword(pos, "IN");
    if (afterIn === null) throw this.err({ k: "Internal" }, pos);
    if (this.s[afterIn] !== "[") throw this.err({ k: "InOpeningBracket" }, afterIn, this.s.length, true);
    const list = this.cut(() => this.valueList(afterIn + 1));
    const close = this.skipWs(list.pos);
    if (this.s[close] !== "]") {
      if (list.pos >= this.s.length) throw this.err({ k: "InClosingBracket" }, list.pos, this.s.length, true);
      throw this.err({ k: "InExpectedValue", reserved: false }, list.pos, this.s.length, true);
    }
    return { v: list.v, pos: this.skipWs(close + 1) };
  }

  parseIn(pos: number): R<FilterNode> {
    const fid = this.value(pos);
    const body = this.inBody(fid.pos);
    return { v: { kind: "in", fid: fid.v, values: body.v }, pos: body.pos };
  }

  parseNotIn(pos: number): R<FilterNode> {
    const fid = this.value(pos);
    const afterNot = this.wordExact(fid.pos, "NOT");
    if (afterNot === null) throw this.err({ k: "Internal" }, pos);
    const body = this.inBody(afterNot);
    return { v: { kind: "not", node: { kind: "in", fid: fid.v, values: body.v } }, pos: body.pos };
  }

  parseCondition(pos: number): R<FilterNode> {
    const fid = this.value(pos);
    const ops = ["<=", ">=", "!=", "<", ">", "="] as const;
    const op = ops.find((o) => this.s.startsWith(o, fid.pos));
    if (!op) throw this.err({ k: "Internal" }, pos);
    const value = this.cut(() => this.value(fid.pos + op.length));
    return { v: { kind: "cond", fid: fid.v, cond: { op, value: value.v } }, pos: value.pos };
  }

  /** value followed by the given keywords (each separated by whitespace). */
  suffixWords(pos: number, words: string[]): R<Token> {
    const fid = this.value(pos);
    let p = fid.pos;
    for (let i = 0; i < words.length; i++) {
      const end = this.wordExact(p, words[i]);
      if (end === null) throw this.err({ k: "Internal" }, pos);
      p = i < words.length - 1 ? (isWs(this.s[end]) ? this.skipWs(end) : -1) : this.skipWs(end);
      if (p < 0) throw this.err({ k: "Internal" }, pos);
    }
    return { v: fid.v, pos: p };
  }

  parseUnary(pos: number, words: string[], op: "EXISTS" | "NULL" | "EMPTY", negate: boolean): R<FilterNode> {
    const r = this.suffixWords(pos, words);
    const node: FilterNode = { kind: "cond", fid: r.v, cond: { op } };
    return { v: negate ? { kind: "not", node } : node, pos: r.pos };
  }

  parseTextOp(pos: number, words: string[], op: "CONTAINS" | "STARTS_WITH", negate: boolean): R<FilterNode> {
    const r = this.suffixWords(pos, words);
    const value = this.cut(() => this.value(r.pos));
    const node: FilterNode = { kind: "cond", fid: r.v, cond: { op, value: value.v } };
    return { v: negate ? { kind: "not", node } : node, pos: value.pos };
  }

  parseTo(pos: number): R<FilterNode> {
    const fid = this.value(pos);
    const from = this.value(fid.pos);
    const afterTo = this.wordExact(from.pos, "TO");
    if (afterTo === null || !isWs(this.s[afterTo])) throw this.err({ k: "Internal" }, pos);
    const to = this.cut(() => this.value(afterTo));
    return { v: { kind: "cond", fid: fid.v, cond: { op: "TO", from: from.v, to: to.v } }, pos: to.pos };
  }

  primary(pos: number, depth: number): R<FilterNode> {
    if (depth > MAX_DEPTH) throw this.err({ k: "DepthLimitReached" }, pos);
    const open = this.skipWs(pos);
    if (this.s[open] === "(") {
      const inner = this.cut(() => this.expression(this.skipWs(open + 1), depth + 1));
      const close = this.skipWs(inner.pos);
      if (this.s[close] !== ")") throw this.err({ k: "MissingClosingDelimiter", c: ")" }, pos, this.s.length, true);
      return { v: inner.v, pos: this.skipWs(close + 1) };
    }
    const alternatives: (() => R<FilterNode>)[] = [
      () => this.parseIn(pos),
      () => this.parseNotIn(pos),
      () => this.parseCondition(pos),
      () => this.parseUnary(pos, ["IS", "NULL"], "NULL", false),
      () => this.parseUnary(pos, ["IS", "NOT", "NULL"], "NULL", true),
      () => this.parseUnary(pos, ["IS", "EMPTY"], "EMPTY", false),
      () => this.parseUnary(pos, ["IS", "NOT", "EMPTY"], "EMPTY", true),
      () => this.parseUnary(pos, ["EXISTS"], "EXISTS", false),
      () => this.parseUnary(pos, ["NOT", "EXISTS"], "EXISTS", true),
      () => this.parseTo(pos),
      () => this.parseTextOp(pos, ["CONTAINS"], "CONTAINS", false),
      () => this.parseTextOp(pos, ["NOT", "CONTAINS"], "CONTAINS", true),
      () => this.parseTextOp(pos, ["STARTS", "WITH"], "STARTS_WITH", false),
      () => this.parseTextOp(pos, ["NOT", "STARTS", "WITH"], "STARTS_WITH", true),
    ];
    for (const alt of alternatives) {
      const r = this.attempt(alt);
      if (!(r instanceof PErr)) return r;
    }
    // a reserved keyword where a name was expected is reported as such
    const kw = this.attempt(() => this.value(pos));
    if (kw instanceof PErr && kw.kind.k === "ExpectedValue" && kw.kind.reserved) throw new PErr(kw.kind, kw.start, kw.end, true);
    throw this.err({ k: "InvalidPrimary" }, pos);
  }

  not(pos: number, depth: number): R<FilterNode> {
    if (depth > MAX_DEPTH) throw this.err({ k: "DepthLimitReached" }, pos);
    const afterNot = this.keyword(pos, "NOT");
    if (afterNot !== null) {
      const inner = this.cut(() => this.not(afterNot, depth + 1));
      const v = inner.v.kind === "not" ? inner.v.node : ({ kind: "not", node: inner.v } as FilterNode);
      return { v, pos: inner.pos };
    }
    return this.primary(pos, depth + 1);
  }

  and(pos: number, depth: number): R<FilterNode> {
    if (depth > MAX_DEPTH) throw this.err({ k: "DepthLimitReached" }, pos);
    const first = this.not(pos, depth + 1);
    const nodes = [first.v];
    let p = first.pos;
    for (;;) {
      const after = this.keyword(p, "AND");
      if (after === null) break;
      const next = this.cut(() => this.not(after, depth + 1));
      nodes.push(next.v);
      p = next.pos;
    }
    return { v: nodes.length === 1 ? nodes[0] : { kind: "and", nodes }, pos: p };
  }

  expression(pos: number, depth: number): R<FilterNode> {
    if (depth > MAX_DEPTH) throw this.err({ k: "DepthLimitReached" }, pos);
    const first = this.and(pos, depth + 1);
    const nodes = [first.v];
    let p = first.pos;
    for (;;) {
      const after = this.keyword(p, "OR");
      if (after === null) break;
      const next = this.cut(() => this.and(after, depth + 1));
      nodes.push(next.v);
      p = next.pos;
    }
    return { v: nodes.length === 1 ? nodes[0] : { kind: "or", nodes }, pos: p };
  }
}

function describe(kind: Kind, ctx: string): string {
  const esc = escapeDebug(ctx);
  switch (kind.k) {
    case "ExpectedValue":
      if (ctx.trim() === "") return "Was expecting a value but instead got nothing.";
      if (kind.reserved)
        return `Was expecting a value but instead got \`${esc}\`, which is a reserved keyword. To use \`${esc}\` as a field name or a value, surround it by quotes.`;
      return `Was expecting a value but instead got \`${esc}\`.`;
    case "InvalidPrimary":
      return `Was expecting an operation ${OPERATIONS} ${ctx.trim() === "" ? "but instead got nothing." : `at \`${esc}\`.`}`;
    case "ExpectedEof":
      return `Found unexpected characters at the end of the filter: \`${esc}\`. You probably forgot an \`OR\` or an \`AND\` rule.`;
    case "MissingClosingDelimiter":
      return `Expression \`${esc}\` is missing the following closing delimiter: \`${kind.c}\`.`;
    case "InOpeningBracket":
      return "Expected `[` after `IN` keyword.";
    case "InClosingBracket":
      return "Expected matching `]` after the list of field names given to `IN[`";
    case "InExpectedValue":
      return `Expected only comma-separated field names inside \`IN[..]\` but instead found \`${esc}\`.`;
    case "ReservedKeyword":
      return `\`${kind.word}\` is a reserved keyword and thus cannot be used as a field name unless it is put inside quotes. Use "${kind.word}" or '${kind.word}' instead.`;
    case "DepthLimitReached":
      return "The filter exceeded the maximum depth limit. Try rewriting the filter so that it contains fewer nested conditions.";
    case "Internal":
      return "Encountered an internal error while parsing your filter.";
  }
}

/** Parses one filter expression; null for an empty one. Throws FilterSyntaxError. */
export function parseFilterExpression(input: string): FilterNode | null {
  if (input.trim() === "") return null;
  const p = new Parser(input);
  try {
    const r = p.expression(0, 0);
    if (r.pos < input.length) throw p.err({ k: "ExpectedEof" }, r.pos);
    return r.v;
  } catch (e) {
    if (!(e instanceof PErr)) throw e;
    throw new FilterSyntaxError(describe(e.kind, input.slice(e.start, e.end)), input, e.start, e.end);
  }
}

/** A parsed filter: each string keeps its own source, for error messages. */
export type ParsedFilterNode = { node: FilterNode; source: string } | { and: ParsedFilterNode[] } | { or: ParsedFilterNode[] };
export type ParsedFilter = ParsedFilterNode | null;

/** The `filter` parameter: a string, or an array of strings / arrays of strings (outer AND, inner OR). */
export function parseFilterParam(filter: unknown, depth = 0): ParsedFilter {
  if (filter == null) return null;
  if (typeof filter === "string") {
    const node = parseFilterExpression(filter);
    return node ? { node, source: filter } : null;
  }
  if (Array.isArray(filter) && depth < 2) {
    const items = filter.map((f) => {
      if (typeof f !== "string" && !(Array.isArray(f) && depth === 0)) throw new FilterTypeError(f);
      return parseFilterParam(f, depth + 1);
    });
    const kept = items.filter((x): x is ParsedFilterNode => x !== null);
    if (kept.length === 0) return null;
    return depth === 0 ? { and: kept } : { or: kept };
  }
  throw new FilterTypeError(filter);
}

export class FilterTypeError extends Error {
  constructor(readonly value: unknown) {
    super(
      Array.isArray(value)
        ? `Invalid syntax for the filter parameter: \`expected String, Vec<String>, found: ${JSON.stringify(value)}\`.`
        : `Invalid syntax for the filter parameter: \`expected String, Array, found: ${JSON.stringify(value)}\`.`,
    );
  }
}

/** Every attribute token a filter mentions (to check that they are filterable). */
export function filterFields(f: ParsedFilter, out: { fid: Token; source: string }[] = []) {
  if (!f) return out;
  if ("and" in f) for (const x of f.and) filterFields(x, out);
  else if ("or" in f) for (const x of f.or) filterFields(x, out);
  else {
    const walk = (n: FilterNode) => {
      if (n.kind === "cond" || n.kind === "in") out.push({ fid: n.fid, source: f.source });
      else if (n.kind === "not") walk(n.node);
      else n.nodes.forEach(walk);
    };
    walk(f.node);
  }
  return out;
}
