// Verdict names and their words, without the verdict rules (and so without the calc module):
// pages that only list records import these.
export type ReadingVerdict = "within" | "below" | "above" | "unchecked";
export type SpecVerdict = "within" | "out" | "not-measured" | "unchecked";
export type RecordVerdict = "within" | "out";

export const RECORD_VERDICT_LABELS: Record<RecordVerdict, string> = { within: "Within spec", out: "Out of spec" };
export const READING_VERDICT_LABELS: Record<ReadingVerdict, string> = { within: "within", below: "below min", above: "above max", unchecked: "no limit" };
export const SPEC_VERDICT_LABELS: Record<SpecVerdict, string> = { within: "Within spec", out: "Out of spec", "not-measured": "Not measured", unchecked: "Recorded (no limit)" };
