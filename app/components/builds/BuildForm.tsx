import { Form, Link } from "react-router";
import { Field, FormError, SelectField, TextAreaField } from "~/components/forms";

type Values = Record<string, string>;

/** The build's fields, for opening a build and for changing one. */
export function BuildForm({
  values,
  errors,
  leads,
  withNumber,
  busy,
  submitLabel,
  cancelTo,
}: {
  values: Values;
  errors: Values;
  leads: { id: string; name: string }[];
  withNumber: boolean;
  busy: boolean;
  submitLabel: string;
  cancelTo: string;
}) {
  const v = (k: string) => values[k] ?? "";
  return (
    <Form method="post" className="space-y-5" noValidate>
      <FormError message={errors.form} />
      <fieldset className="card grid gap-4 sm:grid-cols-2">
        <legend className="px-1 font-serif text-lg">Job</legend>
        {withNumber && (
          <Field
            label="Work order"
            name="number"
            required
            placeholder="LEW-24-0117"
            defaultValue={v("number")}
            error={errors.number}
            hint="As on the job card, e.g. LEW-24-0117."
            className="field num uppercase"
            autoComplete="off"
          />
        )}
        <SelectField label="Lead builder" name="leadBuilderId" defaultValue={v("leadBuilderId")} error={errors.leadBuilderId}>
          <option value="">Not chosen yet</option>
          {leads.map((p) => (
            <option key={p.id} value={p.id}>
              {p.name}
            </option>
          ))}
        </SelectField>
        <Field label="Came in" name="receivedOn" type="date" defaultValue={v("receivedOn")} error={errors.receivedOn} />
        <Field label="Promised for" name="promisedOn" type="date" defaultValue={v("promisedOn")} error={errors.promisedOn} />
      </fieldset>
      <fieldset className="card grid gap-4 sm:grid-cols-2">
        <legend className="px-1 font-serif text-lg">Customer</legend>
        <Field label="Name" name="customerName" required defaultValue={v("customerName")} error={errors.customerName} autoComplete="off" />
        <Field
          label="Contact"
          name="customerContact"
          defaultValue={v("customerContact")}
          error={errors.customerContact}
          hint="A phone number or e-mail address; the build sheet is mailed to the address."
          autoComplete="off"
        />
      </fieldset>
      <fieldset className="card grid gap-4 sm:grid-cols-2">
        <legend className="px-1 font-serif text-lg">Engine</legend>
        <div className="sm:col-span-2">
          <Field
            label="Engine"
            name="engine"
            defaultValue={v("engine")}
            error={errors.engine}
            placeholder="Inline four, 2.0 L, cast-iron block"
            autoComplete="off"
          />
        </div>
        <Field
          label="Serial"
          name="engineSerial"
          defaultValue={v("engineSerial")}
          error={errors.engineSerial}
          className="field num"
          autoComplete="off"
        />
        <SelectField label="Bore and stroke in" name="sizeUnit" defaultValue={v("sizeUnit") || "mm"} error={errors.sizeUnit}>
          <option value="mm">millimetres (mm)</option>
          <option value="in">inches (in)</option>
        </SelectField>
        <Field
          label="Bore"
          name="bore"
          inputMode="decimal"
          defaultValue={v("bore")}
          error={errors.bore}
          className="field num"
          hint="Nominal, e.g. 86.00"
        />
        <Field
          label="Stroke"
          name="stroke"
          inputMode="decimal"
          defaultValue={v("stroke")}
          error={errors.stroke}
          className="field num"
          hint="e.g. 86.00"
        />
        <Field
          label="Cylinders"
          name="cylinders"
          inputMode="numeric"
          defaultValue={v("cylinders")}
          error={errors.cylinders}
          className="field num"
          hint="A run offers a row per cylinder"
        />
        <Field
          label="Main journals"
          name="mainJournals"
          inputMode="numeric"
          defaultValue={v("mainJournals")}
          error={errors.mainJournals}
          className="field num"
          hint="A run offers a row per journal"
        />
        <TextAreaField
          label="Notes"
          name="notes"
          rows={3}
          defaultValue={v("notes")}
          error={errors.notes}
          wrapperClassName="sm:col-span-2"
        />
      </fieldset>
      <div className="flex gap-2">
        <button className="btn btn-primary" type="submit" disabled={busy}>
          {busy ? "Saving…" : submitLabel}
        </button>
        <Link to={cancelTo} className="btn no-underline">
          Cancel
        </Link>
      </div>
    </Form>
  );
}
