/**
 * The stored procedure document: TipTap JSON restricted to our schema. `sanitizeDocument`
 * is the one gate every save passes: unknown node or mark types are refused, attributes
 * outside the schema are dropped, link targets other than http(s), mailto and in-app paths
 * are stripped, and the custom blocks' attributes are type-checked. Pure (no DOM, no DB).
 *
 * A draft is work in progress: a spec without a label or a video moment without a recording
 * is kept as typed (a missing or ill-typed value becomes null) and named by `blockProblems`
 * in the author's words; only submitting for review needs every block complete
 * (`incompleteBlocks`). What no block may hold at all (unknown types, values no gauge can
 * read, text past the limits) still refuses the save.
 */
import { UNIT_CODES, unitKind, type UnitKind } from "~/lib/calc";
import { quantityProblem } from "~/lib/edge";
import { CALC_KINDS, checkCalculatorPreset, type CalcKind } from "./calc-presets";
import { calcLabel, presetText } from "./calc-shared";
import { formatSeconds } from "./format";
export { calcLabel, formatSeconds };

export type JSONNode = {
  type: string;
  attrs?: Record<string, unknown>;
  content?: JSONNode[];
  marks?: { type: string; attrs?: Record<string, unknown> }[];
  text?: string;
};
export type ProcedureDoc = JSONNode & { type: "doc" };

export const EMPTY_DOC: ProcedureDoc = { type: "doc", content: [{ type: "paragraph" }] };

export const QUANTITY_KINDS = Object.keys(UNIT_CODES) as UnitKind[];

export type SpecAttrs = {
  id: string;
  label: string;
  quantity: UnitKind;
  unit: string;
  nominal: number | null;
  min: number | null;
  max: number | null;
  note: string;
};
/** The attributes of complete blocks; a draft's incomplete block may hold null where `blockProblems` names what is missing. */
export type MomentAttrs = { recordingId: string; start: number; end: number | null; caption: string };
export type CalculatorAttrs = { kind: CalcKind; title: string; preset: Record<string, unknown> };

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const SPEC_KEY = /^[A-Za-z0-9_-]{1,40}$/;
export const MAX_NODES = 20_000;
const MAX_DEPTH = 24;
const MAX_TEXT = 20_000;

export type Issue = { path: string; message: string };
export type SanitizeResult = { ok: true; doc: ProcedureDoc; warnings: Issue[] } | { ok: false; errors: Issue[]; warnings: Issue[] };

type AttrRule = (v: unknown, ctx: Ctx, path: string) => { keep: true; value: unknown } | { keep: false };
type Ctx = { errors: Issue[]; warnings: Issue[]; nodes: number; specKeys: Set<string>; newKey: () => string };

const drop = { keep: false } as const;
const keep = (value: unknown) => ({ keep: true as const, value });

const intIn =
  (lo: number, hi: number, fallback?: number): AttrRule =>
  (v) => {
    const n = typeof v === "string" && /^\d+$/.test(v) ? Number(v) : v;
    if (typeof n === "number" && Number.isInteger(n) && n >= lo && n <= hi) return keep(n);
    return fallback === undefined ? drop : keep(fallback);
  };

