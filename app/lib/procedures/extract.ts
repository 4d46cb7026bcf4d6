/**
 * What a save extracts from the document into tables: procedure links, specs and video moments.
 * An incomplete block of a draft (no label, no recording…) has no row: a test record or a
 * search hit cannot use half a spec, and the block itself says what it lacks.
 */
import { SI_UNIT, toSI, type UnitCode, type UnitKind } from "~/lib/calc";
import { blockProblems, walk, type JSONNode, type MomentAttrs, type SpecAttrs } from "./document";

export type ExtractedSpec = {
  specKey: string;
  position: number;
  label: string;
  quantity: UnitKind;
  unit: string;
  nominal: number | null;
  min: number | null;
  max: number | null;
  siUnit: string;
  nominalSi: number | null;
  minSi: number | null;
  maxSi: number | null;
  note: string;
};
export type ExtractedMoment = { position: number; recordingId: string; startS: number; endS: number | null; caption: string };
export type Extracted = { links: string[]; specs: ExtractedSpec[]; moments: ExtractedMoment[] };

const si = (v: number | null, unit: string) => (v == null ? null : toSI(v, unit as UnitCode));

export function extract(doc: JSONNode): Extracted {
  const links = new Set<string>();
  const specs: ExtractedSpec[] = [];
  const moments: ExtractedMoment[] = [];
  walk(doc, (n) => {
    if (n.type === "procedureLink" && typeof n.attrs?.procedureId === "string") links.add(n.attrs.procedureId);
    if ((n.type === "spec" || n.type === "videoMoment") && blockProblems(n).length) return;
    if (n.type === "spec") {
      const a = n.attrs as SpecAttrs;
      specs.push({
        specKey: a.id,
        position: specs.length,
        label: a.label,
        quantity: a.quantity,
        unit: a.unit,
        nominal: a.nominal ?? null,
        min: a.min ?? null,
        max: a.max ?? null,
        siUnit: SI_UNIT[a.quantity],
        nominalSi: si(a.nominal ?? null, a.unit),
        minSi: si(a.min ?? null, a.unit),
        maxSi: si(a.max ?? null, a.unit),
        note: a.note ?? "",
      });
    }
    if (n.type === "videoMoment") {
      const a = n.attrs as MomentAttrs;
      moments.push({
        position: moments.length,
        recordingId: a.recordingId,
        startS: a.start,
        endS: a.end ?? null,
        caption: a.caption ?? "",
      });
    }
  });
  return { links: [...links], specs, moments };
}
