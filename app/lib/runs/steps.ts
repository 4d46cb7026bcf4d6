/**
 * A procedure revision cut into the steps a run walks through, one screen each. Pure (no DOM,
 * no database), so the server and the run screen cut a document the same way.
 *
 * The cut follows how procedures are written: a heading opens a section; each item of a
 * top-level numbered list is a step of its own; what comes before the list joins its first
 * step and what comes after it (the specs to measure, the calculators) its last one. A section
 * without a numbered list is one step. Cautions are gathered per section and shown in front of
 * every step of it, because the person at the bench may open any step first; the cautions
 * before the first heading (the makers' values come first…) stand in front of every step.
 */
import type { CalcKind } from "~/lib/calc-kinds";
import { inlineText, type JSONNode } from "~/lib/procedures/document";

export type RunCalculator = { kind: CalcKind; title: string; preset: Record<string, unknown> };

export type RunStep = {
  /** 0-based, the run's `current_step`. */
  index: number;
  /** The section heading ("Steps", "Checks"), or "Before you start" before the first heading. */
  section: string;
  /** The step's number in its list ("3"), null for a section that is one step. */
  number: string | null;
  /** The instruction itself, then any further paragraphs, as plain text. */
  text: string[];
  cautions: string[];
  /** Spec keys (the spec block's id) measured in this step, in document order. */
  specKeys: string[];
  calculators: RunCalculator[];
};

type Section = { heading: string; blocks: JSONNode[] };

const FIRST_SECTION = "Before you start";

function plainText(node: JSONNode): string[] {
  if (node.type === "paragraph" || node.type === "heading") {
    const t = inlineText(node).trim();
    return t ? [t] : [];
  }
  if (node.type === "bulletList" || node.type === "orderedList")
    return (node.content ?? []).flatMap((item) => plainText(item).map((t, i) => (i === 0 ? `• ${t}` : t)));
  if (node.type === "spec" || node.type === "calculator" || node.type === "caution" || node.type === "videoMoment") return [];
  return (node.content ?? []).flatMap(plainText);
}

function collect(node: JSONNode, into: Pick<RunStep, "specKeys" | "calculators" | "cautions">) {
  if (node.type === "spec" && typeof node.attrs?.id === "string") into.specKeys.push(node.attrs.id);
  else if (node.type === "calculator" && node.attrs) into.calculators.push(node.attrs as RunCalculator);
  else if (node.type === "caution") {
    const t = (node.content ?? []).flatMap(plainText).join(" ");
    if (t) into.cautions.push(t);
  } else for (const c of node.content ?? []) collect(c, into);
}

function sections(doc: JSONNode): { leading: string[]; sections: Section[] } {
  const out: Section[] = [];
  const leading: string[] = [];
  let current: Section | null = null;
  for (const block of doc.content ?? []) {
    if (block.type === "heading") {
      current = { heading: inlineText(block).trim() || "Untitled section", blocks: [] };
      out.push(current);
      continue;
    }
    if (!current) {
      // Cautions before the first heading speak for the whole procedure.
      if (block.type === "caution") {
        collect(block, { specKeys: [], calculators: [], cautions: leading });
        continue;
      }
      current = { heading: FIRST_SECTION, blocks: [] };
      out.push(current);
    }
    current.blocks.push(block);
  }
  return { leading, sections: out };
}

export function runSteps(doc: JSONNode): RunStep[] {
  const { leading, sections: parts } = sections(doc);
  const steps: RunStep[] = [];
  const push = (s: Omit<RunStep, "index">) => steps.push({ ...s, index: steps.length });
  for (const sec of parts) {
    const cautions = [...leading];
    for (const b of sec.blocks) if (b.type === "caution") collect(b, { specKeys: [], calculators: [], cautions });
    const listAt = sec.blocks.findIndex((b) => b.type === "orderedList");
    if (listAt < 0) {
      const s = {
        section: sec.heading,
        number: null,
        text: [] as string[],
        cautions: [...cautions],
        specKeys: [] as string[],
        calculators: [] as RunCalculator[],
      };
      for (const b of sec.blocks) {
        if (b.type === "caution") continue;
        s.text.push(...plainText(b));
        collect(b, s);
      }
      if (s.text.length || s.specKeys.length || s.calculators.length) push(s);
      continue;
    }
    const list = sec.blocks[listAt];
    const start = typeof list.attrs?.start === "number" ? list.attrs.start : 1;
    const before = sec.blocks.slice(0, listAt).filter((b) => b.type !== "caution");
    const after = sec.blocks.slice(listAt + 1).filter((b) => b.type !== "caution");
    const items = list.content ?? [];
    items.forEach((item, i) => {
      const s = {
        section: sec.heading,
        number: String(start + i),
        text: [] as string[],
        cautions: [...cautions],
        specKeys: [] as string[],
        calculators: [] as RunCalculator[],
      };
      const blocks = [...(i === 0 ? before : []), item, ...(i === items.length - 1 ? after : [])];
      for (const b of blocks) {
        s.text.push(...plainText(b));
        collect(b, s);
      }
      push(s);
    });
  }
  return steps;
}

/**
 * The step's heading as the screen and the progress line say it: "Step 4" in a section called
 * Steps (not "Steps · step 4"), "Assembly · step 2" in another, "Checks" for a section taken whole.
 */
export function stepTitle(step: Pick<RunStep, "section" | "number">): string {
  if (!step.number) return step.section;
  return /^steps?$/i.test(step.section.trim()) ? `Step ${step.number}` : `${step.section} · step ${step.number}`;
}
