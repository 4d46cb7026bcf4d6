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
 * The record's verdict in words, saying what is missing, specs and places counted apart: a spec
 * with no reading at all, and a place (a cylinder, a main journal, a stud) a run offered and left
 * empty while its spec was measured elsewhere: "Incomplete: 1 spec and 2 places not measured".
 * An out-of-spec record with something missing stays "Out of spec" (one bad reading decides it)
 * and says the rest after it.
 */
export function recordVerdictText(verdict: RecordVerdict, notMeasured = 0, places = 0): string {
  const [head, tail] = recordVerdictParts(verdict, notMeasured, places);
  return tail ? `${head} ${tail}` : head;
}

const counted = (n: number, word: string) => `${n} ${word}${n === 1 ? "" : "s"}`;

/** What is missing in words ("1 spec and 2 places not measured"), or null when nothing is. */
export function missingText(notMeasured: number, places: number): string | null {
  const parts = [notMeasured > 0 ? counted(notMeasured, "spec") : null, places > 0 ? counted(places, "place") : null].filter(Boolean);
  return parts.length ? `${parts.join(" and ")} not measured` : null;
}

/**
 * A spec's verdict in words beside its rows (emptyPlaces from evaluateRecord): readings all
 * within with a place left empty are within *so far*, never plainly "Within spec", as the
 * record over them is Incomplete.
 */
export function specVerdictText(verdict: SpecVerdict, emptyPlaces = 0): string {
  const missing = missingText(0, emptyPlaces);
  if (!missing || verdict === "not-measured") return SPEC_VERDICT_LABELS[verdict];
  if (verdict === "within") return `Within spec so far; ${missing}`;
  if (verdict === "unchecked") return `Recorded so far; ${missing}`;
  return `${SPEC_VERDICT_LABELS[verdict]}; ${missing}`;
}

/** recordVerdictText in two parts, so a badge can keep each part on one line: ["Incomplete:", "2 places not measured"]. */
export function recordVerdictParts(verdict: RecordVerdict, notMeasured = 0, places = 0): [string, string | null] {
  const missing = missingText(notMeasured, places);
  if (verdict === "incomplete") return [`${RECORD_VERDICT_LABELS.incomplete}:`, missing ?? "not everything measured"];
  if (verdict === "out" && missing) return [`${RECORD_VERDICT_LABELS.out};`, missing];
  return [RECORD_VERDICT_LABELS[verdict], null];
}

/** How the filing or amending confirmation shows the verdict: red for out of spec, brass for incomplete. */
export function flashKindOf(verdict: RecordVerdict): "ok" | "out" | "caution" {
  return verdict === "out" ? "out" : verdict === "incomplete" ? "caution" : "ok";
}

/** "Bore diameter: Cyl 3, Cyl 4; Main bearing clearance: Main 2": places left empty, grouped by spec, in the order given. */
export function placesText(places: { specLabel: string; label: string }[]): string {
  const bySpec = new Map<string, string[]>();
  for (const p of places) bySpec.set(p.specLabel, [...(bySpec.get(p.specLabel) ?? []), p.label]);
  return [...bySpec].map(([spec, where]) => `${spec}: ${where.join(", ")}`).join("; ");
}

/**
 * What a record lacks, as the record page, its print view and the build sheet say it: the specs
 * with no reading, then the places a run left empty. [] when nothing is missing.
 */
export function missingSentences(notMeasured: string[], places: { specLabel: string; label: string }[]): string[] {
  return [
    notMeasured.length ? `Not measured: ${notMeasured.join(", ")}.` : null,
    places.length ? `Left empty on the run: ${placesText(places)}.` : null,
  ].filter((x): x is string => x != null);
}
