/** The Preload form's fieldsets: the fastener, what is known, the torque model, the stretch and bench readings. */
import { NUT_FACTOR_PRESETS, PROPERTY_CLASSES, THREAD_PRESETS } from "~/lib/calc";
import type { FieldErrors, FormValues } from "~/lib/calc-ui/outcome";
import { DEFAULT_MODULUS_GPA } from "~/lib/calc-ui/preload-form";
import { Check, Choice, Fieldset, QuantityField, TextField, UnitSelect, type SetValue } from "./controls";

export function PreloadInputs({
  values,
  set,
  errors: e,
  hydrated,
}: {
  values: FormValues;
  set: SetValue;
  errors: FieldErrors;
  hydrated: boolean;
}) {
  const show = (cond: boolean) => cond || !hydrated;
  const friction = values["method.kind"] === "friction";
  const toTorque = values.direction === "preload-to-torque";
  const preset = NUT_FACTOR_PRESETS.find((p) => p.condition === values.nutCondition);
  const pc = PROPERTY_CLASSES.find((p) => p.id === values.materialChoice);
  return (
    <>
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
          <QuantityField
            name="material.yieldStrength"
            label="Yield strength"
            kind="stress"
            values={values}
            set={set}
            errors={e}
            hint="For “Other” only: the maker's minimum yield (0.2 % proof) strength."
          />
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
        {show(!toTorque) && (
          <QuantityField
            name="torque"
            label="Tightening torque"
            kind="torque"
            values={values}
            set={set}
            errors={e}
            hint={hydrated ? undefined : "Used when working out clamp load."}
          />
        )}
        {show(toTorque) && (
          <QuantityField
            name="preload"
            label="Wanted clamp load (preload)"
            kind="force"
            values={values}
            set={set}
            errors={e}
            hint={hydrated ? undefined : "Used when working out torque."}
          />
        )}
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
              {preset?.k !== undefined
                ? `Source: ${preset.source}. Your own lube's K is best measured: paste bench readings below.`
                : "Type K; choosing a condition fills in its table value."}
            </p>
          </div>
        )}
        {show(friction) && (
          <div className="grid gap-4 sm:grid-cols-2">
            <TextField name="method.muThread" label="Thread friction μth" values={values} set={set} errors={e} />
            <TextField name="method.muHead" label="Head friction μhead" values={values} set={set} errors={e} />
            <div className="sm:col-span-2">
              <QuantityField
                name="method.headDiameter"
                label="Effective bearing diameter Db"
                kind="length"
                values={values}
                set={set}
                errors={e}
                hint="Mean diameter of the nut or head's bearing face, usually about 1.3–1.5 × d."
              />
            </div>
          </div>
        )}
      </Fieldset>

      <Fieldset legend="Stretch (optional)">
        <Check name="grip.on" label="Work out the stretch over a grip length" values={values} set={set} />
        {show(values["grip.on"] === "on") && (
          <div className="grid gap-4 sm:grid-cols-2">
            <QuantityField name="grip.length" label="Grip length" kind="length" values={values} set={set} errors={e} />
            <QuantityField
              name="grip.modulus"
              label="Young's modulus"
              kind="stress"
              optional
              values={values}
              set={set}
              errors={e}
              hint={`Blank: steel, ${DEFAULT_MODULUS_GPA} GPa.`}
            />
          </div>
        )}
      </Fieldset>

      <Fieldset legend="Bench readings (optional)">
        <div>
          <label htmlFor="c-points" className="label">
            Torque and measured clamp load, one pair a line
          </label>
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
          {e.points && (
            <p className="field-error" role="alert">
              {e.points}
            </p>
          )}
          <div className="mt-2 flex flex-wrap items-center gap-2 text-sm text-graphite-soft">
            <span>Torque in</span>
            <UnitSelect name="points.torqueUnit" kind="torque" values={values} set={set} label="Unit of the readings' torque" />
            <span>clamp load in</span>
            <UnitSelect name="points.forceUnit" kind="force" values={values} set={set} label="Unit of the readings' clamp load" />
          </div>
          <p className="mt-1 text-xs text-graphite-soft">
            Paste two columns from a sheet (tab, comma or space between). The effective K is fitted on the thread above.
          </p>
        </div>
      </Fieldset>
    </>
  );
}
