/**
 * Our custom TipTap nodes, defined once, schema only (no node views, no DOM). The editor
 * `.extend()`s each with a React node view (app/components/procedures/editor/); the server
 * uses the same definitions to check a document's structure (schema-check.server.ts).
 */
import { mergeAttributes, Node } from "@tiptap/core";

const json = (name: string) => ({
  default: null as unknown,
  parseHTML: (el: HTMLElement) => {
    const raw = el.getAttribute(`data-${name}`);
    try {
      return raw ? JSON.parse(raw) : null;
    } catch {
      return null;
    }
  },
  renderHTML: (attrs: Record<string, unknown>) => ({ [`data-${name}`]: JSON.stringify(attrs[name] ?? null) }),
});
const plain = (name: string, def: unknown = null) => ({
  default: def,
  parseHTML: (el: HTMLElement) => el.getAttribute(`data-${name}`) ?? def,
  renderHTML: (attrs: Record<string, unknown>) => (attrs[name] == null ? {} : { [`data-${name}`]: String(attrs[name]) }),
});
const numeric = (name: string, def: number | null = null) => ({
  default: def,
  parseHTML: (el: HTMLElement) => {
    const v = el.getAttribute(`data-${name}`);
    return v == null || v === "" ? def : Number(v);
  },
  renderHTML: (attrs: Record<string, unknown>) => (attrs[name] == null ? {} : { [`data-${name}`]: String(attrs[name]) }),
});

export const ProcedureLinkNode = Node.create({
  name: "procedureLink",
  group: "inline",
  inline: true,
  atom: true,
  selectable: true,
  addAttributes: () => ({ procedureId: plain("procedure-id") }),
  parseHTML: () => [{ tag: "span[data-procedure-link]" }],
  renderHTML: ({ HTMLAttributes }) => ["span", mergeAttributes(HTMLAttributes, { "data-procedure-link": "" }), "procedure"],
});

export const CalculatorNode = Node.create({
  name: "calculator",
  group: "block",
  atom: true,
  draggable: true,
  addAttributes: () => ({ kind: plain("kind", "preload"), title: plain("title", ""), preset: json("preset") }),
  parseHTML: () => [{ tag: "div[data-calculator]" }],
  renderHTML: ({ HTMLAttributes }) => ["div", mergeAttributes(HTMLAttributes, { "data-calculator": "" })],
});

export const VideoMomentNode = Node.create({
  name: "videoMoment",
  group: "block",
  atom: true,
  draggable: true,
  addAttributes: () => ({
    recordingId: plain("recording-id"),
    start: numeric("start", 0),
    end: numeric("end"),
    caption: plain("caption", ""),
  }),
  parseHTML: () => [{ tag: "figure[data-video-moment]" }],
  renderHTML: ({ HTMLAttributes }) => ["figure", mergeAttributes(HTMLAttributes, { "data-video-moment": "" })],
});

export const SpecNode = Node.create({
  name: "spec",
  group: "block",
  atom: true,
  draggable: true,
  addAttributes: () => ({
    id: plain("spec-id"),
    label: plain("label", ""),
    quantity: plain("quantity", "torque"),
    unit: plain("unit", "N.m"),
    nominal: numeric("nominal"),
    min: numeric("min"),
    max: numeric("max"),
    note: plain("note", ""),
  }),
  parseHTML: () => [{ tag: "div[data-spec]" }],
  renderHTML: ({ HTMLAttributes }) => ["div", mergeAttributes(HTMLAttributes, { "data-spec": "" })],
});

export const CautionNode = Node.create({
  name: "caution",
  group: "block",
  content: "block+",
  defining: true,
  parseHTML: () => [{ tag: "aside[data-caution]" }],
  renderHTML: ({ HTMLAttributes }) => ["aside", mergeAttributes(HTMLAttributes, { "data-caution": "" }), 0],
});

export const CUSTOM_NODES = [ProcedureLinkNode, CalculatorNode, VideoMomentNode, SpecNode, CautionNode];
