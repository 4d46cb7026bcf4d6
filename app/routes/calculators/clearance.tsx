import { data, Form, Link } from "react-router";
import type { Route } from "./+types/clearance";
import { readForm } from "~/lib/edge.server";
import { ClearanceChart, type Marker } from "~/components/calc/ClearanceChart";
import { Caution, Check, Choice, CopyBlock, Fieldset, Figure, Method, QuantityField, TextField, UnitSelect, Warnings, useHydrated, type SetValue } from "~/components/calc/controls";
import { NoResult, ResultPanel, ResultPeek } from "~/components/calc/ResultPanel";
import { PageHeader } from "~/components/page";
import { useCalcForm } from "~/components/calc/useCalcForm";
import { MATERIALS, OIL_CLEARANCE_RULE, RING_GAP_BAND_FACTOR, RING_GAP_FACTORS, toSI, unitLabel, type ClearanceResult, type UnitCode } from "~/lib/calc";
import { requirePermission } from "~/lib/auth.server";
import { BORE_MATERIALS, CLEARANCE_KINDS, PISTON_MATERIALS, clearanceDefaults, runClearanceForm, type ClearanceKind } from "~/lib/calc-ui/clearance-form";
import { formValues, initialForm, type FormValues, type Outcome } from "~/lib/calc-ui/outcome";
import { followInputSystem, formatIn, formatNumber, formatQ, unitOr } from "~/lib/calc-ui/units";

