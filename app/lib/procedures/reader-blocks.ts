/**
 * A revision as the reader sees it, block by block, for the compare view: headings without
 * markup, list items with their step numbers, specs with their limits and unit signs (N·m, µm,
 * °C), calculators with their settings in words. Pure; the compare view diffs these blocks.
 * (Search keeps its own plain text per block, `blockTexts` in document.ts.)
 */
import { isUnitCode, materialById, MATERIAL_IDS, unitLabel, type MaterialId } from "~/lib/calc";
import { calcLabel, tidyNumber, type CalcKind } from "./calc-shared";
import { formatSeconds } from "./format";
import type { CalculatorAttrs, JSONNode, MomentAttrs, SpecAttrs } from "./document";

export type ReaderBlock = {
  kind: "heading" | "paragraph" | "item" | "code" | "row" | "spec" | "calculator" | "moment";
  text: string;
  /** Heading level as the page shows it (1 and 2 both read as the page's section heading). */
  level?: number;
  /** A list item's number ("3.") or bullet ("•"); a later paragraph of the same item has none. */
  marker?: string;
  /** Nesting depth of a list item, 0 for the outermost list. */
  depth?: number;
  caution?: boolean;
  quote?: boolean;
  /** A table row that is a header row. */
  header?: boolean;
  /** What the block is called on the page: the spec's label, "Preload calculator — Head studs", "Video moment". */
  title?: string;
};

export type ReaderContext = {
  titleOf?: (procedureId: string) => string | undefined;
  recordingOf?: (recordingId: string) => string | undefined;
};

export const unitSign = (u: unknown): string => (isUnitCode(u) ? unitLabel(u) : String(u ?? ""));
const n = (v: number) => String(tidyNumber(v));

/** A spec's limits as the page prints them: "100 N·m (95–105 N·m)", "min 0.05 mm". */
export function specLimitsText(a: Pick<SpecAttrs, "nominal" | "min" | "max" | "unit">): string {
  const u = unitSign(a.unit);
  const parts: string[] = [];
  if (a.nominal != null) parts.push(`${n(a.nominal)} ${u}`);
  if (a.min != null && a.max != null) parts.push(a.nominal != null ? `(${n(a.min)}–${n(a.max)} ${u})` : `${n(a.min)}–${n(a.max)} ${u}`);
  else if (a.min != null) parts.push(`min ${n(a.min)} ${u}`);
  else if (a.max != null) parts.push(`max ${n(a.max)} ${u}`);
  return parts.join(" ");
}

type Q = { value: number; unit: string };
const isQ = (v: unknown): v is Q =>
  Boolean(v) && typeof v === "object" && typeof (v as Q).value === "number" && typeof (v as Q).unit === "string";
const q = (v: unknown) => (isQ(v) ? `${n(v.value)} ${unitSign(v.unit)}` : typeof v === "number" ? n(v) : String(v ?? ""));

const DIRECTION: Record<string, string> = { "torque-to-preload": "torque → preload", "preload-to-torque": "preload → torque" };
const CLEARANCE: Record<string, string> = {
  "piston-to-wall": "piston-to-wall",
  bearing: "bearing oil clearance",
  "ring-gap": "ring end gap",
};
const WORDS: Record<string, string> = {
  torque: "torque",
  preload: "preload",
  k: "nut factor K",
  muThread: "thread friction μ",
  muHead: "head friction μ",
  headDiameter: "head bearing diameter",
  propertyClass: "property class",
  yieldStrength: "yield strength",
  length: "grip length",
  modulus: "modulus",
  reference: "reference bore",
  bore: "bore",
  piston: "piston",
  journal: "journal",
  bearingBore: "bearing bore",
  housingBore: "housing bore",
  shellThickness: "shell thickness",
  gapPerBore: "gap per inch of bore",
  measuredGap: "measured gap",
  ambient: "ambient",
  boreTemperature: "bore at",
  pistonTemperature: "piston at",
  boreMaterial: "bore material",
  pistonMaterial: "piston material",
  alphaPerK: "expansion coefficient (1/K)",
  angleDeg: "angle",
};
/** A key the table above does not know, in words: "shellThickness" → "shell thickness". */
const words = (key: string) =>
  WORDS[key] ??
  key
    .replace(/([a-z])([A-Z])/g, "$1 $2")
    .replace(/-/g, " ")
    .toLowerCase();

