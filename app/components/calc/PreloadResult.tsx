/** The Preload result: clamp load, torque, stress and its share of yield, the chart, the bench fit, the thread's figures and limits. */
import { NUT_FACTOR_R_SQUARED_LABEL, unitLabel } from "~/lib/calc";
import type { FormValues } from "~/lib/calc-ui/outcome";
import { UNIFIED_STRESS_AREA_NOTE, d3Label, type PreloadOutcome } from "~/lib/calc-ui/preload-form";
import { YIELD_LIMIT_PERCENT, lubeOf, preloadView, shownWarnings, torqueShares } from "~/lib/calc-ui/preload-view";
import { formatIn, formatNumber, formatQ } from "~/lib/calc-ui/units";
import { Caution, CopyBlock, Figure, UnitSelect, Warnings, type SetValue } from "./controls";
import { PreloadChart } from "./PreloadChart";
import { FigureTable, NoResult, ResultPanel } from "./ResultPanel";
import { SaveAsReadings } from "./SaveAsReadings";

export function PreloadResultView({
  outcome,
  values,
  set,
  canSaveReadings,
}: {
  outcome: PreloadOutcome;
  values: FormValues;
  set: SetValue;
  canSaveReadings: boolean;
}) {
  const r = outcome.result;
  const { fu, tu, su, lu, toTorque, modelLabel, over, yieldForce_N: yieldForce, limits } = preloadView(outcome, values);
  if (!r)
    return (
      <ResultPanel>
        <NoResult errors={outcome.errors} />
        <Caution />
        <HiddenOutUnits values={values} />
      </ResultPanel>
    );
  const pct = r.percentOfYield;
  return (
    <ResultPanel bad={over}>
      <div className="grid gap-4 sm:grid-cols-2">
        <Figure
          label={toTorque ? "Clamp load asked for" : "Clamp load (preload)"}
          value={formatIn(r.preload_N, "N", fu)}
          testId="result-preload"
          unitSelect={<UnitSelect name="out.force" kind="force" values={values} set={set} label="Show clamp load in" />}
        />
        <Figure
          label={toTorque ? "Tightening torque" : "Torque applied"}
          value={formatIn(r.torque_Nm, "N.m", tu)}
          testId="result-torque"
          unitSelect={<UnitSelect name="out.torque" kind="torque" values={values} set={set} label="Show torque in" />}
        />
        <Figure
          label="Stress in the thread"
          value={formatIn(r.stress_MPa, "MPa", su)}
          testId="result-stress"
          tone={over ? "bad" : undefined}
          unitSelect={<UnitSelect name="out.stress" kind="stress" values={values} set={set} label="Show stress in" />}
        />
        {pct !== undefined ? (
          <div>
            <Figure label="Of the yield strength" value={`${formatNumber(pct, 1)} %`} tone={over ? "bad" : "ok"} testId="result-percent" />
            <div className="mt-2 h-2 w-full overflow-hidden rounded bg-paper-deep" aria-hidden>
              <div className={`h-full ${over ? "bg-spec-red" : "bg-ok"}`} style={{ width: `${Math.min(100, pct)}%` }} />
            </div>
          </div>
        ) : (
          <p className="self-center text-sm text-graphite-soft">Pick a property class to see how close this is to yield.</p>
        )}
      </div>
      {over && (
        <div
          role="alert"
          data-testid="yield-alert"
          className="rounded-md border border-spec-red/50 bg-spec-red-soft px-3 py-2 text-sm font-semibold text-spec-red"
        >
          Out of spec: the stress is {formatNumber(pct!, 1)} % of the material's minimum yield, past the {YIELD_LIMIT_PERCENT} % limit.
          Lower the torque, use a stronger class, or check the nut factor.
        </div>
      )}
      <Warnings warnings={shownWarnings(r)} red={(w) => /yield/.test(w)} />
      <Caution />
      <PreloadChart
        result={r}
        yieldForce_N={yieldForce}
        fit={outcome.fit}
        points={outcome.points}
        torqueUnit={tu}
        forceUnit={fu}
        modelLabel={modelLabel}
      />
      {outcome.fit && (
        <div className="rounded-md border border-teal/40 bg-teal-soft/50 px-3 py-2 text-sm" data-testid="fit-summary">
          <p className="font-semibold text-teal">
            Bench readings give K = {formatNumber(outcome.fit.k, 3)} ± {formatNumber(outcome.fit.kStdDev, 3)}
          </p>
          <p className="text-graphite-soft">
            {outcome.fit.n} points, scatter {formatNumber(outcome.fit.kCoefficientOfVariation * 100, 1)} % (coefficient of variation),{" "}
            {NUT_FACTOR_R_SQUARED_LABEL} {formatNumber(outcome.fit.rSquared, 3)}.
          </p>
          {outcome.fit.warnings.map((w) => (
            <p key={w} className="text-graphite-soft">
              {w}
            </p>
          ))}
        </div>
      )}
      {canSaveReadings && outcome.points && outcome.points.length > 0 && (
        <SaveAsReadings
          points={outcome.points}
          torqueUnit={values["points.torqueUnit"] ?? "N.m"}
          forceUnit={values["points.forceUnit"] ?? "kN"}
          lube={lubeOf(values)}
        />
      )}
      <div className="grid gap-5 sm:grid-cols-2">
        <div data-testid="thread-figures">
          <FigureTable
            caption={`Thread ${String((outcome.input as { thread: string }).thread)}`}
            rows={[
              ["Nominal diameter d", formatQ(r.thread.d_mm, "mm", "mm", 0)],
              ["Pitch P", `${formatNumber(r.thread.pitch_mm, 4)} mm`],
              ["Pitch diameter d2", `${formatNumber(r.thread.d2_mm, 3)} mm`],
              [d3Label(r.thread.system), `${formatNumber(r.thread.d3_mm, 3)} mm`],
              ["Stress area As", `${formatNumber(r.thread.stressArea_mm2, 1)} mm²`],
            ]}
          />
          {r.thread.system === "unified" && <p className="mt-1 text-xs text-graphite-soft">{UNIFIED_STRESS_AREA_NOTE}</p>}
        </div>
        <div className="grid content-start gap-4">
          {r.torqueSplit && (
            <FigureTable
              caption="Where the torque goes"
              rows={torqueShares(r).map((p) => [
                p.what,
                `${formatIn(p.torque_Nm, "N.m", tu)} ${unitLabel(tu)} (${formatNumber(p.percent, 0)} %)`,
              ])}
            />
          )}
          {r.elongation_mm !== undefined && (
            <div>
              <Figure
                label="Stretch over the grip"
                value={formatIn(r.elongation_mm, "mm", lu, 1)}
                testId="result-elongation"
                unitSelect={<UnitSelect name="out.length" kind="length" values={values} set={set} label="Show stretch in" />}
              />
              <p className="mt-1 text-xs text-graphite-soft">Simplified: stress area over the whole grip (see below).</p>
            </div>
          )}
          {limits && (
            <FigureTable
              caption="Limits for this thread"
              rows={[
                ["Clamp load at yield", formatQ(limits.atYield_N, "N", fu)],
                [`At ${YIELD_LIMIT_PERCENT} % of yield`, formatQ(limits.atLimit_N, "N", fu)],
                [`Torque for ${YIELD_LIMIT_PERCENT} %`, formatQ(limits.torqueForLimit_Nm, "N.m", tu)],
              ]}
            />
          )}
        </div>
      </div>
      {r.elongation_mm === undefined && <input type="hidden" name="out.length" value={values["out.length"] ?? ""} />}
      <CopyBlock calculator="preload" input={outcome.input} />
    </ResultPanel>
  );
}

function HiddenOutUnits({ values }: { values: FormValues }) {
  return (
    <>
      {["out.force", "out.torque", "out.stress", "out.length"].map((n) => (
        <input key={n} type="hidden" name={n} value={values[n] ?? ""} />
      ))}
    </>
  );
}
