/** The Bore distortion result: a summary per state and their change, the polar plots, the profile and the figures by depth. */
import { unitLabel, type BoreLevel, type BoreStateResult, type UnitCode } from "~/lib/calc";
import type { DistortionOutcome } from "~/lib/calc-ui/distortion-form";
import { depthValue, distortionView, largestChange, signedIn, worstOutOfRound, type DepthDisplay } from "~/lib/calc-ui/distortion-view";
import type { FormValues } from "~/lib/calc-ui/outcome";
import { formatIn, formatNumber } from "~/lib/calc-ui/units";
import { BorePolar, BoreProfile } from "./BoreCharts";
import { Caution, CopyBlock, UnitSelect, Warnings, type SetValue } from "./controls";
import { NoResult } from "./ResultPanel";

export function DistortionResultView({ outcome, values, set }: { outcome: DistortionOutcome; values: FormValues; set: SetValue }) {
  const r = outcome.result;
  const { su, lu, mainLabel, compareLabel, depth, plot } = distortionView(outcome, values);
  const units = (
    <div className="flex flex-wrap items-center gap-2 text-sm text-graphite-soft">
      <span>Show sizes in</span>
      <UnitSelect name="out.length" kind="length" values={values} set={set} label="Show diameters in" />
      <span>and deviations in</span>
      <UnitSelect name="out.small" kind="length" values={values} set={set} label="Show deviations in" />
    </div>
  );
  if (!r || !plot)
    return (
      <section className="card grid gap-4" data-testid="calc-result" aria-live="polite">
        {units}
        <NoResult errors={outcome.errors} />
        <Caution />
      </section>
    );
  const { reference_mm, dots, comparedDots: cdots, factor, shape: shapeText } = plot;
  const small = (mm: number) => `${formatIn(mm, "mm", su)}`;
  return (
    <section className="card grid gap-6" data-testid="calc-result" aria-live="polite" aria-label="Result">
      <div className="flex flex-wrap items-start justify-between gap-4">
        <h2 className="text-xl">Result</h2>
        {units}
      </div>
      <div className="grid gap-4 sm:grid-cols-3">
        <Summary title={mainLabel} s={r} su={su} testId="result-main" />
        {r.compared && <Summary title={compareLabel} s={r.compared} su={su} />}
        {r.difference && (
          <div className="rounded-md border border-rule bg-paper px-3 py-2">
            <div className="text-xs font-semibold uppercase tracking-[0.12em] text-graphite-soft">
              Change ({mainLabel} − {compareLabel})
            </div>
            <p className="num mt-1 text-sm">
              Taper {signedIn(r.difference.taper_mm, su)} {unitLabel(su)}
            </p>
            <p className="num text-sm">
              Top-to-bottom {signedIn(r.difference.taperTopToBottom_mm, su)} {unitLabel(su)}
            </p>
            <p className="num text-sm">
              Out-of-round, largest change {signedIn(largestChange(r.difference.levels.map((l) => l.outOfRound_mm)), su)} {unitLabel(su)}
            </p>
          </div>
        )}
      </div>
      <Warnings warnings={r.warnings} />
      <Caution />

      <div>
        <h3 className="mb-2 text-lg">Shape at each depth</h3>
        <div className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-4">
          {r.levels.map((l, i) => {
            const cl = r.compared?.levels.find((x) => Math.abs(x.depth_mm - l.depth_mm) < 1e-6);
            const cd = cdots.find((x) => Math.abs(x.depth_mm - l.depth_mm) < 1e-6);
            return (
              <BorePolar
                key={l.depth_mm}
                level={l}
                dots={dots[i].dots}
                compared={cl}
                comparedDots={cd?.dots}
                factor={factor}
                radius_mm={reference_mm / 2}
                smallUnit={su}
                depth={depth}
                mainLabel={mainLabel}
                compareLabel={compareLabel}
              />
            );
          })}
        </div>
        <p className="mt-2 text-xs text-graphite-soft">
          Looking down the bore, 0° at the top, angles clockwise. Solid: {mainLabel} (dots are the readings
          {values.mode === "radial" ? "" : ", each shown at both ends of its diameter"}); dashed: {compareLabel}. Deviations from round are
          drawn {new Intl.NumberFormat("en-US").format(factor)} times larger than the bore.
        </p>
      </div>

      <div className="grid items-start gap-6 lg:grid-cols-2">
        <div>
          <h3 className="mb-2 text-lg">Diameter along the bore</h3>
          <BoreProfile
            levels={r.levels}
            compared={r.compared?.levels}
            reference_mm={reference_mm}
            smallUnit={su}
            lengthUnit={lu}
            depth={depth}
            mainLabel={mainLabel}
            compareLabel={compareLabel}
            shape={shapeText}
          />
        </div>
        <div className="overflow-x-auto">
          <h3 className="mb-2 text-lg">Figures by depth</h3>
          <LevelTable title={mainLabel} levels={r.levels} lu={lu} su={su} depth={depth} small={small} />
          {r.compared && <LevelTable title={compareLabel} levels={r.compared.levels} lu={lu} su={su} depth={depth} small={small} />}
        </div>
      </div>
      <CopyBlock calculator="distortion" input={outcome.input} />
    </section>
  );
}