function material(v: unknown): string {
  if (typeof v === "string") return (MATERIAL_IDS as readonly string[]).includes(v) ? materialById(v as MaterialId).label : v;
  if (v && typeof v === "object" && typeof (v as { alphaPerK?: unknown }).alphaPerK === "number")
    return `α ${(v as { alphaPerK: number }).alphaPerK} per K`;
  return String(v ?? "");
}

function spec(v: unknown): string {
  const s = (v ?? {}) as { min?: unknown; max?: unknown };
  if (isQ(s.min) && isQ(s.max) && s.min.unit === s.max.unit) return `spec ${n(s.min.value)}–${n(s.max.value)} ${unitSign(s.min.unit)}`;
  return ["spec", isQ(s.min) ? `min ${q(s.min)}` : "", isQ(s.max) ? `max ${q(s.max)}` : ""].filter(Boolean).join(" ");
}

type Reading = { depth?: unknown; angleDeg?: unknown; diameter?: unknown; radius?: unknown };
/** Bore readings grouped by depth, as the bore log reads: "at 10 mm deep: 0° 88.006 mm, 45° 88.012 mm". */
function readings(list: unknown, what: string): string {
  if (!Array.isArray(list)) return "";
  const byDepth = new Map<string, string[]>();
  for (const r of list as Reading[]) {
    const d = q(r.depth);
    const value = r.diameter ?? r.radius;
    byDepth.set(d, [...(byDepth.get(d) ?? []), `${typeof r.angleDeg === "number" ? n(r.angleDeg) : "?"}° ${q(value)}`]);
  }
  return [...byDepth].map(([d, xs]) => `${what} at ${d} deep: ${xs.join(", ")}`).join("; ");
}

/** A calculator's preset in the words of the page: "thread M12x1.5, torque → preload, torque 110 N·m, nut factor K 0.15, property class 12.9". */
export function presetWords(kind: CalcKind, preset: Record<string, unknown>): string {
  const out: string[] = [];
  const add = (key: string, v: unknown) => {
    if (v === undefined || v === null) return;
    out.push(`${words(key)} ${q(v)}`);
  };
  const rest = (o: Record<string, unknown>, skip: string[]) => {
    for (const [k, v] of Object.entries(o)) {
      if (skip.includes(k)) continue;
      if (isQ(v) || typeof v === "number" || typeof v === "string") add(k, v);
      else if (v && typeof v === "object" && !Array.isArray(v)) rest(v as Record<string, unknown>, skip);
    }
  };
  if (kind === "preload") {
    if (typeof preset.thread === "string") out.push(`thread ${preset.thread}`);
    const dir = String(preset.direction ?? "torque-to-preload");
    out.push(DIRECTION[dir] ?? dir);
    add(dir === "preload-to-torque" ? "preload" : "torque", dir === "preload-to-torque" ? preset.preload : preset.torque);
    const m = (preset.method ?? {}) as Record<string, unknown>;
    if (m.kind === "nut-factor") add("k", m.k);
    else if (m.kind === "friction") {
      out.push("friction method (ISO 16047)");
      rest(m, ["kind"]);
    }
    if (preset.material && typeof preset.material === "object") rest(preset.material as Record<string, unknown>, []);
    if (preset.grip && typeof preset.grip === "object") rest(preset.grip as Record<string, unknown>, []);
  } else if (kind === "distortion") {
    const radial = preset.mode === "radial";
    out.push(radial ? "radii measured" : "diameters measured");
    add("reference", preset.reference);
    const r = readings(preset.readings, radial ? "radius" : "diameter");
    if (r) out.push(r);
    const c = preset.compareTo as { readings?: unknown; mode?: unknown } | undefined;
    if (c) out.push(`compared with ${readings(c.readings, (c.mode ?? preset.mode) === "radial" ? "radius" : "diameter")}`);
  } else {
    const k = String(preset.kind ?? "");
    out.push(CLEARANCE[k] ?? words(k));
    for (const [key, v] of Object.entries(preset)) {
      if (key === "kind") continue;
      if (key === "spec") out.push(spec(v));
      else if (key === "thermal" && v && typeof v === "object") {
        for (const [tk, tv] of Object.entries(v as Record<string, unknown>))
          out.push(tk.endsWith("Material") ? `${words(tk)} ${material(tv)}` : `${words(tk)} ${q(tv)}`);
      } else add(key, v);
    }
  }
  const text = out.filter(Boolean).join(", ");
  return text.charAt(0).toUpperCase() + text.slice(1);
}

