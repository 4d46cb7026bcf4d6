/**
 * Amendment history (pure): what an amendment changed, field by field and spec by spec, and
 * which reading set was in force at a given version.
 */
import type { AmendmentChange } from "~/db/schema/test-records";
import { unitLabel, type UnitCode } from "~/lib/calc";
import { typedText } from "~/lib/typed-number";

export type HeaderFields = {
  title: string;
  engineSerial: string;
  testedOn: string;
  notes: string;
  recordingStartS: number | null;
  recordingEndS: number | null;
};
export const HEADER_LABELS: Record<keyof HeaderFields, string> = {
  title: "Title",
  engineSerial: "Engine serial",
  testedOn: "Test date",
  notes: "Notes",
  recordingStartS: "Recording from (s)",
  recordingEndS: "Recording to (s)",
};

/** `decimals`: as many as were typed (88.010 → 3), so the history reads as typed. */
export type VersionedReading = { specId: string; value: number; decimals?: number | null; unit: string; note: string };

function unitText(u: string): string {
  try {
    return unitLabel(u as UnitCode);
  } catch {
    return u;
  }
}

/** "88.012 mm (cyl 1 top)" — how a reading reads in the history. */
export function readingText(r: VersionedReading): string {
  return `${typedText(r.value, r.decimals)} ${unitText(r.unit)}${r.note ? ` (${r.note})` : ""}`;
}

export function diffAmendment(
  before: { header: HeaderFields; readings: VersionedReading[] },
  after: { header: HeaderFields; readings: VersionedReading[] },
  specLabels: Map<string, string>,
): AmendmentChange[] {
  const changes: AmendmentChange[] = [];
  for (const key of Object.keys(HEADER_LABELS) as (keyof HeaderFields)[]) {
    const b = before.header[key] ?? "";
    const a = after.header[key] ?? "";
    if (String(b) !== String(a)) changes.push({ kind: "field", key, label: HEADER_LABELS[key], before: String(b), after: String(a) });
  }
  const specIds = [...new Set([...before.readings, ...after.readings].map((r) => r.specId))];
  const order = [...specLabels.keys()];
  specIds.sort((x, y) => order.indexOf(x) - order.indexOf(y));
  for (const specId of specIds) {
    const b = before.readings.filter((r) => r.specId === specId).map(readingText);
    const a = after.readings.filter((r) => r.specId === specId).map(readingText);
    if (b.join("\n") !== a.join("\n")) {
      changes.push({
        kind: "spec",
        key: specId,
        label: specLabels.get(specId) ?? "Spec",
        before: b.join("; ") || "not measured",
        after: a.join("; ") || "not measured",
      });
    }
  }
  return changes;
}

/** The readings in force at `version`: the latest stored version at or below it. */
export function readingsAtVersion<R extends { version: number }>(rows: R[], version: number): R[] {
  const versions = [...new Set(rows.map((r) => r.version))].filter((v) => v <= version).sort((a, b) => b - a);
  if (!versions.length) return [];
  return rows.filter((r) => r.version === versions[0]);
}