function Summary({ title, s, su, testId }: { title: string; s: BoreStateResult; su: UnitCode; testId?: string }) {
  const oor = worstOutOfRound(s.levels);
  return (
    <div className="rounded-md border border-rule bg-paper px-3 py-2" data-testid={testId}>
      <div className="text-xs font-semibold uppercase tracking-[0.12em] text-graphite-soft">{title}</div>
      <p className="num mt-1 text-sm">
        Worst out-of-round{" "}
        <span className="font-serif text-lg font-semibold" data-testid={testId ? "result-oor" : undefined}>
          {formatIn(oor, "mm", su)}
        </span>{" "}
        {unitLabel(su)}
      </p>
      <p className="num text-sm">
        Taper <span data-testid={testId ? "result-taper" : undefined}>{formatIn(s.taper_mm, "mm", su)}</span> {unitLabel(su)}
      </p>
      <p className="num text-sm">
        Top-to-bottom {signedIn(s.taperTopToBottom_mm, su)} {unitLabel(su)}
      </p>
    </div>
  );
}

function LevelTable({
  title,
  levels,
  lu,
  su,
  depth,
  small,
}: {
  title: string;
  levels: BoreLevel[];
  lu: UnitCode;
  su: UnitCode;
  depth: DepthDisplay;
  small: (mm: number) => string;
}) {
  const orders = [...new Set(levels.flatMap((l) => l.orders.map((o) => o.order)))].sort((a, b) => a - b).slice(0, 4);
  return (
    <table className="mb-4 w-full text-sm">
      <caption className="mb-1 text-left text-xs font-semibold uppercase tracking-[0.12em] text-graphite-soft">{title}</caption>
      <thead>
        <tr className="text-left text-xs text-graphite-soft">
          <th className="py-1 pr-2 font-semibold">Depth, {unitLabel(depth.unit)}</th>
          <th className="py-1 pr-2 text-right font-semibold">Mean, {unitLabel(lu)}</th>
          <th className="py-1 pr-2 text-right font-semibold">Out-of-round, {unitLabel(su)}</th>
          {orders.map((k) => (
            <th key={k} className="py-1 pr-2 text-right font-semibold">
              Order {k}, {unitLabel(su)} @ °
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {levels.map((l) => (
          <tr key={l.depth_mm} className="num border-t border-rule/70">
            <td className="py-1 pr-2">{depthValue(l.depth_mm, depth)}</td>
            <td className="py-1 pr-2 text-right">{formatIn(l.meanDiameter_mm, "mm", lu, 1)}</td>
            <td className="py-1 pr-2 text-right">{small(l.outOfRound_mm)}</td>
            {orders.map((k) => {
              const o = l.orders.find((x) => x.order === k);
              return (
                <td key={k} className="py-1 pr-2 text-right">
                  {o ? `${small(o.radialAmplitude_mm)} @ ${formatNumber(o.phaseDeg, 0)}` : "—"}
                </td>
              );
            })}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
