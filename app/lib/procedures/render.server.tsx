/**
 * Server-side HTML of a revision's body; the read page hydrates only the calculator widgets in it.
 * Rendering a long page takes milliseconds of CPU, so the result is kept in a small in-process
 * cache keyed by the document's content and the current titles it shows (a procedure link shows
 * the target's current title, a video moment its recording's): a rename renders anew, nothing
 * stale is served, and a published revision, which never changes, renders once per process.
 */
import { createHash } from "node:crypto";
import { renderToStaticMarkup } from "react-dom/server";
import { renderDoc } from "~/components/procedures/DocView";
import type { Widget } from "~/components/procedures/ProcedureBody";
import { unitLabel, type UnitCode } from "~/lib/calc";
import { numericLeaves, runCalculator } from "./calc-presets";
import type { CalculatorAttrs, JSONNode } from "./document";
import { walk } from "./document";
import { recordingTitles, titlesFor } from "./workflow.server";

export type { Widget };
/** `units`: the label of every unit code the body's specs and calculators use, so that the client needs no unit tables. */
type Rendered = { html: string; widgets: Widget[]; units: Record<string, string> };

const MAX_ENTRIES = 64;
const MAX_BYTES = 16 * 1024 * 1024;
const cache = new Map<string, Rendered>(); // insertion order = least recently used first
let bytes = 0;

function remember(key: string, value: Rendered) {
  cache.set(key, value);
  bytes += value.html.length * 2;
  while (cache.size > MAX_ENTRIES || bytes > MAX_BYTES) {
    const [oldest, v] = cache.entries().next().value as [string, Rendered];
    cache.delete(oldest);
    bytes -= v.html.length * 2;
  }
}

export async function renderBody(doc: JSONNode): Promise<Rendered> {
  const procIds = new Set<string>();
  const recIds = new Set<string>();
  walk(doc, (n) => {
    if (n.type === "procedureLink") procIds.add(String(n.attrs?.procedureId));
    if (n.type === "videoMoment") recIds.add(String(n.attrs?.recordingId));
  });
  const [procedures, recordings] = await Promise.all([titlesFor([...procIds]), recordingTitles([...recIds])]);
  const key = createHash("sha256")
    .update(JSON.stringify(doc))
    .update(JSON.stringify([[...procedures].sort(), [...recordings].sort()]))
    .digest("base64url");
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key); // refresh its place
    cache.set(key, hit);
    return hit;
  }
  const widgets: Widget[] = [];
  const units: Record<string, string> = {};
  const addUnit = (u: unknown) => {
    if (typeof u !== "string" || u in units) return;
    try {
      units[u] = unitLabel(u as UnitCode);
    } catch {
      units[u] = u;
    }
  };
  walk(doc, (n) => {
    if (n.type === "spec") addUnit(n.attrs?.unit);
    if (n.type === "calculator") {
      const attrs = n.attrs as CalculatorAttrs;
      for (const l of numericLeaves(attrs.preset)) addUnit(l.unit);
      widgets.push({ kind: "calculator", attrs, outcome: runCalculator(attrs.kind, attrs.preset) });
    }
  });
  const html = renderToStaticMarkup(<>{renderDoc(doc, { procedures, recordings })}</>);
  const rendered = { html, widgets, units };
  remember(key, rendered);
  return rendered;
}
