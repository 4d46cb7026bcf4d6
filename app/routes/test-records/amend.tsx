import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/amend";
import { parseParams, readForm } from "~/lib/edge.server";
import { idParams } from "~/lib/edge";
import { Field, FormError } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { VerdictBadge } from "~/components/test-records/parts";
import { ReadingsEditor, rowsFromValues } from "~/components/test-records/ReadingsEditor";
import { requirePermission } from "~/lib/auth.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { domainFailure } from "~/lib/domain-error.server";
import { amendFormValues, amendSchema, parseRecordForm } from "~/lib/test-records/form";
import { amendTestRecord, limitsOf, testRecordOr404 } from "~/lib/test-records/records.server";
import { flashKindOf, recordVerdictText } from "~/lib/test-records/labels";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Amend ${data?.record.workOrder ?? "test record"} · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "testrecord:amend");
  const view = await testRecordOr404(parseParams(request, idParams, params, "test record").id);
  return {
    record: view.record,
    procedure: view.procedure,
    revision: view.revision,
    specs: view.specs.map((s) => ({ ...limitsOf(s), note: s.note })),
    verdict: view.evaluation.verdict,
    notMeasured: view.evaluation.notMeasured.length,
    missingPlaces: view.evaluation.missingPlaces,
    missing: view.evaluation.missing,
    readingValues: amendFormValues(view.readings, view.evaluation.missingPlaces),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "testrecord:amend");
  const view = await testRecordOr404(parseParams(request, idParams, params, "test record").id);
  const form = await readForm(request);
  const parsed = parseRecordForm(amendSchema, form, view.specs.map(limitsOf), "An amended record still needs at least one reading.");
  if (!parsed.ok) return data({ errors: parsed.errors, values: parsed.values }, { status: 400 });
  try {
    const out = await amendTestRecord(user, view.record.id, { ...parsed.data, readings: parsed.readings });
    return redirectWithFlash(`/test-records/${view.record.id}`, {
      kind: flashKindOf(out.verdict),
      message: `Amendment ${out.version} saved (${out.changes.length} change${out.changes.length === 1 ? "" : "s"}); the record is ${recordVerdictText(out.verdict, out.notMeasured, out.placesMissing)}. The original stays in the history.`,
    });
  } catch (err) {
    return domainFailure(request, err, "", parsed.values);
  }
}

export default function AmendTestRecord({ loaderData, actionData }: Route.ComponentProps) {
  const { record, procedure, revision, specs, verdict, notMeasured, missingPlaces, missing, readingValues } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  const v = (k: string, d: string | number | null) => values[k] ?? (d == null ? "" : String(d));
  const busy = useNavigation().state === "submitting";
  const initial = rowsFromValues(specs, actionData?.values ?? readingValues);
  return (
    <>
      <PageHeader title={`Amend ${record.workOrder}`} kicker="Test record amendment">
        {record.title} · {procedure.title}, <span className="num">revision {revision.number}</span> · now{" "}
        <VerdictBadge verdict={verdict} notMeasured={notMeasured} places={missingPlaces.length} />
      </PageHeader>
      <p className="mb-4 max-w-3xl text-sm text-graphite-soft">
        A filed record is not edited in place. An amendment keeps the record as it was, saves the corrected readings as a new version, and
        records who changed what and why. The work order and the revision it was filed against do not change.
      </p>
      <Form method="post" className="space-y-5" noValidate>
        <FormError message={errors.form} />
        <div className="card grid gap-4 sm:grid-cols-2">
          <div className="sm:col-span-2">
            <label htmlFor="f-reason" className="label">
              Why is it amended?
            </label>
            <textarea
              id="f-reason"
              name="reason"
              rows={2}
              className="field"
              required
              defaultValue={values.reason ?? ""}
              placeholder="e.g. bore 3 re-measured after the gauge was re-zeroed"
              aria-invalid={errors.reason ? true : undefined}
              aria-describedby={errors.reason ? "f-reason-error" : undefined}
            />
            {errors.reason && (
              <p id="f-reason-error" className="field-error" role="alert">
                {errors.reason}
              </p>
            )}
          </div>
          <div className="sm:col-span-2">
            <Field label="Title" name="title" required defaultValue={v("title", record.title)} error={errors.title} />
          </div>
          <Field
            label="Engine serial"
            name="engineSerial"
            defaultValue={v("engineSerial", record.engineSerial)}
            error={errors.engineSerial}
          />
          <Field
            label="Test date"
            name="testedOn"
            type="date"
            required
            defaultValue={v("testedOn", record.testedOn)}
            error={errors.testedOn}
          />
          {record.recordingId && (
            <>
              <Field
                label="Recording from (s)"
                name="recordingStartS"
                inputMode="decimal"
                defaultValue={v("recordingStartS", record.recordingStartS)}
                error={errors.recordingStartS}
              />
              <Field
                label="Recording to (s)"
                name="recordingEndS"
                inputMode="decimal"
                defaultValue={v("recordingEndS", record.recordingEndS)}
                error={errors.recordingEndS}
              />
            </>
          )}
          <div className="sm:col-span-2">
            <label htmlFor="f-notes" className="label">
              Notes
            </label>
            <textarea id="f-notes" name="notes" rows={3} className="field" defaultValue={v("notes", record.notes)} />
            {errors.notes && (
              <p className="field-error" role="alert">
                {errors.notes}
              </p>
            )}
          </div>
        </div>
        <h2 className="text-xl">Readings</h2>
        {errors.readings && (
          <p className="field-error" role="alert">
            {errors.readings}
          </p>
        )}
        {missingPlaces.length > 0 && (
          <p className="max-w-3xl rounded-md border border-brass/50 bg-brass-soft/40 px-4 py-2 text-sm" data-testid="left-empty-note">
            {missing.join(" ")} Each waits as an empty row under its spec: type its value to fill it. A place left empty keeps the record
            Incomplete.
          </p>
        )}
        <ReadingsEditor specs={specs} initial={initial} errors={errors} missingPlaces={missingPlaces} />
        <div className="flex gap-2">
          <button className="btn btn-primary" type="submit" disabled={busy}>
            {busy ? "Saving…" : "Save the amendment"}
          </button>
          <Link to={`/test-records/${record.id}`} className="btn no-underline">
            Cancel
          </Link>
        </div>
      </Form>
    </>
  );
}