export const meta: Route.MetaFunction = () => [{ title: "Clearances · Calculators · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "calc:use");
  return { unitSystem: user.unitSystem, initial: initialForm(clearanceDefaults(user.unitSystem), runClearanceForm) };
}

export async function action({ request }: Route.ActionArgs) {
  await requirePermission(request, "calc:use");
  const values = formValues(await readForm(request));
  const outcome = runClearanceForm(values);
  return data({ values, outcome }, { status: outcome.result ? 200 : 400 });
}

type ClearanceOutcome = Outcome<ClearanceResult> & { kind: ClearanceKind };

export default function ClearancePage({ loaderData, actionData }: Route.ComponentProps) {
  const hydrated = useHydrated();
  const { values, outcome, set } = useCalcForm<ClearanceOutcome>({
    actionData: actionData as { values: FormValues; outcome: unknown } | undefined,
    initial: loaderData.initial,
    run: runClearanceForm,
    derive: (next, name, value) => {
      if (name === "application") {
        const f = RING_GAP_FACTORS.find((r) => r.application === value);
        if (f) next.gapPerBore = String(f.gapPerBore);
      }
      if (name === "gapPerBore") next.application = "custom";
      // Clearances show first in the system the parts were measured in.
      if (name === "bore.unit" || name === "journal.unit") followInputSystem(next, value, { "out.small": "small" });
    },
  });
  const show = (cond: boolean) => cond || !hydrated;
  const e = outcome.errors;
  const kind = outcome.kind;
  const materialOptions = (list: typeof MATERIALS) => [
    ...list.map((m) => ({ value: m.id, label: `${m.label}: ${formatNumber(m.alphaPerK * 1e6, 1)} µm/(m·K)` })),
    ...MATERIALS.filter((m) => !list.includes(m)).map((m) => ({ value: m.id, label: `${m.label}: ${formatNumber(m.alphaPerK * 1e6, 1)} µm/(m·K)` })),
    { value: "custom", label: "Other: type its coefficient" },
  ];
  const matSource = (id: string | undefined) => MATERIALS.find((m) => m.id === id)?.source;
  const ringFactor = RING_GAP_FACTORS.find((r) => r.application === values.application);

  const spec = (k: ClearanceKind, what: string) => (
    <div className="grid gap-4 sm:grid-cols-2">
      <QuantityField name={`spec.${k}.min`} label={`${what}, spec min`} kind="length" optional values={values} set={set} errors={e} />
      <QuantityField name={`spec.${k}.max`} label={`${what}, spec max`} kind="length" optional values={values} set={set} errors={e} />
    </div>
  );

  return (
    <>
      <PageHeader title="Clearances" kicker="Calculators" actions={<Link to="/calculators" className="btn">All calculators</Link>}>
        Piston-to-wall cold and hot, bearing oil clearance, and ring end gap, each checked against its spec.
      </PageHeader>
      <Form method="post" noValidate onSubmit={(ev) => hydrated && ev.preventDefault()} className="grid items-start gap-6 lg:grid-cols-[minmax(0,5fr)_minmax(0,7fr)]">
        <div className="grid gap-5">
          <Fieldset legend="Which clearance">
            <div role="radiogroup" aria-label="Which clearance" className="flex flex-wrap gap-2">
              {CLEARANCE_KINDS.map((k) => (
                <label key={k.kind} className={`cursor-pointer rounded-md border px-3 py-1.5 text-sm font-semibold ${kind === k.kind ? "border-brass bg-brass-soft" : "border-rule bg-card"}`}>
                  <input type="radio" name="kind" value={k.kind} checked={values.kind === k.kind} onChange={() => set("kind", k.kind)} className="sr-only" />
                  {k.label}
                </label>
              ))}
            </div>
          </Fieldset>

          {show(kind === "piston-to-wall") && (
            <>
              <Fieldset legend="Piston-to-wall">
                <div className="grid gap-4 sm:grid-cols-2">
                  <QuantityField name="bore" label="Bore" kind="length" values={values} set={set} errors={e} hint={hydrated ? undefined : "Also used for ring end gap."} />
                  <QuantityField name="piston" label="Piston at the gauge point" kind="length" values={values} set={set} errors={e} />
                </div>
                {spec("piston-to-wall", "Clearance")}
              </Fieldset>
              <Fieldset legend="Running hot (optional)">
                <Check name="thermal.on" label="Work out the hot clearance" values={values} set={set} />
                {show(values["thermal.on"] === "on") && (
                  <>
                    <div className="grid gap-4 sm:grid-cols-3">
                      <QuantityField name="thermal.ambient" label="Measured at" kind="temperature" values={values} set={set} errors={e} />
                      <QuantityField name="thermal.boreTemperature" label="Bore running" kind="temperature" values={values} set={set} errors={e} />
                      <QuantityField name="thermal.pistonTemperature" label="Piston running" kind="temperature" values={values} set={set} errors={e} />
                    </div>
                    <Choice name="thermal.boreMaterial" label="Bore material" values={values} set={set} errors={e} options={materialOptions(BORE_MATERIALS)} hint={matSource(values["thermal.boreMaterial"])} />
                    {show(values["thermal.boreMaterial"] === "custom") && <TextField name="thermal.boreAlpha" label="Bore expansion, µm/(m·K)" values={values} set={set} errors={e} />}
                    <Choice name="thermal.pistonMaterial" label="Piston material" values={values} set={set} errors={e} options={materialOptions(PISTON_MATERIALS)} hint={matSource(values["thermal.pistonMaterial"])} />
                    {show(values["thermal.pistonMaterial"] === "custom") && <TextField name="thermal.pistonAlpha" label="Piston expansion, µm/(m·K)" values={values} set={set} errors={e} />}
                  </>
                )}
              </Fieldset>
            </>
          )}

          {show(kind === "bearing") && (
            <Fieldset legend="Bearing oil clearance">
              <QuantityField name="journal" label="Journal" kind="length" values={values} set={set} errors={e} />
              <Choice
                name="bearingMode"
                label="Bearing side"
                values={values}
                set={set}
                errors={e}
                options={[
                  { value: "direct", label: "Bearing bore measured, shells fitted" },
                  { value: "shells", label: "Housing bore and shell thickness" },
                ]}
              />
              {show(values.bearingMode !== "shells") && <QuantityField name="bearingBore" label="Bearing bore" kind="length" values={values} set={set} errors={e} />}
              {show(values.bearingMode === "shells") && (
                <div className="grid gap-4 sm:grid-cols-2">
                  <QuantityField name="housingBore" label="Housing bore" kind="length" values={values} set={set} errors={e} />
                  <QuantityField name="shellThickness" label="Shell wall thickness (each)" kind="length" values={values} set={set} errors={e} />
                </div>
              )}
              {spec("bearing", "Oil clearance")}
            </Fieldset>
          )}

          {show(kind === "ring-gap") && (
            <Fieldset legend="Ring end gap">
              {hydrated && <QuantityField name="bore" label="Bore" kind="length" values={values} set={set} errors={e} />}
              <div className="grid gap-4 sm:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
                <Choice
                  name="application"
                  label="Application (shop guidance)"
                  values={values}
                  set={set}
                  errors={{}}
                  options={[...RING_GAP_FACTORS.map((r) => ({ value: r.application, label: `${r.label}: ${r.gapPerBore}` })), { value: "custom", label: "Custom factor" }]}
                />
                <TextField name="gapPerBore" label="Gap per inch of bore" values={values} set={set} errors={e} />
              </div>
              <p className="-mt-2 text-xs text-graphite-soft">
                {ringFactor ? "Shop guidance (common practice, no standard): " : ""}inch of gap per inch of bore, the same in mm per mm. The ring maker's chart takes precedence.
              </p>
              <QuantityField name="measuredGap" label="Measured gap" kind="length" optional values={values} set={set} errors={e} />
              {spec("ring-gap", "Gap")}
            </Fieldset>
          )}
          {!hydrated && <button type="submit" className="btn btn-primary justify-self-start">Calculate</button>}
          {hydrated && outcome.result && (() => {
            const r = outcome.result as ClearanceResult;
            const su = unitOr(values["out.small"], "mm");
            const out = r.verdict === "below" || r.verdict === "above";
            const judged = judgedOf(outcome.kind, outcome.input);
            return (
              <ResultPeek
                bad={out || r.hotCaution !== undefined}
                note={[r.verdict ? `${judged} ${out ? `out of spec (${r.verdict})` : "within spec"}` : null, r.hotCaution ? HOT_CAUTION_TEXT[r.hotCaution] : null].filter(Boolean).join(" · ") || undefined}
                items={[
                  ["Clearance", formatQ(r.clearance_mm, "mm", su, 1)],
                  ...(r.hotClearance_mm !== undefined ? [["Hot", formatQ(r.hotClearance_mm, "mm", su, 1)] as [string, string]] : []),
                ]}
              />
            );
          })()}
        </div>
        <ClearanceResultView outcome={outcome} values={values} set={set} />
      </Form>

      <Method>
        <p>
          <strong>Piston-to-wall.</strong> Cold clearance is the bore minus the piston, both measured at the same temperature, the
          piston at its gauge point. Hot, each part grows by its diameter times its expansion coefficient times its rise in
          temperature, ΔD = D·α·ΔT; the hot clearance is the grown bore minus the grown piston. The coefficients are mean values near
          room temperature from the handbook named beside each material (ASM Handbook Vol. 1 and 2; Callister, Table B.6), taken over
          20–100 °C: a part outside that range, or past where its material begins to melt, is warned about. The model
          treats each part as one uniform temperature and a plain cylinder: real pistons are cam-ground and tapered, hotter at the crown
          than the skirt, so take the hot figure as a comparison between choices, never as the piston maker's clearance.
        </p>
        <p>
          <strong>Bearing oil clearance.</strong> The bearing bore (measured with the shells fitted and torqued, or the housing bore
          minus two shell walls) minus the journal. Shop guidance, common practice: about {OIL_CLEARANCE_RULE.perInchOfDiameter} in of
          clearance per inch of journal; it is shown for orientation only.
        </p>
        <p>
          <strong>Ring end gap.</strong> Recommended gap = bore in inches × the gap factor for the application, a rule of thumb
          (shop guidance). Without a spec, a measured gap is called within when it is at least the recommended gap and at most
          {" "}{Math.round((RING_GAP_BAND_FACTOR - 1) * 100)} % over it. A gap that is too small can butt when hot and break the ring
          or the land.
        </p>
      </Method>
    </>
  );
}

function ClearanceResultView({ outcome, values, set }: { outcome: ClearanceOutcome; values: FormValues; set: SetValue }) {
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
  const kind = outcome.kind;
  const input = outcome.input as { spec?: { min?: Q; max?: Q }; journal?: Q; bore?: Q };
  const mm = (q?: Q) => (q ? toSI(q.value, q.unit as UnitCode) * 1000 : undefined);
  const out = r.verdict === "below" || r.verdict === "above";
  const hotBad = r.hotCaution !== undefined;
  const judged = judgedOf(kind, outcome.input);
  const markers: Marker[] = [];
  let band: { min_mm?: number; max_mm?: number } | undefined = input.spec ? { min_mm: mm(input.spec.min), max_mm: mm(input.spec.max) } : undefined;
  let bandLabel = "Spec";
  if (kind === "piston-to-wall") {
    markers.push({ label: "Cold", value_mm: r.clearance_mm, tone: out ? "bad" : "cold" });
    if (r.hotClearance_mm !== undefined) markers.push({ label: "Hot", value_mm: r.hotClearance_mm, tone: hotBad ? "bad" : "hot" });
  } else if (kind === "bearing") {
    markers.push({ label: "Oil clearance", value_mm: r.clearance_mm, tone: out ? "bad" : "cold" });
    markers.push({ label: "Shop guidance, 0.001 in per in", value_mm: (mm(input.journal) ?? 0) * OIL_CLEARANCE_RULE.perInchOfDiameter, tone: "hot" });
  } else {
    markers.push({ label: "Recommended", value_mm: r.recommendedGap_mm!, tone: "hot" });
    if ((outcome.input as { measuredGap?: Q }).measuredGap) markers.push({ label: "Measured", value_mm: r.clearance_mm, tone: out ? "bad" : "cold" });
    if (!band) {
      band = { min_mm: r.recommendedGap_mm, max_mm: r.recommendedGap_mm! * RING_GAP_BAND_FACTOR };
      bandLabel = "Shop guidance band";
    }
  }
  const verdict = r.verdict && (
    <p
      data-testid="clearance-verdict"
      className={`inline-flex rounded-md px-3 py-1 text-sm font-semibold ${out ? "bg-spec-red-soft text-spec-red" : "bg-ok-soft text-ok"}`}
      role={out ? "alert" : undefined}
    >
      {out ? `${judged} out of spec: ${r.verdict} the ${r.verdict === "below" ? "minimum" : "maximum"}` : `${judged} within spec`}
      {kind === "ring-gap" && !input.spec ? " (against the shop guidance band)" : ""}
    </p>
  );
  // The verdict judges the cold clearance only: the hot one says its own, beside it.
  const hotVerdict = r.hotCaution && (
    <p data-testid="hot-verdict" role="alert" className="inline-flex rounded-md bg-spec-red-soft px-3 py-1 text-sm font-semibold text-spec-red">
      {HOT_CAUTION_TEXT[r.hotCaution]}
    </p>
  );
  const mainLabel = kind === "piston-to-wall" ? "Cold clearance" : kind === "bearing" ? "Oil clearance" : (outcome.input as { measuredGap?: Q }).measuredGap ? "Measured gap" : "Recommended gap";
  return (
    <ResultPanel bad={out || hotBad}>
      <div className="grid gap-4 sm:grid-cols-2">
        <Figure label={mainLabel} value={formatIn(r.clearance_mm, "mm", su, 1)} testId="result-clearance" tone={out ? "bad" : undefined} unitSelect={unitSel} />
        {r.hotClearance_mm !== undefined && <Figure label="Hot clearance" value={`${formatIn(r.hotClearance_mm, "mm", su, 1)} ${unitLabel(su)}`} testId="result-hot" tone={hotBad ? "bad" : undefined} />}
        {r.recommendedGap_mm !== undefined && kind === "ring-gap" && (outcome.input as { measuredGap?: Q }).measuredGap && (
          <Figure label="Recommended gap (shop guidance)" value={`${formatIn(r.recommendedGap_mm, "mm", su, 1)} ${unitLabel(su)}`} testId="result-recommended" />
        )}
        {r.perInchOfDiameter !== undefined && (
          <Figure label={kind === "bearing" ? "Per inch of journal" : "Per inch of bore"} value={`${formatNumber(r.perInchOfDiameter * 1000, 2)} thou/in`} />
        )}
      </div>
      {(verdict || hotVerdict) && <div className="flex flex-wrap gap-2">{verdict}{hotVerdict}</div>}
      <Warnings warnings={r.warnings} red={(w) => /spec|seize|interference|butt|negative|melt|near zero/i.test(w)} />
      <Caution />
      <ClearanceChart markers={markers} band={band} bandLabel={bandLabel} unit={su} />
      <CopyBlock calculator="clearance" input={outcome.input} />
    </ResultPanel>
  );
}
type Q = { value: number; unit: string };

/** What a clearance verdict judges, named in its words ("Cold clearance within spec"). */
function judgedOf(kind: string | undefined, input: unknown): string {
  if (kind === "piston-to-wall") return "Cold clearance";
  if (kind === "bearing") return "Oil clearance";
  return (input as { measuredGap?: Q } | undefined)?.measuredGap ? "Measured gap" : "Recommended gap";
}

const HOT_CAUTION_TEXT: Record<NonNullable<ClearanceResult["hotCaution"]>, string> = {
  seize: "Hot clearance negative: the piston would seize",
  tight: "Hot clearance near zero: too tight to run",
};
