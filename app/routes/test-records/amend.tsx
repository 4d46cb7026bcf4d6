import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/amend";
import { parseParams, readForm } from "~/lib/edge.server";
import { idParams } from "~/lib/edge";
import { Field, FormError } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { VerdictBadge } from "~/components/test-records/parts";
import { placeFields, ReadingsEditor, rowsFromValues } from "~/components/test-records/ReadingsEditor";
import { requirePermission } from "~/lib/auth.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm, type FieldErrors } from "~/lib/forms";
import { amendSchema, parseReadings } from "~/lib/test-records/form";
import { amendTestRecord, getTestRecord, limitsOf, TestRecordError } from "~/lib/test-records/records.server";
import { flashKindOf, recordVerdictText } from "~/lib/test-records/labels";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Amend ${data?.record.workOrder ?? "test record"} · Benchreel` }];

async function recordOr404(id: string) {
  const r = await getTestRecord(id);
  if (!r) throw data({ message: "No such test record." }, { status: 404 });
  return r;
}

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "testrecord:amend");
  const view = await recordOr404(parseParams(request, idParams, params, "test record").id);
  const values: Record<string, string> = {};
  for (const r of view.readings) {
    values[`r.${r.specId}.${r.position}.value`] = String(r.valueEntered);
    values[`r.${r.specId}.${r.position}.unit`] = r.unitEntered;
    values[`r.${r.specId}.${r.position}.note`] = r.noteText;
    for (const [k, v] of Object.entries(placeFields(r))) values[`r.${r.specId}.${r.position}.${k}`] = v;
    if (r.sourceReadingId) values[`r.${r.specId}.${r.position}.src`] = r.sourceReadingId;
  }
  return {
    record: view.record,
    procedure: view.procedure,
    revision: view.revision,
    specs: view.specs.map((s) => ({ ...limitsOf(s), note: s.note })),
    verdict: view.evaluation.verdict,
    notMeasured: view.evaluation.notMeasured.length,
    readingValues: values,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "testrecord:amend");
  const view = await recordOr404(parseParams(request, idParams, params, "test record").id);
  const form = await readForm(request);
  const parsed = parseForm(amendSchema, form);
  const r = parseReadings(form, view.specs.map(limitsOf));
  const errors: FieldErrors = { ...(parsed.ok ? {} : parsed.errors), ...r.errors };
  if (!Object.keys(r.errors).length && r.count === 0) errors.readings = "An amended record still needs at least one reading.";
  if (!parsed.ok || Object.keys(errors).length) return data({ errors, values: parsed.values }, { status: 400 });
  const d = parsed.data;
  try {
    const out = await amendTestRecord(user, view.record.id, { ...d, readings: r.readings });
    return redirectWithFlash(`/test-records/${view.record.id}`, { kind: flashKindOf(out.verdict), message: `Amendment ${out.version} saved (${out.changes.length} change${out.changes.length === 1 ? "" : "s"}); the record is ${recordVerdictText(out.verdict, out.notMeasured)}. The original stays in the history.` });
  } catch (err) {
    if (err instanceof TestRecordError) return data({ errors: { [err.field ?? "form"]: err.message }, values: parsed.values }, { status: err.status });
    throw err;
  }
}

export default function AmendTestRecord({ loaderData, actionData }: Route.ComponentProps) {
  const { record, procedure, revision, specs, verdict, notMeasured, readingValues } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  const v = (k: string, d: string | number | null) => values[k] ?? (d == null ? "" : String(d));
  const busy = useNavigation().state === "submitting";
  const initial = rowsFromValues(specs, actionData?.values ?? readingValues);
  return (
    <>
      <PageHeader title={`Amend ${record.workOrder}`} kicker="Test record amendment">
        {record.title} · {procedure.title}, <span className="num">revision {revision.number}</span> · now <VerdictBadge verdict={verdict} notMeasured={notMeasured} />
      </PageHeader>
      <p className="mb-4 max-w-3xl text-sm text-graphite-soft">
        A filed record is not edited in place. An amendment keeps the record as it was, saves the corrected readings as a new version, and records who changed what and why. The work order and the revision it was filed against do not change.
      </p>
      <Form method="post" className="space-y-5" noValidate>
        <FormError message={errors.form} />
        <div className="card grid gap-4 sm:grid-cols-2">
          <div className="sm:col-span-2">
            <label htmlFor="f-reason" className="label">Why is it amended?</label>
            <textarea id="f-reason" name="reason" rows={2} className="field" required defaultValue={values.reason ?? ""} placeholder="e.g. bore 3 re-measured after the gauge was re-zeroed" aria-invalid={errors.reason ? true : undefined} aria-describedby={errors.reason ? "f-reason-error" : undefined} />
            {errors.reason && <p id="f-reason-error" className="field-error" role="alert">{errors.reason}</p>}
          </div>
          <div className="sm:col-span-2">
            <Field label="Title" name="title" required defaultValue={v("title", record.title)} error={errors.title} />
          </div>
          <Field label="Engine serial" name="engineSerial" defaultValue={v("engineSerial", record.engineSerial)} error={errors.engineSerial} />
          <Field label="Test date" name="testedOn" type="date" required defaultValue={v("testedOn", record.testedOn)} error={errors.testedOn} />
          {record.recordingId && (
            <>
              <Field label="Recording from (s)" name="recordingStartS" inputMode="decimal" defaultValue={v("recordingStartS", record.recordingStartS)} error={errors.recordingStartS} />
              <Field label="Recording to (s)" name="recordingEndS" inputMode="decimal" defaultValue={v("recordingEndS", record.recordingEndS)} error={errors.recordingEndS} />
            </>
          )}
          <div className="sm:col-span-2">
            <label htmlFor="f-notes" className="label">Notes</label>
            <textarea id="f-notes" name="notes" rows={3} className="field" defaultValue={v("notes", record.notes)} />
            {errors.notes && <p className="field-error" role="alert">{errors.notes}</p>}
          </div>
        </div>
        <h2 className="text-xl">Readings</h2>
        {errors.readings && <p className="field-error" role="alert">{errors.readings}</p>}
        <ReadingsEditor specs={specs} initial={initial} errors={errors} />
        <div className="flex gap-2">
          <button className="btn btn-primary" type="submit" disabled={busy}>{busy ? "Saving…" : "Save the amendment"}</button>
          <Link to={`/test-records/${record.id}`} className="btn no-underline">Cancel</Link>
        </div>
      </Form>
    </>
  );
}
