// Verdict names and their words, without the verdict rules (and so without the calc module):
// pages that only list records import these.
export type ReadingVerdict = "within" | "below" | "above" | "unchecked";
export type SpecVerdict = "within" | "out" | "not-measured" | "unchecked";
/** "incomplete": nothing out of spec, but at least one spec of the revision was not measured. */
export type RecordVerdict = "within" | "out" | "incomplete";

export const RECORD_VERDICTS = ["within", "out", "incomplete"] as const satisfies readonly RecordVerdict[];

export const RECORD_VERDICT_LABELS: Record<RecordVerdict, string> = { within: "Within spec", out: "Out of spec", incomplete: "Incomplete" };
export const READING_VERDICT_LABELS: Record<ReadingVerdict, string> = {
  within: "within",
  below: "below min",
  above: "above max",
  unchecked: "no limit",
};
export const SPEC_VERDICT_LABELS: Record<SpecVerdict, string> = {
  within: "Within spec",
  out: "Out of spec",
  "not-measured": "Not measured",
  unchecked: "Recorded (no limit)",
};

/**
 * The record's verdict in words, saying what is missing: "Incomplete: 1 spec not measured".
 * An out-of-spec record with unmeasured specs stays "Out of spec" (one bad reading decides it)
 * and says the rest after it.
 */
export function recordVerdictText(verdict: RecordVerdict, notMeasured = 0): string {
  const [head, tail] = recordVerdictParts(verdict, notMeasured);
  return tail ? `${head} ${tail}` : head;
}

/** recordVerdictText in two parts, so a badge can keep each part on one line: ["Incomplete:", "1 spec not measured"]. */
export function recordVerdictParts(verdict: RecordVerdict, notMeasured = 0): [string, string | null] {
  const missing = `${notMeasured} spec${notMeasured === 1 ? "" : "s"} not measured`;
  if (verdict === "incomplete") return [`${RECORD_VERDICT_LABELS.incomplete}:`, missing];
  if (verdict === "out" && notMeasured > 0) return [`${RECORD_VERDICT_LABELS.out};`, missing];
  return [RECORD_VERDICT_LABELS[verdict], null];
}

/** How the filing or amending confirmation shows the verdict: red for out of spec, brass for incomplete. */
export function flashKindOf(verdict: RecordVerdict): "ok" | "out" | "caution" {
  return verdict === "out" ? "out" : verdict === "incomplete" ? "caution" : "ok";
}
