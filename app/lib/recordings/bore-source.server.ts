/**
 * "Open in Bore distortion" from a recording: one cylinder's bore readings as the calculator's
 * fields (`?recording=<id>&cylinder=<n>`), so the numbers typed at the bench are not typed again.
 */
import { z } from "zod";
import { POSITION_RANGES, optionalSearch, uuid, wholeNumberParam } from "~/lib/edge";
import { parseSearch } from "~/lib/edge.server";
import { getRecording, listReadings } from "./library.server";
import { distortionFieldsFor } from "./positions";

export const boreSourceSearch = z.object({
  recording: optionalSearch(uuid),
  cylinder: optionalSearch(
    wholeNumberParam.refine((n) => n >= POSITION_RANGES.cylinder.min && n <= POSITION_RANGES.cylinder.max, {
      message: "Not a cylinder number.",
    }),
  ),
});

export type BoreSource =
  | { recordingId: string; title: string; cylinder: number; values: Record<string, string> }
  | { recordingId: string; title: string; cylinder: number; values: null };

/** The prefill the address asks for; null when it asks for none (a malformed one is a 400). */
export async function boreSourceFor(request: Request): Promise<BoreSource | null> {
  const q = parseSearch(request, boreSourceSearch);
  if (!q.recording || q.cylinder == null) return null;
  const rec = await getRecording(q.recording);
  if (!rec) return null;
  const values = distortionFieldsFor(await listReadings(rec.id), q.cylinder);
  return { recordingId: rec.id, title: rec.title, cylinder: q.cylinder, values };
}

/**
 * The Bore distortion form's values for a source: the person's defaults without the demo's
 * readings, the cylinder's depths, angles and diameters in their cells, no compared state and
 * no nominal (the recording does not say it).
 */
export function distortionValuesFor(source: BoreSource, defaults: Record<string, string>): Record<string, string> | null {
  if (!source.values) return null;
  const kept = Object.fromEntries(Object.entries(defaults).filter(([k]) => !/^[mc]\.\d+\.\d+$/.test(k)));
  return {
    ...kept,
    "compare.on": "",
    "reference.value": "",
    "reference.unit": source.values["reading.unit"],
    "label.main": `Cyl ${source.cylinder}`,
    ...source.values,
  };
}
