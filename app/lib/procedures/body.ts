/**
 * What a document's body needs besides its HTML, worked out from the document alone: the
 * procedures and recordings it names (their current titles are looked up for the links and
 * moments), and its calculator widgets with their first outcome and the labels of the units
 * they use, so that the browser needs no unit tables.
 */
import { unitLabel, type UnitCode } from "~/lib/calc";
import type { CalcOutcome } from "./calc-shared";
import { numericLeaves, runCalculator } from "./calc-presets";
import { walk, type CalculatorAttrs, type JSONNode } from "./document";

export type Widget = { kind: "calculator"; attrs: CalculatorAttrs; outcome: CalcOutcome };

/** The procedures linked and the recordings shown in one or more documents (each id once). */
export function docReferences(...docs: JSONNode[]): { procedureIds: string[]; recordingIds: string[] } {
  const procedureIds = new Set<string>();
  const recordingIds = new Set<string>();
  for (const doc of docs)
    walk(doc, (n) => {
      if (n.type === "procedureLink") procedureIds.add(String(n.attrs?.procedureId));
      if (n.type === "videoMoment") recordingIds.add(String(n.attrs?.recordingId));
    });
  return { procedureIds: [...procedureIds], recordingIds: [...recordingIds] };
}

/** The calculators of a body, in document order, and the label of every unit its specs and calculators use. */
export function bodyWidgets(doc: JSONNode): { widgets: Widget[]; units: Record<string, string> } {
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
  return { widgets, units };
}
