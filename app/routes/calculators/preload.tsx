import { data, Form, Link } from "react-router";
import type { Route } from "./+types/preload";
import { readForm } from "~/lib/edge.server";
import { Caution, Check, Choice, CopyBlock, Fieldset, Figure, Method, QuantityField, TextField, UnitSelect, Warnings, useHydrated, type SetValue } from "~/components/calc/controls";
import { PreloadChart } from "~/components/calc/PreloadChart";
import { FigureTable, NoResult, ResultPanel, ResultPeek } from "~/components/calc/ResultPanel";
import { PageHeader } from "~/components/page";
import { useCalcForm } from "~/components/calc/useCalcForm";
import { NUT_FACTOR_PRESETS, NUT_FACTOR_R_SQUARED_LABEL, PROPERTY_CLASSES, THREAD_PRESETS, unitLabel, type UnitCode } from "~/lib/calc";
import { requirePermission } from "~/lib/auth.server";
import { can } from "~/lib/permissions";
import { SaveAsReadings } from "~/components/calc/SaveAsReadings";
import { formValues, initialForm, type FormValues } from "~/lib/calc-ui/outcome";
import { DEFAULT_MODULUS_GPA, UNIFIED_STRESS_AREA_NOTE, d3Label, preloadDefaults, runPreloadForm, type PreloadOutcome } from "~/lib/calc-ui/preload-form";
import { followInputSystem, formatIn, formatNumber, formatQ, unitOr } from "~/lib/calc-ui/units";