/** Link targets we allow: http(s), mailto, and paths inside the app. Everything else (javascript:, data:, vbscript:, file:, protocol-relative) is refused. */
export function safeHref(raw: unknown): string | null {
  if (typeof raw !== "string") return null;
  // Browsers ignore control characters and whitespace inside a scheme ("java\tscript:"); so do we, before deciding.
  const s = raw.replace(/[\u0000-\u0020\u007f-\u009f]/g, "");
  if (s.length === 0 || s.length > 2000) return null;
  if (/["'<>`\s]/.test(raw.trim())) return null; // quotes, angle brackets or spaces have no business in a link target
  if (s.startsWith("//") || s.startsWith("\\") || s.startsWith("/\\")) return null;
  if (s.startsWith("/") || s.startsWith("#")) return raw.trim();
  const m = /^([a-zA-Z][a-zA-Z0-9+.-]*):/.exec(s);
  if (!m) return null; // bare words like "example.com" are ambiguous: refuse rather than guess
  const scheme = m[1].toLowerCase();
  if (scheme === "http" || scheme === "https" || scheme === "mailto") return raw.trim();
  return null;
}

const str =
  (max: number): AttrRule =>
  (v, ctx, path) => {
    if (v == null || v === "") return keep("");
    if (typeof v !== "string") {
      ctx.errors.push({ path, message: "must be text" });
      return drop;
    }
    const t = v.trim();
    if (t.length > max) {
      ctx.errors.push({ path, message: `is longer than ${max} characters` });
      return drop;
    }
    return keep(t);
  };
/** A number, or null when it is missing or not a number yet (the block names what is missing). */
const num =
  (fallback: number | null = null): AttrRule =>
  (v) => {
    const n = typeof v === "string" && v.trim() !== "" ? Number(v) : v;
    return keep(typeof n === "number" && Number.isFinite(n) ? n : fallback);
  };
const uuid: AttrRule = (v, ctx, path) => {
  if (typeof v === "string" && UUID.test(v)) return keep(v.toLowerCase());
  ctx.errors.push({ path, message: "must be a valid id" });
  return drop;
};
/** A recording not chosen yet, or a pasted id that is not one, is stored as null (and the block says "Choose a recording"). */
const optionalUuid: AttrRule = (v) => keep(typeof v === "string" && UUID.test(v) ? v.toLowerCase() : null);

type NodeRule = {
  attrs?: Record<string, AttrRule>;
  /** Leaf nodes never keep content. */
  leaf?: boolean;
  /** Extra checks across attributes. */
  check?: (attrs: Record<string, unknown>, ctx: Ctx, path: string) => void;
};

const NODES: Record<string, NodeRule> = {
  doc: {},
  paragraph: {},
  heading: { attrs: { level: intIn(1, 4, 2) } },
  text: { leaf: true },
  hardBreak: { leaf: true },
  horizontalRule: { leaf: true },
  bulletList: {},
  orderedList: { attrs: { start: intIn(0, 9999, 1) } },
  listItem: {},
  blockquote: {},
  codeBlock: {
    attrs: {
      language: (v) => (typeof v === "string" && /^[a-z0-9+#-]{1,20}$/i.test(v) ? keep(v) : keep(null)),
    },
  },
  table: {},
  tableRow: {},
  tableHeader: { attrs: { colspan: intIn(1, 50, 1), rowspan: intIn(1, 200, 1), colwidth: colwidthRule() } },
  tableCell: { attrs: { colspan: intIn(1, 50, 1), rowspan: intIn(1, 200, 1), colwidth: colwidthRule() } },
  caution: {},
  procedureLink: { leaf: true, attrs: { procedureId: uuid } },
  videoMoment: {
    leaf: true,
    attrs: { recordingId: optionalUuid, start: num(0), end: num(), caption: str(300) },
  },
  spec: {
    leaf: true,
    attrs: {
      id: (v, ctx) => {
        let key = typeof v === "string" && SPEC_KEY.test(v) ? v : ctx.newKey();
        while (ctx.specKeys.has(key)) key = ctx.newKey(); // a pasted copy gets its own id
        ctx.specKeys.add(key);
        return keep(key);
      },
      label: str(120),
      quantity: (v) => keep(typeof v === "string" && (QUANTITY_KINDS as string[]).includes(v) ? v : null),
      unit: (v) => keep(typeof v === "string" && unitKind(v) ? v : null),
      nominal: num(),
      min: num(),
      max: num(),
      note: str(300),
    },
    check(a, ctx, path) {
      // Values a gauge can read (app/lib/edge.ts): a nominal of 1e308 is a slip, not a spec, and
      // the edge refuses it even in a draft.
      for (const k of ["nominal", "min", "max"] as const) {
        const problem =
          typeof a[k] === "number" && typeof a.unit === "string" && unitKind(a.unit) ? quantityProblem(a[k] as number, a.unit) : null;
        if (problem)
          ctx.errors.push({ path: `${path}.${k}`, message: `Spec “${a.label || "without a label"}”, ${SPEC_FIELD_NAMES[k]}: ${problem}` });
      }
    },
  },
  calculator: {
    leaf: true,
    attrs: {
      kind: (v, ctx, path) => {
        if (typeof v === "string" && (CALC_KINDS as readonly string[]).includes(v)) return keep(v);
        ctx.errors.push({ path, message: `must be one of ${CALC_KINDS.join(", ")}` });
        return drop;
      },
      title: str(120),
      preset: (v) => keep(v && typeof v === "object" && !Array.isArray(v) ? JSON.parse(JSON.stringify(v)) : null),
    },
  },
};

function colwidthRule(): AttrRule {
  return (v) => {
    if (Array.isArray(v) && v.length <= 50 && v.every((x) => Number.isInteger(x) && x > 0 && x < 5000)) return keep(v);
    return keep(null);
  };
}

const MARKS: Record<string, Record<string, AttrRule>> = {
  bold: {},
  italic: {},
  strike: {},
  underline: {},
  code: {},
  link: {},
};

function sanitizeNode(input: unknown, ctx: Ctx, path: string, depth: number): JSONNode | null {
  if (++ctx.nodes > MAX_NODES) {
    if (ctx.nodes === MAX_NODES + 1) ctx.errors.push({ path, message: `the document has more than ${MAX_NODES} nodes` });
    return null;
  }
  if (depth > MAX_DEPTH) {
    ctx.errors.push({ path, message: "the document is nested too deeply" });
    return null;
  }
  if (!input || typeof input !== "object" || Array.isArray(input)) {
    ctx.errors.push({ path, message: "is not a node" });
    return null;
  }
  const n = input as Record<string, unknown>;
  const type = n.type;
  if (typeof type !== "string" || !Object.hasOwn(NODES, type)) {
    ctx.errors.push({ path, message: `unknown block type “${String(type).slice(0, 40)}”` });
    return null;
  }
  const rule = NODES[type];
  const out: JSONNode = { type };

  if (type === "text") {
    if (typeof n.text !== "string" || n.text.length === 0) {
      ctx.errors.push({ path, message: "text node without text" });
      return null;
    }
    if (n.text.length > MAX_TEXT) {
      ctx.errors.push({ path, message: `a text run is longer than ${MAX_TEXT} characters` });
      return null;
    }
    out.text = n.text;
    if (Array.isArray(n.marks) && n.marks.length) {
      const marks: NonNullable<JSONNode["marks"]> = [];
      n.marks.forEach((m, i) => {
        const mp = `${path}.marks[${i}]`;
        const mt = (m as { type?: unknown })?.type;
        if (typeof mt !== "string" || !Object.hasOwn(MARKS, mt)) {
          ctx.errors.push({ path: mp, message: `unknown mark “${String(mt).slice(0, 40)}”` });
          return;
        }
        if (marks.some((x) => x.type === mt)) return;
        if (mt === "link") {
          const href = safeHref((m as { attrs?: { href?: unknown } }).attrs?.href);
          if (!href) {
            ctx.warnings.push({ path: mp, message: "link removed: only http, https, mailto and in-app links are allowed" });
            return;
          }
          marks.push({ type: "link", attrs: { href } });
          return;
        }
        marks.push({ type: mt });
      });
      if (marks.length) out.marks = marks;
    }
    return out;
  }

  const attrsIn = n.attrs && typeof n.attrs === "object" && !Array.isArray(n.attrs) ? (n.attrs as Record<string, unknown>) : {};
  if (rule.attrs) {
    const attrs: Record<string, unknown> = {};
    for (const [k, r] of Object.entries(rule.attrs)) {
      const res = r(attrsIn[k], ctx, `${path}.attrs.${k}`);
      if (res.keep) attrs[k] = res.value;
    }
    rule.check?.(attrs, ctx, path);
    out.attrs = attrs;
  }

  if (!rule.leaf && Array.isArray(n.content)) {
    const content: JSONNode[] = [];
    n.content.forEach((c, i) => {
      const s = sanitizeNode(c, ctx, `${path}.content[${i}]`, depth + 1);
      if (s) content.push(s);
    });
    if (content.length) out.content = content;
  }
  return out;
}

let keyCounter = 0;
/** A short random id for a new spec block. */
export function newSpecKey(): string {
  const rnd =
    typeof crypto !== "undefined" && "randomUUID" in crypto
      ? crypto.randomUUID().replace(/-/g, "").slice(0, 12)
      : `${Date.now().toString(36)}${(keyCounter++).toString(36)}`;
  return `s_${rnd}`;
}

/** Validates and cleans a document. Structure (which node may hold which) is checked separately against the TipTap schema (schema-check.ts). */
export function sanitizeDocument(input: unknown, opts: { newKey?: () => string } = {}): SanitizeResult {
  const ctx: Ctx = { errors: [], warnings: [], nodes: 0, specKeys: new Set(), newKey: opts.newKey ?? newSpecKey };
  if (!input || typeof input !== "object" || (input as { type?: unknown }).type !== "doc") {
    return { ok: false, errors: [{ path: "doc", message: "the document must be a TipTap document (type “doc”)" }], warnings: [] };
  }
  const doc = sanitizeNode(input, ctx, "doc", 0) as ProcedureDoc | null;
  if (!doc || ctx.errors.length) return { ok: false, errors: ctx.errors.slice(0, 20), warnings: ctx.warnings };
  dropEmptyListItems(doc);
  // The editor keeps an empty paragraph after the last block so there is always a place to type; the stored page does without it.
  while (doc.content && doc.content.length > 1 && isEmptyParagraph(doc.content[doc.content.length - 1])) doc.content.pop();
  if (!doc.content?.length) doc.content = [{ type: "paragraph" }];
  return { ok: true, doc, warnings: ctx.warnings };
}

const LISTS = new Set(["bulletList", "orderedList"]);
const isEmptyParagraph = (n: JSONNode) => n.type === "paragraph" && !(n.content ?? []).length;
/** A list item that holds nothing but empty paragraphs (a bullet never filled in). */
function isEmptyItem(n: JSONNode): boolean {
  return n.type === "listItem" && (n.content ?? []).every((c) => c.type === "paragraph" && !(c.content ?? []).length);
}
/** Removes empty list items, then lists left with no items, at every depth; the stored page never shows a blank bullet. */
function dropEmptyListItems(node: JSONNode): void {
  if (!node.content) return;
  for (const c of node.content) dropEmptyListItems(c);
  if (LISTS.has(node.type)) node.content = node.content.filter((c) => !isEmptyItem(c));
  node.content = node.content.filter((c) => !(LISTS.has(c.type) && !(c.content ?? []).length));
  if (!node.content.length) delete node.content;
}

// ---- walking ---------------------------------------------------------------------------------

export function walk(node: JSONNode, fn: (n: JSONNode, ancestors: JSONNode[]) => void, ancestors: JSONNode[] = []): void {
  fn(node, ancestors);
  if (node.content) for (const c of node.content) walk(c, fn, [...ancestors, node]);
}

/** Inline text of a node (procedure links resolved through `titleOf`). */
export function inlineText(node: JSONNode, titleOf?: (id: string) => string | undefined): string {
  if (node.type === "text") return node.text ?? "";
  if (node.type === "hardBreak") return "\n";
  if (node.type === "procedureLink") {
    const id = String(node.attrs?.procedureId ?? "");
    return `→ ${titleOf?.(id) ?? "linked procedure"}`;
  }
  return (node.content ?? []).map((c) => inlineText(c, titleOf)).join("");
}

// ---- incomplete blocks -----------------------------------------------------------------------

const SPEC_FIELD_NAMES = { nominal: "nominal", min: "minimum", max: "maximum" } as const;

/** What an author still has to do in a block, and which of its fields to go to. */
export type BlockProblem = { field: string; message: string };

/** The problems of one spec, video moment or calculator block, in the author's words (none for other nodes). */
export function blockProblems(node: JSONNode): BlockProblem[] {
  const a = node.attrs ?? {};
  const out: BlockProblem[] = [];
  const isNum = (v: unknown): v is number => typeof v === "number" && Number.isFinite(v);
  if (node.type === "spec") {
    if (typeof a.label !== "string" || !a.label.trim()) out.push({ field: "label", message: "Give the spec a label" });
    const quantity = typeof a.quantity === "string" && (QUANTITY_KINDS as string[]).includes(a.quantity) ? (a.quantity as UnitKind) : null;
    if (!quantity) out.push({ field: "quantity", message: "Choose what the spec measures" });
    else if (typeof a.unit !== "string" || unitKind(a.unit) !== quantity)
      out.push({ field: "unit", message: `Choose a unit of ${quantity}` });
    const [nominal, min, max] = [a.nominal, a.min, a.max].map((v) => (isNum(v) ? v : null));
    if (nominal == null && min == null && max == null) out.push({ field: "nominal", message: "Give a nominal value or a limit" });
    if (min != null && max != null && min > max) out.push({ field: "min", message: "The minimum is above the maximum" });
    else if (nominal != null && ((min != null && nominal < min) || (max != null && nominal > max)))
      out.push({ field: "nominal", message: "The nominal lies outside the limits" });
  }
  if (node.type === "videoMoment") {
    if (typeof a.recordingId !== "string" || !UUID.test(a.recordingId)) out.push({ field: "recording", message: "Choose a recording" });
    if (!isNum(a.start) || a.start < 0) out.push({ field: "start", message: "Give the start time" });
    else if (a.end != null && (!isNum(a.end) || a.end <= a.start)) out.push({ field: "end", message: "The end must come after the start" });
  }
  if (node.type === "calculator") {
    const problem =
      a.preset && typeof a.preset === "object" ? checkCalculatorPreset(a.kind as CalcKind, a.preset) : "the inputs are missing";
    if (problem) out.push({ field: "preset", message: `Check the calculator's inputs (${problem})` });
  }
  return out;
}

/** An incomplete block: where it is (child indices from the document down), its name for a list, and what is missing. */
export type IncompleteBlock = { path: number[]; type: string; name: string; problems: BlockProblem[] };

const BLOCK_NAMES: Record<string, string> = { spec: "Spec", videoMoment: "Video moment", calculator: "Calculator" };

/** The name a list (and a screen reader) gives a block: “Spec 2: Head stud torque”, “Video moment 1”. */
export function blockName(node: JSONNode, ordinal: number): string {
  const a = node.attrs ?? {};
  if (node.type === "calculator") return `${calcLabel(a.kind as CalcKind)} calculator${a.title ? `: ${a.title}` : ""}`;
  const detail = node.type === "spec" ? a.label : node.type === "videoMoment" ? a.caption : "";
  return `${BLOCK_NAMES[node.type] ?? node.type} ${ordinal}${typeof detail === "string" && detail.trim() ? `: ${detail.trim()}` : ""}`;
}

/** Every block that is not ready for review, in document order. Empty means the draft may be submitted. */
export function incompleteBlocks(doc: JSONNode): IncompleteBlock[] {
  const out: IncompleteBlock[] = [];
  const seen: Record<string, number> = {};
  const visit = (n: JSONNode, path: number[]) => {
    if (n.type in BLOCK_NAMES) {
      seen[n.type] = (seen[n.type] ?? 0) + 1;
      const problems = blockProblems(n);
      if (problems.length) out.push({ path, type: n.type, name: blockName(n, seen[n.type]), problems });
    }
    n.content?.forEach((c, i) => visit(c, [...path, i]));
  };
  visit(doc, []);
  return out;
}

/** The list in one sentence, for a refusal or a form error. */
export function incompleteText(blocks: IncompleteBlock[]): string {
  return blocks.map((b) => `${b.name}: ${b.problems.map((p) => p.message).join("; ")}`).join(". ");
}

export function specText(a: Partial<SpecAttrs>): string {
  const parts: string[] = [];
  if (a.nominal != null) parts.push(`nominal ${a.nominal}`);
  if (a.min != null) parts.push(`min ${a.min}`);
  if (a.max != null) parts.push(`max ${a.max}`);
  return `Spec: ${a.label ?? ""} — ${parts.join(", ")} ${a.unit ?? ""}${a.note ? ` (${a.note})` : ""}`.trim();
}

export type Block = {
  /** Position among the document's blocks, 0-based. */
  index: number;
  /** The block's node type; for text inside containers, e.g. "caution/paragraph". */
  type: string;
  text: string;
  /** For spec blocks, the spec key; lets search and diffs point at one spec. */
  key?: string;
};

const CONTAINER_PREFIX: Record<string, string> = { caution: "Caution: ", blockquote: "" };

/**
 * Plain text per block, in document order: every paragraph, heading, code block and list or
 * table cell paragraph is a block; specs, calculators and video moments are one block each.
 * Used by the compare view and by search (which indexes revisions by block).
 */
export function blockTexts(doc: JSONNode, titleOf?: (id: string) => string | undefined): Block[] {
  const out: Block[] = [];
  const push = (type: string, text: string, key?: string) => {
    const t = text.replace(/[ \t]+/g, " ").trim();
    if (t) out.push({ index: out.length, type, text: t, ...(key ? { key } : {}) });
  };
  walk(doc, (n, anc) => {
    const containers = anc.map((a) => a.type).filter((t) => t !== "doc");
    const typeName = [
      ...containers.filter((t) => ["caution", "blockquote", "bulletList", "orderedList", "table"].includes(t)),
      n.type,
    ].join("/");
    switch (n.type) {
      case "paragraph":
      case "heading":
      case "codeBlock": {
        const inCaution = containers.includes("caution");
        const list = containers.includes("bulletList") || containers.includes("orderedList");
        const prefix = n.type === "heading" ? `${"#".repeat(Number(n.attrs?.level ?? 2))} ` : list ? "• " : "";
        push(typeName, (inCaution ? CONTAINER_PREFIX.caution : "") + prefix + inlineText(n, titleOf));
        break;
      }
      case "spec":
        push("spec", specText(n.attrs as SpecAttrs), String(n.attrs?.id ?? ""));
        break;
      case "calculator":
        push(
          "calculator",
          `Calculator: ${calcLabel(n.attrs?.kind as CalcKind)}${n.attrs?.title ? ` — ${n.attrs.title}` : ""}: ${presetText(n.attrs?.preset ?? {})}`,
        );
        break;
      case "videoMoment": {
        const a = n.attrs as MomentAttrs;
        push(
          "videoMoment",
          `Video moment at ${formatSeconds(a.start)}${a.end != null ? `–${formatSeconds(a.end)}` : ""}: ${a.caption ?? ""}`,
        );
        break;
      }
    }
  });
  return out;
}

export function countWords(doc: JSONNode): number {
  let n = 0;
  walk(doc, (x) => {
    if (x.type === "text" && x.text) n += x.text.split(/\s+/).filter(Boolean).length;
  });
  return n;
}
