/** The Clearances result: the judged figure and the hot one, the verdicts, the chart against the spec band. */
import { unitLabel } from "~/lib/calc";
import type { ClearanceOutcome } from "~/lib/calc-ui/clearance-form";
import { clearanceView } from "~/lib/calc-ui/clearance-view";
import type { FormValues } from "~/lib/calc-ui/outcome";
import { formatIn, formatNumber, unitOr } from "~/lib/calc-ui/units";
import { ClearanceChart } from "./ClearanceChart";
import { Caution, CopyBlock, Figure, UnitSelect, Warnings, type SetValue } from "./controls";
import { NoResult, ResultPanel } from "./ResultPanel";

export function ClearanceResultView({ outcome, values, set }: { outcome: ClearanceOutcome; values: FormValues; set: SetValue }) {
  const r = outcome.result;
  const su = unitOr(values["out.small"], "mm");
  const unitSel = <UnitSelect name="out.small" kind="length" values={values} set={set} label="Show clearances in" />;
  if (!r)
    return (
      <ResultPanel>
        <div className="flex items-center gap-2 text-sm text-graphite-soft">Show clearances in {unitSel}</div>
        <NoResult errors={outcome.errors} />
        <Caution />
      </ResultPanel>
    );
  const {
    kind,
    out,
    hotBad,
    measured,
    markers,
    band,
    bandLabel,
    verdict: verdictText,
    hotCaution,
    mainLabel,
  } = clearanceView({ ...outcome, result: r });
  const verdict = verdictText && (
    <p
      data-testid="clearance-verdict"
      className={`inline-flex rounded-md px-3 py-1 text-sm font-semibold ${out ? "bg-spec-red-soft text-spec-red" : "bg-ok-soft text-ok"}`}
      role={out ? "alert" : undefined}
    >
      {verdictText}
    </p>
  );
  // The verdict judges the cold clearance only: the hot one says its own, beside it.
  const hotVerdict = hotCaution && (
    <p
      data-testid="hot-verdict"
      role="alert"
      className="inline-flex rounded-md bg-spec-red-soft px-3 py-1 text-sm font-semibold text-spec-red"
    >
      {hotCaution}
    </p>
  );
  return (
    <ResultPanel bad={out || hotBad}>
      <div className="grid gap-4 sm:grid-cols-2">
        <Figure
          label={mainLabel}
          value={formatIn(r.clearance_mm, "mm", su, 1)}
          testId="result-clearance"
          tone={out ? "bad" : undefined}
          unitSelect={unitSel}
        />
        {r.hotClearance_mm !== undefined && (
          <Figure
            label="Hot clearance"
            value={`${formatIn(r.hotClearance_mm, "mm", su, 1)} ${unitLabel(su)}`}
            testId="result-hot"
            tone={hotBad ? "bad" : undefined}
          />
        )}
        {r.recommendedGap_mm !== undefined && kind === "ring-gap" && measured && (
          <Figure
            label="Recommended gap (shop guidance)"
            value={`${formatIn(r.recommendedGap_mm, "mm", su, 1)} ${unitLabel(su)}`}
            testId="result-recommended"
          />
        )}
        {r.perInchOfDiameter !== undefined && (
          <Figure
            label={kind === "bearing" ? "Per inch of journal" : "Per inch of bore"}
            value={`${formatNumber(r.perInchOfDiameter * 1000, 2)} thou/in`}
          />
        )}
      </div>
      {(verdict || hotVerdict) && (
        <div className="flex flex-wrap gap-2">
          {verdict}
          {hotVerdict}
        </div>
      )}
      <Warnings warnings={r.warnings} red={(w) => /spec|seize|interference|butt|negative|melt|near zero/i.test(w)} />
      <Caution />
      <ClearanceChart markers={markers} band={band} bandLabel={bandLabel} unit={su} />
      <CopyBlock calculator="clearance" input={outcome.input} />
    </ResultPanel>
  );
}
