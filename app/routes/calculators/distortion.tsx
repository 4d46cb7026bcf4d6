import { data, Form, Link } from "react-router";
import type { Route } from "./+types/distortion";
import { readForm } from "~/lib/edge.server";
import { BorePolar, BoreProfile, depthValue, exaggerationFor, type DepthDisplay, type LevelDots } from "~/components/calc/BoreCharts";
import { Caution, Check, Choice, CopyBlock, Fieldset, Method, QuantityField, TextField, UnitSelect, Warnings, useHydrated, type SetValue } from "~/components/calc/controls";
import { NoResult, ResultPeek } from "~/components/calc/ResultPanel";
import { PageHeader } from "~/components/page";
import { useCalcForm } from "~/components/calc/useCalcForm";
import { TWO_POINT_GAUGE_NOTE, toSI, unitLabel, type BoreLevel, type BoreStateResult, type UnitCode } from "~/lib/calc";
import { assertCan, requirePermission } from "~/lib/auth.server";
import { boreSourceFor, distortionValuesFor } from "~/lib/recordings/bore-source.server";
import { DEFAULT_ANGLES, distortionDefaults, profileShape, resultUnitsOfReadings, runDistortionForm, type DistortionOutcome } from "~/lib/calc-ui/distortion-form";
import { formValues, initialForm, type FormValues } from "~/lib/calc-ui/outcome";
import { decimalsOf, formatIn, formatNumber, formatQ, unitOr, type UnitSystem } from "~/lib/calc-ui/units";