function inline(node: JSONNode, ctx: ReaderContext): string {
  if (node.type === "text") return node.text ?? "";
  if (node.type === "hardBreak") return "\n";
  if (node.type === "procedureLink") return ctx.titleOf?.(String(node.attrs?.procedureId ?? "")) ?? "(linked procedure no longer exists)";
  return (node.content ?? []).map((c) => inline(c, ctx)).join("");
}

/** The blocks of a document in reading order. */
export function readerBlocks(doc: JSONNode, ctx: ReaderContext = {}): ReaderBlock[] {
  const out: ReaderBlock[] = [];
  const push = (b: ReaderBlock) => {
    const text = b.text.replace(/[ \t]+/g, " ").trim();
    if (text || b.kind === "spec" || b.kind === "calculator" || b.kind === "moment") out.push({ ...b, text });
  };
  type Where = { caution?: boolean; quote?: boolean; depth: number };
  const visit = (node: JSONNode, where: Where, marker?: string) => {
    const flags = { ...(where.caution ? { caution: true } : {}), ...(where.quote ? { quote: true } : {}) };
    switch (node.type) {
      case "heading":
        push({ kind: "heading", level: Math.min(4, Math.max(1, Number(node.attrs?.level ?? 2))), text: inline(node, ctx), ...flags });
        return;
      case "paragraph":
        push(
          marker !== undefined
            ? { kind: "item", marker, depth: where.depth - 1, text: inline(node, ctx), ...flags }
            : {
                kind: where.depth ? "item" : "paragraph",
                ...(where.depth ? { depth: where.depth - 1 } : {}),
                text: inline(node, ctx),
                ...flags,
              },
        );
        return;
      case "codeBlock":
        push({ kind: "code", text: inline(node, ctx), ...flags });
        return;
      case "caution":
        for (const c of node.content ?? []) visit(c, { ...where, caution: true });
        return;
      case "blockquote":
        for (const c of node.content ?? []) visit(c, { ...where, quote: true });
        return;
      case "bulletList":
      case "orderedList": {
        const start = Number(node.attrs?.start ?? 1);
        (node.content ?? []).forEach((item, i) => {
          const m = node.type === "orderedList" ? `${start + i}.` : "•";
          // The marker goes on the item's first paragraph; what follows continues the same step.
          (item.content ?? []).forEach((c, k) =>
            visit(c, { ...where, depth: where.depth + 1 }, k === 0 && c.type === "paragraph" ? m : undefined),
          );
        });
        return;
      }
      case "table":
        for (const row of node.content ?? []) {
          const cells = (row.content ?? []).map((cell) =>
            (cell.content ?? [])
              .map((c) => inline(c, ctx))
              .join(" ")
              .trim(),
          );
          push({ kind: "row", header: (row.content ?? []).every((c) => c.type === "tableHeader"), text: cells.join(" | "), ...flags });
        }
        return;
      case "spec": {
        const a = node.attrs as SpecAttrs;
        push({ kind: "spec", title: a.label, text: `${specLimitsText(a)}${a.note ? ` — ${a.note}` : ""}`, ...flags });
        return;
      }
      case "calculator": {
        const a = node.attrs as CalculatorAttrs;
        push({
          kind: "calculator",
          title: `${calcLabel(a.kind)} calculator${a.title ? ` — ${a.title}` : ""}`,
          text: presetWords(a.kind, a.preset ?? {}),
          ...flags,
        });
        return;
      }
      case "videoMoment": {
        const a = node.attrs as MomentAttrs;
        const rec = ctx.recordingOf?.(a.recordingId);
        const time = `${formatSeconds(a.start)}${a.end != null ? `–${formatSeconds(a.end)}` : ""}`;
        push({
          kind: "moment",
          title: "Video moment",
          text: [time, a.caption, rec ? `from “${rec}”` : ""].filter(Boolean).join(" · "),
          ...flags,
        });
        return;
      }
      default:
        for (const c of node.content ?? []) visit(c, where);
    }
  };
  visit(doc, { depth: 0 });
  return out;
}