export const meta: Route.MetaFunction = () => [{ title: "Preload · Calculators · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "calc:use");
  return { unitSystem: user.unitSystem, canSaveReadings: can(user.role, "reading:create"), initial: initialForm(preloadDefaults(user.unitSystem), runPreloadForm) };
}

/** Without JavaScript the form posts here: computed with the same module, typed values kept. */
export async function action({ request }: Route.ActionArgs) {
  await requirePermission(request, "calc:use");
  const values = formValues(await readForm(request));
  const outcome = runPreloadForm(values);
  return data({ values, outcome }, { status: outcome.result ? 200 : 400 });
}

export default function PreloadPage({ loaderData, actionData }: Route.ComponentProps) {
  const hydrated = useHydrated();
  const { values, outcome, set } = useCalcForm<PreloadOutcome>({
    actionData: actionData as { values: FormValues; outcome: unknown } | undefined,
    initial: loaderData.initial,
    run: runPreloadForm,
    derive: (next, name, value) => {
      if (name === "nutCondition") {
        const p = NUT_FACTOR_PRESETS.find((x) => x.condition === value);
        if (p?.k !== undefined) next["method.k"] = String(p.k);
      }
      if (name === "method.k") next.nutCondition = "custom";
      // Results show first in the system of what was typed.
      if (name === "torque.unit") followInputSystem(next, value, { "out.force": "force", "out.stress": "stress" });
      if (name === "preload.unit") followInputSystem(next, value, { "out.torque": "torque", "out.stress": "stress" });
    },
  });
  const show = (cond: boolean) => cond || !hydrated;
  const e = outcome.errors;
  const friction = values["method.kind"] === "friction";
  const toTorque = values.direction === "preload-to-torque";
  const preset = NUT_FACTOR_PRESETS.find((p) => p.condition === values.nutCondition);
  const pc = PROPERTY_CLASSES.find((p) => p.id === values.materialChoice);

  return (
    <>
      <PageHeader title="Preload" kicker="Calculators" actions={<Link to="/calculators" className="btn">All calculators</Link>}>
        Clamp load from tightening torque, or the torque for a wanted clamp load, with the stress in the thread and how close it runs to yield.
      </PageHeader>
      <Form method="post" noValidate onSubmit={(ev) => hydrated && ev.preventDefault()} className="grid items-start gap-6 lg:grid-cols-[minmax(0,5fr)_minmax(0,7fr)]">
        <div className="grid gap-5">
          <Fieldset legend="Fastener">
            <TextField
              name="thread"
              label="Thread"
              list="thread-presets"
              numeric={false}
              values={values}
              set={set}
              errors={e}
              hint="Pick a common size or type any ISO metric M3–M24 (M12x1.5, M10) or UNC/UNF #10 to 1 in (7/16-20)."
            />
            <datalist id="thread-presets">
              {THREAD_PRESETS.map((t) => (
                <option key={t.designation} value={t.designation} />
              ))}
            </datalist>
            <Choice
              name="materialChoice"
              label="Property class or material"
              values={values}
              set={set}
              errors={e}
              options={[
                ...PROPERTY_CLASSES.map((p) => ({ value: p.id, label: p.label })),
                { value: "yield", label: "Other: type its yield strength" },
                { value: "", label: "None (no yield check)" },
              ]}
              hint={pc ? `Minimum yield from ${pc.source}.` : undefined}
            />
            {show(values.materialChoice === "yield") && (
              <QuantityField name="material.yieldStrength" label="Yield strength" kind="stress" values={values} set={set} errors={e} hint="For “Other” only: the maker's minimum yield (0.2 % proof) strength." />
            )}
          </Fieldset>

          <Fieldset legend="What you know">
            <Choice
              name="direction"
              label="Work out"
              values={values}
              set={set}
              errors={e}
              options={[
                { value: "torque-to-preload", label: "Clamp load from torque" },
                { value: "preload-to-torque", label: "Torque for a clamp load" },
              ]}
            />
            {show(!toTorque) && <QuantityField name="torque" label="Tightening torque" kind="torque" values={values} set={set} errors={e} hint={hydrated ? undefined : "Used when working out clamp load."} />}
            {show(toTorque) && <QuantityField name="preload" label="Wanted clamp load (preload)" kind="force" values={values} set={set} errors={e} hint={hydrated ? undefined : "Used when working out torque."} />}
          </Fieldset>

          <Fieldset legend="Torque model">
            <Choice
              name="method.kind"
              label="Model"
              values={values}
              set={set}
              errors={e}
              options={[
                { value: "nut-factor", label: "Nut factor K (T = K·F·d)" },
                { value: "friction", label: "Friction coefficients (thread and head)" },
              ]}
            />
            {show(!friction) && (
              <div className="grid gap-4 sm:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
                <Choice
                  name="nutCondition"
                  label="Thread condition"
                  values={values}
                  set={set}
                  errors={{}}
                  options={NUT_FACTOR_PRESETS.map((p) => ({ value: p.condition, label: p.k === undefined ? p.label : `${p.label}: K ${p.k}` }))}
                />
                <TextField name="method.k" label="Nut factor K" values={values} set={set} errors={e} />
                <p className="text-xs text-graphite-soft sm:col-span-2">
                  {preset?.k !== undefined ? `Source: ${preset.source}. Your own lube's K is best measured: paste bench readings below.` : "Type K; choosing a condition fills in its table value."}
                </p>
              </div>
            )}
            {show(friction) && (
              <div className="grid gap-4 sm:grid-cols-2">
                <TextField name="method.muThread" label="Thread friction μth" values={values} set={set} errors={e} />
                <TextField name="method.muHead" label="Head friction μhead" values={values} set={set} errors={e} />
                <div className="sm:col-span-2">
                  <QuantityField name="method.headDiameter" label="Effective bearing diameter Db" kind="length" values={values} set={set} errors={e} hint="Mean diameter of the nut or head's bearing face, usually about 1.3–1.5 × d." />
                </div>
              </div>
            )}
          </Fieldset>

          <Fieldset legend="Stretch (optional)">
            <Check name="grip.on" label="Work out the stretch over a grip length" values={values} set={set} />
            {show(values["grip.on"] === "on") && (
              <div className="grid gap-4 sm:grid-cols-2">
                <QuantityField name="grip.length" label="Grip length" kind="length" values={values} set={set} errors={e} />
                <QuantityField name="grip.modulus" label="Young's modulus" kind="stress" optional values={values} set={set} errors={e} hint={`Blank: steel, ${DEFAULT_MODULUS_GPA} GPa.`} />
              </div>
            )}
          </Fieldset>

          <Fieldset legend="Bench readings (optional)">
            <div>
              <label htmlFor="c-points" className="label">Torque and measured clamp load, one pair a line</label>
              <textarea
                id="c-points"
                name="points"
                rows={5}
                className="field num font-mono text-sm"
                placeholder={"torque, clamp load\n…"}
                value={values.points ?? ""}
                onChange={(ev) => set("points", ev.target.value)}
                aria-invalid={e.points ? true : undefined}
              />
              {e.points && <p className="field-error" role="alert">{e.points}</p>}
              <div className="mt-2 flex flex-wrap items-center gap-2 text-sm text-graphite-soft">
                <span>Torque in</span>
                <UnitSelect name="points.torqueUnit" kind="torque" values={values} set={set} label="Unit of the readings' torque" />
                <span>clamp load in</span>
                <UnitSelect name="points.forceUnit" kind="force" values={values} set={set} label="Unit of the readings' clamp load" />
              </div>
              <p className="mt-1 text-xs text-graphite-soft">Paste two columns from a sheet (tab, comma or space between). The effective K is fitted on the thread above.</p>
            </div>
          </Fieldset>
          {!hydrated && (
            <button type="submit" className="btn btn-primary justify-self-start">Calculate</button>
          )}
          {hydrated && outcome.result && (
            <ResultPeek
              bad={(outcome.result.percentOfYield ?? 0) > 90}
              note={(outcome.result.percentOfYield ?? 0) > 90 ? "past 90 % of yield" : undefined}
              items={[
                ["Clamp load", formatQ(outcome.result.preload_N, "N", unitOr(values["out.force"], "kN"))],
                ["Torque", formatQ(outcome.result.torque_Nm, "N.m", unitOr(values["out.torque"], "N.m"))],
                ...(outcome.result.percentOfYield !== undefined ? [["Of yield", `${formatNumber(outcome.result.percentOfYield, 1)} %`] as [string, string]] : []),
              ]}
            />
          )}
        </div>

        <PreloadResultView outcome={outcome} values={values} set={set} canSaveReadings={hydrated && loaderData.canSaveReadings} />
      </Form>

      <Method>
        <p>
          <strong>Nut factor.</strong> Torque equals the nut factor times the clamp load times the nominal diameter, T = K·F·d
          (Shigley's Mechanical Engineering Design, 9th ed., Eq. 8-27). K lumps thread and head friction together; the condition
          presets are Shigley's Table 8-15, except moly paste, which is worked out with the friction formula below at μ = 0.08
          (VDI 2230 Part 1, Table A5).
        </p>
        <p>
          <strong>Friction coefficients.</strong> Torque is the clamp load times three lengths added together: the pitch over 2π
          (the part that stretches the bolt), the thread friction μth times the pitch diameter d2 over 2·cos 30°, and the head
          friction μhead times half the bearing diameter Db (ISO 16047 and VDI 2230). The result splits the torque into these three.
        </p>
        <p>
          <strong>Stress and yield.</strong> Stress is the clamp load over the tensile stress area As. For metric threads
          As = π/4·((d2 + d3)/2)² with d2 = d − 0.649519·P and d3 = d − 1.226869·P (ISO 724, ISO 898-1); for inch threads
          As = 0.7854·(D − 0.9743/n)² (ASME B1.1). The yield is the minimum of the ISO 898-1 class or SAE J429 grade for the size.
          Past 90 % of yield the result turns red: there is little margin left for the scatter of friction.
        </p>
        <p>
          <strong>Stretch.</strong> F·L/(As·E) over the grip length, as if the whole grip had the stress area: a simplification
          that ignores the plain shank, the thread run-out and the joint's own compression. Use it to compare, not to set a stretch spec.
        </p>
        <p>
          <strong>Bench readings.</strong> The effective K comes from the least-squares line through the origin, F = T/(K·d), fitted to
          the pairs; its ± is the standard deviation of each pair's own K = T/(F·d).
        </p>
      </Method>
    </>
  );
}

function PreloadResultView({ outcome, values, set, canSaveReadings }: { outcome: PreloadOutcome; values: FormValues; set: SetValue; canSaveReadings: boolean }) {
  const r = outcome.result;
  const fu = unitOr(values["out.force"], "kN");
  const tu = unitOr(values["out.torque"], "N.m");
  const su = unitOr(values["out.stress"], "MPa");
  const lu = unitOr(values["out.length"], "mm");
  if (!r)
    return (
      <ResultPanel>
        <NoResult errors={outcome.errors} />
        <Caution />
        <HiddenOutUnits values={values} />
      </ResultPanel>
    );
  const pct = r.percentOfYield;
  const over = pct !== undefined && pct > 90;
  const yieldForce = pct !== undefined ? (r.stress_MPa / (pct / 100)) * r.thread.stressArea_mm2 : undefined;
  const toTorque = values.direction === "preload-to-torque";
  const model = values["method.kind"] === "friction" ? "friction model" : `K = ${(outcome.input as { method: { k: number } }).method.k}`;
  const split = r.torqueSplit;
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
        <div role="alert" data-testid="yield-alert" className="rounded-md border border-spec-red/50 bg-spec-red-soft px-3 py-2 text-sm font-semibold text-spec-red">
          Out of spec: the stress is {formatNumber(pct!, 1)} % of the material's minimum yield, past the 90 % limit. Lower the torque, use a stronger
          class, or check the nut factor.
        </div>
      )}
      <Warnings warnings={r.warnings.filter((w) => !(over && /above 90 %/.test(w)))} red={(w) => /yield/.test(w)} />
      <Caution />
      <PreloadChart result={r} yieldForce_N={yieldForce} fit={outcome.fit} points={outcome.points} torqueUnit={tu} forceUnit={fu} modelLabel={`Model, ${model}`} />
      {outcome.fit && (
        <div className="rounded-md border border-teal/40 bg-teal-soft/50 px-3 py-2 text-sm" data-testid="fit-summary">
          <p className="font-semibold text-teal">
            Bench readings give K = {formatNumber(outcome.fit.k, 3)} ± {formatNumber(outcome.fit.kStdDev, 3)}
          </p>
          <p className="text-graphite-soft">
            {outcome.fit.n} points, scatter {formatNumber(outcome.fit.kCoefficientOfVariation * 100, 1)} % (coefficient of variation), {NUT_FACTOR_R_SQUARED_LABEL} {formatNumber(outcome.fit.rSquared, 3)}.
          </p>
          {outcome.fit.warnings.map((w) => (
            <p key={w} className="text-graphite-soft">{w}</p>
          ))}
        </div>
      )}
      {canSaveReadings && outcome.points && outcome.points.length > 0 && (
        <SaveAsReadings
          points={outcome.points}
          torqueUnit={values["points.torqueUnit"] ?? "N.m"}
          forceUnit={values["points.forceUnit"] ?? "kN"}
          lube={NUT_FACTOR_PRESETS.find((p) => p.condition === values.nutCondition && p.condition !== "custom")?.label ?? ""}
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
          {split && (
            <FigureTable
              caption="Where the torque goes"
              rows={[
                ["Stretching the bolt", `${formatIn(split.pitch_Nm, "N.m", tu)} ${unitLabel(tu)} (${formatNumber((split.pitch_Nm / r.torque_Nm) * 100, 0)} %)`],
                ["Thread friction", `${formatIn(split.threadFriction_Nm, "N.m", tu)} ${unitLabel(tu)} (${formatNumber((split.threadFriction_Nm / r.torque_Nm) * 100, 0)} %)`],
                ["Head friction", `${formatIn(split.headFriction_Nm, "N.m", tu)} ${unitLabel(tu)} (${formatNumber((split.headFriction_Nm / r.torque_Nm) * 100, 0)} %)`],
              ]}
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
          {yieldForce !== undefined && (
            <FigureTable
              caption="Limits for this thread"
              rows={[
                ["Clamp load at yield", formatQ(yieldForce, "N", fu)],
                ["At 90 % of yield", formatQ(0.9 * yieldForce, "N", fu)],
                ["Torque for 90 %", formatQ(0.9 * yieldForce * (r.torque_Nm / r.preload_N), "N.m", tu)],
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