export const meta: Route.MetaFunction = () => [{ title: "Bore distortion · Calculators · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "calc:use");
  // ?recording=&cylinder= opens a recording's bore readings (issue 14 §2): reading them needs shop:read too.
  if (!new URL(request.url).searchParams.has("recording")) return { unitSystem: user.unitSystem, boreSource: null, prefill: null, initial: initialOf(user.unitSystem, null) };
  assertCan(request, user, "shop:read");
  const boreSource = await boreSourceFor(request);
  const prefill = boreSource && distortionValuesFor(boreSource, distortionDefaults(user.unitSystem));
  return { unitSystem: user.unitSystem, boreSource, prefill, initial: initialOf(user.unitSystem, prefill) };
}

/** The first values (a recording's readings, else the demo) with results in the readings' units, and the server's outcome. */
function initialOf(system: UnitSystem, prefill: FormValues | null) {
  return initialForm(resultUnitsOfReadings(prefill ?? distortionDefaults(system)), runDistortionForm);
}

export async function action({ request }: Route.ActionArgs) {
  await requirePermission(request, "calc:use");
  const values = formValues(await readForm(request));
  const outcome = runDistortionForm(values);
  return data({ values, outcome }, { status: outcome.result ? 200 : 400 });
}

export default function DistortionPage({ loaderData, actionData }: Route.ComponentProps) {
  const hydrated = useHydrated();
  const { values, outcome, set } = useCalcForm<DistortionOutcome>({
    actionData: actionData as { values: FormValues; outcome: unknown } | undefined,
    // Results open in the readings' units (metric readings in an inch account show in mm and µm).
    initial: loaderData.initial,
    run: runDistortionForm,
    derive: (next, name, value, v) => {
      if (name === "reading.unit") Object.assign(next, resultUnitsOfReadings(next));
      if (name === "mode") {
        const other = value === "radial" ? DEFAULT_ANGLES.diametral : DEFAULT_ANGLES.radial;
        if (v.angles?.replace(/\s/g, "") === other.replace(/\s/g, "")) next.angles = value === "radial" ? DEFAULT_ANGLES.radial : DEFAULT_ANGLES.diametral;
      }
    },
  });
  const e = outcome.errors;
  const radial = values.mode === "radial";
  const compare = values["compare.on"] === "on";

  return (
    <>
      <PageHeader title="Bore distortion" kicker="Calculators" actions={<Link to="/calculators" className="btn">All calculators</Link>}>
        How far a bore is from round and straight: out-of-round and its lobes at each depth, taper along the bore, and the change
        between two states (torque plate on and free, or before and after).
      </PageHeader>
      {loaderData.boreSource && (
        <p className="card mb-4 p-3 text-sm" data-testid="bore-source">
          {loaderData.prefill ? "Readings of" : "No bore readings with a depth and an angle for"} cylinder {loaderData.boreSource.cylinder} from{" "}
          <Link to={`/recordings/${loaderData.boreSource.recordingId}`}>{loaderData.boreSource.title}</Link>
          {loaderData.prefill ? ", laid out by depth and angle." : "; the example readings are shown instead."}
        </p>
      )}
      <Form method="post" noValidate onSubmit={(ev) => hydrated && ev.preventDefault()} className="grid gap-6">
        <div className="grid items-start gap-5 lg:grid-cols-[minmax(0,4fr)_minmax(0,8fr)]">
          <Fieldset legend="How it was measured">
            <Choice
              name="mode"
              label="Gauge"
              values={values}
              set={set}
              errors={e}
              options={[
                { value: "diametral", label: "Two-point gauge: diameters" },
                { value: "radial", label: "Radial: radii about a centre" },
              ]}
              hint={radial ? "Radial readings see every order, odd ones included." : "A two-point gauge cannot see odd orders such as the three-lobed shape (see below)."}
            />
            <div className="grid grid-cols-[minmax(0,1fr)_auto] items-end gap-1.5">
              <TextField name="depths" label="Depths below the deck" values={values} set={set} errors={e} hint="Separated by commas, e.g. 12, 45, 80." />
              <div className={e.depths ? "mb-7" : "mb-5"}>
                <UnitSelect name="depth.unit" kind="length" values={values} set={set} label="Unit of the depths" />
              </div>
            </div>
            <TextField name="angles" label="Angles (degrees)" values={values} set={set} errors={e} hint={radial ? "Equally spaced over 360° (2k + 1 angles show order k)." : "Equally spaced over 180° (k + 1 angles show order k)."} />
            <div>
              <span className="label">Readings are in</span>
              <UnitSelect name="reading.unit" kind="length" values={values} set={set} label="Unit of the readings" />
            </div>
            <QuantityField name="reference" label="Nominal bore" kind="length" optional values={values} set={set} errors={e} hint="The finished size; the profile is drawn against it." />
          </Fieldset>
          <div className="grid gap-5">
            <ReadingGrid prefix="m" labelName="label.main" legend="Measured state" outcome={outcome} values={values} set={set} radial={radial} />
            <div className="grid gap-3">
              <Check name="compare.on" label="Compare with a second state" values={values} set={set} />
              {(compare || !hydrated) && <ReadingGrid prefix="c" labelName="label.compare" legend="Compared state" outcome={outcome} values={values} set={set} radial={radial} />}
            </div>
            {e.grid && <p className="field-error" role="alert">{e.grid}</p>}
            {!hydrated && <button type="submit" className="btn btn-primary justify-self-start">Calculate</button>}
            {hydrated && outcome.result && outcome.result.levels.length > 0 && (
              <ResultPeek
                items={[
                  ["Worst out-of-round", formatQ(Math.max(...outcome.result.levels.map((l) => l.outOfRound_mm)), "mm", unitOr(values["out.small"], "um"))],
                  ["Taper", formatQ(outcome.result.taper_mm, "mm", unitOr(values["out.small"], "um"))],
                ]}
              />
            )}
          </div>
        </div>
        <DistortionResultView outcome={outcome} values={values} set={set} />
      </Form>

      <Method>
        <p>
          <strong>At each depth.</strong> The mean diameter is the average of the readings; out-of-round is the largest diameter
          minus the smallest at that depth. Over the whole bore, taper is the largest mean minus the smallest mean, and top-to-bottom
          taper is the mean at the shallowest depth minus the mean at the deepest (positive: wider at the top).
        </p>
        <p>
          <strong>Lobes (orders).</strong> The shape around the bore is split into waves by a discrete Fourier fit: the radius is
          modelled as a mean plus a sum of waves A<sub>k</sub>·cos(k·(θ − φ<sub>k</sub>)), order 2 being oval, order 3 three-lobed,
          order 4 four-lobed. A<sub>k</sub> is the radial amplitude, φ<sub>k</sub> where its first high point is. The readings must be
          equally spaced; order k needs k + 1 angles over 180° with a two-point gauge, or 2k + 1 over 360° with radial readings.
        </p>
        <p id="two-point-note">
          <strong>Why a two-point gauge cannot see order 3.</strong> {TWO_POINT_GAUGE_NOTE} Put simply: a three-lobed bore has a high
          point opposite a low point everywhere, so the two anvils always span the same distance.
        </p>
        <p>
          <strong>Shape along the bore.</strong> With three or more depths, a middle mean more than 1 µm above the straight line from
          top to bottom is called barrel, more than 1 µm below it hourglass. The polar plots stretch the deviations from round by the
          factor printed on each plot; the dotted circle is the mean size. Method: discrete Fourier series, as in any text on
          roundness measurement (e.g. ISO 12181-1 for the terms).
        </p>
      </Method>
    </>
  );
}

function ReadingGrid({
  prefix,
  labelName,
  legend,
  outcome,
  values,
  set,
  radial,
}: {
  prefix: "m" | "c";
  labelName: string;
  legend: string;
  outcome: DistortionOutcome;
  values: FormValues;
  set: SetValue;
  radial: boolean;
}) {
  const { depths, angles, errors } = outcome;
  const unit = unitLabel(unitOr(values["reading.unit"], "mm"));
  const depthUnit = unitLabel(unitOr(values["depth.unit"], "mm"));
  return (
    <Fieldset legend={legend}>
      <TextField name={labelName} label="Name of this state" numeric={false} values={values} set={set} errors={errors} className="max-w-sm" />
      {depths.length > 0 && angles.length > 0 ? (
        <div className="overflow-x-auto">
          <table className="border-separate border-spacing-1 text-sm" data-testid={`grid-${prefix}`}>
            <caption className="mb-1 text-left text-xs text-graphite-soft">
              {radial ? "Radius" : "Diameter"} in {unit}; rows are depths ({depthUnit}), columns angles.
            </caption>
            <thead>
              <tr>
                <th className="px-1 text-left text-xs font-semibold text-graphite-soft">Depth</th>
                {angles.map((a, j) => (
                  <th key={j} className="px-1 text-center text-xs font-semibold text-graphite-soft">{a}°</th>
                ))}
              </tr>
            </thead>
            <tbody>
              {depths.map((d, i) => (
                <tr key={i}>
                  <th scope="row" className="num pr-1 text-left text-xs font-semibold">{d}</th>
                  {angles.map((a, j) => {
                    const name = `${prefix}.${i}.${j}`;
                    const err = errors[name];
                    return (
                      <td key={j}>
                        <input
                          name={name}
                          aria-label={`${legend}, ${d} ${depthUnit} deep, ${a}°`}
                          title={err}
                          inputMode="decimal"
                          autoComplete="off"
                          className="field num w-[5.6rem] px-1.5 py-1 text-right text-sm"
                          value={values[name] ?? ""}
                          onChange={(ev) => set(name, ev.target.value)}
                          aria-invalid={err ? true : undefined}
                        />
                      </td>
                    );
                  })}
                </tr>
              ))}
            </tbody>
          </table>
          {Object.entries(errors)
            .filter(([k]) => k.startsWith(`${prefix}.`))
            .slice(0, 3)
            .map(([k, m]) => (
              <p key={k} className="field-error" role="alert">
                {cellName(k, outcome)}: {m}
              </p>
            ))}
        </div>
      ) : (
        <p className="text-sm text-graphite-soft">Enter the depths and angles to get the table of readings.</p>
      )}
    </Fieldset>
  );
}

function cellName(key: string, o: DistortionOutcome): string {
  const [, i, j] = key.split(".").map(Number);
  return `${o.depths[i]} deep, ${o.angles[j]}°`;
}

/** Measured deviations from the level's mean radius, on the full circle (diametral readings show at θ and θ + 180°). */
function dotsFor(input: unknown, which: "main" | "compare", levels: BoreLevel[]): LevelDots[] {
  const inp = input as { mode: string; readings: Reading[]; compareTo?: { readings: Reading[] } };
  const readings = which === "main" ? inp.readings : (inp.compareTo?.readings ?? []);
  const radial = inp.mode === "radial";
  return levels.map((l) => {
    const dots: LevelDots["dots"] = [];
    for (const r of readings) {
      const depth = toSI(r.depth.value, r.depth.unit as UnitCode) * 1000;
      if (Math.abs(depth - l.depth_mm) > 1e-6) continue;
      const q = radial ? r.radius! : r.diameter!;
      const v = toSI(q.value, q.unit as UnitCode) * 1000;
      if (radial) dots.push({ angleDeg: r.angleDeg, dev_mm: v - l.meanDiameter_mm / 2 });
      else {
        const dev = (v - l.meanDiameter_mm) / 2;
        dots.push({ angleDeg: r.angleDeg, dev_mm: dev }, { angleDeg: r.angleDeg + 180, dev_mm: dev });
      }
    }
    return { depth_mm: l.depth_mm, dots };
  });
}
type Reading = { depth: { value: number; unit: string }; angleDeg: number; diameter?: { value: number; unit: string }; radius?: { value: number; unit: string } };

function DistortionResultView({ outcome, values, set }: { outcome: DistortionOutcome; values: FormValues; set: SetValue }) {
  const r = outcome.result;
  const su = unitOr(values["out.small"], "um");
  const lu = unitOr(values["out.length"], "mm");
  const mainLabel = values["label.main"]?.trim() || "Measured";
  const compareLabel = values["label.compare"]?.trim() || "Compared";
  const units = (
    <div className="flex flex-wrap items-center gap-2 text-sm text-graphite-soft">
      <span>Show sizes in</span>
      <UnitSelect name="out.length" kind="length" values={values} set={set} label="Show diameters in" />
      <span>and deviations in</span>
      <UnitSelect name="out.small" kind="length" values={values} set={set} label="Show deviations in" />
    </div>
  );
  if (!r)
    return (
      <section className="card grid gap-4" data-testid="calc-result" aria-live="polite">
        {units}
        <NoResult errors={outcome.errors} />
        <Caution />
      </section>
    );
  const ref_mm = (outcome.input as { reference?: { value: number; unit: string } } | undefined)?.reference;
  const reference_mm = ref_mm ? toSI(ref_mm.value, ref_mm.unit as UnitCode) * 1000 : r.levels.reduce((a, l) => a + l.meanDiameter_mm, 0) / r.levels.length;
  const dots = dotsFor(outcome.input, "main", r.levels);
  const cdots = r.compared ? dotsFor(outcome.input, "compare", r.compared.levels) : [];
  const maxDev = Math.max(
    ...[...dots, ...cdots].flatMap((d) => d.dots.map((p) => Math.abs(p.dev_mm))),
    ...[...r.levels, ...(r.compared?.levels ?? [])].map((l) => l.outOfRound_mm / 2),
    0,
  );
  const factor = exaggerationFor(maxDev, reference_mm / 2);
  const shape = profileShape(r.levels);
  const shapeText =
    shape.shape === "unknown"
      ? "Shape along the bore needs three depths"
      : shape.shape === "straight"
        ? "Straight (no barrel or hourglass)"
        : `${shape.shape === "barrel" ? "Barrel" : "Hourglass"}: middle ${formatIn(Math.abs(shape.bulge_mm), "mm", su)} ${unitLabel(su)} ${shape.bulge_mm > 0 ? "wide" : "narrow"} of the straight line`;
  const small = (mm: number) => `${formatIn(mm, "mm", su)}`;
  const depth: DepthDisplay = { unit: unitOr(values["depth.unit"], "mm"), decimals: Math.max(0, ...outcome.depths.map(decimalsOf)) };
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
            <div className="text-xs font-semibold uppercase tracking-[0.12em] text-graphite-soft">Change ({mainLabel} − {compareLabel})</div>
            <p className="num mt-1 text-sm">Taper {signed(r.difference.taper_mm, su)} {unitLabel(su)}</p>
            <p className="num text-sm">Top-to-bottom {signed(r.difference.taperTopToBottom_mm, su)} {unitLabel(su)}</p>
            <p className="num text-sm">
              Out-of-round, largest change {signed(maxBy(r.difference.levels.map((l) => l.outOfRound_mm)), su)} {unitLabel(su)}
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
          Looking down the bore, 0° at the top, angles clockwise. Solid: {mainLabel} (dots are the readings{values.mode === "radial" ? "" : ", each shown at both ends of its diameter"}); dashed: {compareLabel}. Deviations from round are drawn {new Intl.NumberFormat("en-US").format(factor)} times larger than the bore.
        </p>
      </div>

      <div className="grid items-start gap-6 lg:grid-cols-2">
        <div>
          <h3 className="mb-2 text-lg">Diameter along the bore</h3>
          <BoreProfile levels={r.levels} compared={r.compared?.levels} reference_mm={reference_mm} smallUnit={su} lengthUnit={lu} depth={depth} mainLabel={mainLabel} compareLabel={compareLabel} shape={shapeText} />
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

function signed(mm: number, su: UnitCode): string {
  const s = formatIn(mm, "mm", su);
  return mm > 0 && !/^0(\.0*)?$/.test(s) ? `+${s}` : s;
}
function maxBy(xs: number[]): number {
  return xs.reduce((a, x) => (Math.abs(x) > Math.abs(a) ? x : a), 0);
}

function Summary({ title, s, su, testId }: { title: string; s: BoreStateResult; su: UnitCode; testId?: string }) {
  const oor = Math.max(...s.levels.map((l) => l.outOfRound_mm));
  return (
    <div className="rounded-md border border-rule bg-paper px-3 py-2" data-testid={testId}>
      <div className="text-xs font-semibold uppercase tracking-[0.12em] text-graphite-soft">{title}</div>
      <p className="num mt-1 text-sm">
        Worst out-of-round <span className="font-serif text-lg font-semibold" data-testid={testId ? "result-oor" : undefined}>{formatIn(oor, "mm", su)}</span> {unitLabel(su)}
      </p>
      <p className="num text-sm">
        Taper <span data-testid={testId ? "result-taper" : undefined}>{formatIn(s.taper_mm, "mm", su)}</span> {unitLabel(su)}
      </p>
      <p className="num text-sm">Top-to-bottom {signed(s.taperTopToBottom_mm, su)} {unitLabel(su)}</p>
    </div>
  );
}

function LevelTable({ title, levels, lu, su, depth, small }: { title: string; levels: BoreLevel[]; lu: UnitCode; su: UnitCode; depth: DepthDisplay; small: (mm: number) => string }) {
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
