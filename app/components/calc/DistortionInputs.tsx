/** The Bore distortion form's parts: how it was measured, and a grid of readings per state. */
import { unitLabel } from "~/lib/calc";
import type { DistortionOutcome } from "~/lib/calc-ui/distortion-form";
import { cellName } from "~/lib/calc-ui/distortion-view";
import type { FieldErrors, FormValues } from "~/lib/calc-ui/outcome";
import { unitOr } from "~/lib/calc-ui/units";
import { Choice, Fieldset, QuantityField, TextField, UnitSelect, type SetValue } from "./controls";

export function MeasuredHow({
  values,
  set,
  errors: e,
  radial,
}: {
  values: FormValues;
  set: SetValue;
  errors: FieldErrors;
  radial: boolean;
}) {
  return (
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
        hint={
          radial
            ? "Radial readings see every order, odd ones included."
            : "A two-point gauge cannot see odd orders such as the three-lobed shape (see below)."
        }
      />
      <div className="grid grid-cols-[minmax(0,1fr)_auto] items-end gap-1.5">
        <TextField
          name="depths"
          label="Depths below the deck"
          values={values}
          set={set}
          errors={e}
          hint="Separated by commas, e.g. 12, 45, 80."
        />
        <div className={e.depths ? "mb-7" : "mb-5"}>
          <UnitSelect name="depth.unit" kind="length" values={values} set={set} label="Unit of the depths" />
        </div>
      </div>
      <TextField
        name="angles"
        label="Angles (degrees)"
        values={values}
        set={set}
        errors={e}
        hint={radial ? "Equally spaced over 360° (2k + 1 angles show order k)." : "Equally spaced over 180° (k + 1 angles show order k)."}
      />
      <div>
        <span className="label">Readings are in</span>
        <UnitSelect name="reading.unit" kind="length" values={values} set={set} label="Unit of the readings" />
      </div>
      <QuantityField
        name="reference"
        label="Nominal bore"
        kind="length"
        optional
        values={values}
        set={set}
        errors={e}
        hint="The finished size; the profile is drawn against it."
      />
    </Fieldset>
  );
}

export function ReadingGrid({
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
      <TextField
        name={labelName}
        label="Name of this state"
        numeric={false}
        values={values}
        set={set}
        errors={errors}
        className="max-w-sm"
      />
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
                  // biome-ignore lint/suspicious/noArrayIndexKey: the grid's cells are named by position (m.0.3), so the position is the row's and column's identity
                  <th key={j} className="px-1 text-center text-xs font-semibold text-graphite-soft">
                    {a}°
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {depths.map((d, i) => (
                // biome-ignore lint/suspicious/noArrayIndexKey: the grid's cells are named by position (m.0.3), so the position is the row's and column's identity
                <tr key={i}>
                  <th scope="row" className="num pr-1 text-left text-xs font-semibold">
                    {d}
                  </th>
                  {angles.map((a, j) => {
                    const name = `${prefix}.${i}.${j}`;
                    const err = errors[name];
                    return (
                      // biome-ignore lint/suspicious/noArrayIndexKey: the grid's cells are named by position (m.0.3), so the position is the row's and column's identity
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
