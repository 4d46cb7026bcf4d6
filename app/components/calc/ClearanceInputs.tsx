/** The Clearances form's fieldsets: which clearance, then the parts, temperatures, materials and spec of that one. */
import { RING_GAP_FACTORS } from "~/lib/calc";
import { BORE_MATERIALS, CLEARANCE_KINDS, PISTON_MATERIALS, type ClearanceKind } from "~/lib/calc-ui/clearance-form";
import { materialOptions, materialSource } from "~/lib/calc-ui/clearance-view";
import type { FieldErrors, FormValues } from "~/lib/calc-ui/outcome";
import { Check, Choice, Fieldset, QuantityField, TextField, type SetValue } from "./controls";

export function ClearanceInputs({
  kind,
  values,
  set,
  errors: e,
  hydrated,
}: {
  kind: ClearanceKind;
  values: FormValues;
  set: SetValue;
  errors: FieldErrors;
  hydrated: boolean;
}) {
  const show = (cond: boolean) => cond || !hydrated;
  const ringFactor = RING_GAP_FACTORS.find((r) => r.application === values.application);
  const spec = (k: ClearanceKind, what: string) => (
    <div className="grid gap-4 sm:grid-cols-2">
      <QuantityField name={`spec.${k}.min`} label={`${what}, spec min`} kind="length" optional values={values} set={set} errors={e} />
      <QuantityField name={`spec.${k}.max`} label={`${what}, spec max`} kind="length" optional values={values} set={set} errors={e} />
    </div>
  );
  return (
    <>
      <Fieldset legend="Which clearance">
        <div role="radiogroup" aria-label="Which clearance" className="flex flex-wrap gap-2">
          {CLEARANCE_KINDS.map((k) => (
            <label
              key={k.kind}
              className={`cursor-pointer rounded-md border px-3 py-1.5 text-sm font-semibold ${kind === k.kind ? "border-brass bg-brass-soft" : "border-rule bg-card"}`}
            >
              <input
                type="radio"
                name="kind"
                value={k.kind}
                checked={values.kind === k.kind}
                onChange={() => set("kind", k.kind)}
                className="sr-only"
              />
              {k.label}
            </label>
          ))}
        </div>
      </Fieldset>

      {show(kind === "piston-to-wall") && (
        <>
          <Fieldset legend="Piston-to-wall">
            <div className="grid gap-4 sm:grid-cols-2">
              <QuantityField
                name="bore"
                label="Bore"
                kind="length"
                values={values}
                set={set}
                errors={e}
                hint={hydrated ? undefined : "Also used for ring end gap."}
              />
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
                  <QuantityField
                    name="thermal.boreTemperature"
                    label="Bore running"
                    kind="temperature"
                    values={values}
                    set={set}
                    errors={e}
                  />
                  <QuantityField
                    name="thermal.pistonTemperature"
                    label="Piston running"
                    kind="temperature"
                    values={values}
                    set={set}
                    errors={e}
                  />
                </div>
                <Choice
                  name="thermal.boreMaterial"
                  label="Bore material"
                  values={values}
                  set={set}
                  errors={e}
                  options={materialOptions(BORE_MATERIALS)}
                  hint={materialSource(values["thermal.boreMaterial"])}
                />
                {show(values["thermal.boreMaterial"] === "custom") && (
                  <TextField name="thermal.boreAlpha" label="Bore expansion, µm/(m·K)" values={values} set={set} errors={e} />
                )}
                <Choice
                  name="thermal.pistonMaterial"
                  label="Piston material"
                  values={values}
                  set={set}
                  errors={e}
                  options={materialOptions(PISTON_MATERIALS)}
                  hint={materialSource(values["thermal.pistonMaterial"])}
                />
                {show(values["thermal.pistonMaterial"] === "custom") && (
                  <TextField name="thermal.pistonAlpha" label="Piston expansion, µm/(m·K)" values={values} set={set} errors={e} />
                )}
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
          {show(values.bearingMode !== "shells") && (
            <QuantityField name="bearingBore" label="Bearing bore" kind="length" values={values} set={set} errors={e} />
          )}
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
              options={[
                ...RING_GAP_FACTORS.map((r) => ({ value: r.application, label: `${r.label}: ${r.gapPerBore}` })),
                { value: "custom", label: "Custom factor" },
              ]}
            />
            <TextField name="gapPerBore" label="Gap per inch of bore" values={values} set={set} errors={e} />
          </div>
          <p className="-mt-2 text-xs text-graphite-soft">
            {ringFactor ? "Shop guidance (common practice, no standard): " : ""}inch of gap per inch of bore, the same in mm per mm. The
            ring maker's chart takes precedence.
          </p>
          <QuantityField name="measuredGap" label="Measured gap" kind="length" optional values={values} set={set} errors={e} />
          {spec("ring-gap", "Gap")}
        </Fieldset>
      )}
    </>
  );
}
