import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/new";
import { z } from "zod";
import { parseSearch, readForm } from "~/lib/edge.server";
import { optionalSearch, slug as slugSchema, uuid } from "~/lib/edge";
import { Field, FormError, SelectField, TextAreaField } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { SafetyNote } from "~/components/test-records/parts";
import { ReadingsEditor, rowsFromValues } from "~/components/test-records/ReadingsEditor";
import { requirePermission } from "~/lib/auth.server";
import { buildChoices, getBuildByNumber } from "~/lib/builds/builds.server";
import { workOrderNumber } from "~/lib/builds/form";
import { domainFailure } from "~/lib/domain-error.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { newRecordSchema, parseRecordForm } from "~/lib/test-records/form";
import {
  createTestRecord,
  limitsOf,
  procedureForFiling,
  publishedProcedureOptions,
  recordingForFiling,
  revisionSpecLimits,
} from "~/lib/test-records/records.server";
import { flashKindOf, recordVerdictText } from "~/lib/test-records/labels";

export const meta: Route.MetaFunction = () => [{ title: "File a test record · Benchreel" }];

const filingSearch = z.object({
  procedure: optionalSearch(slugSchema),
  recording: optionalSearch(uuid),
  build: optionalSearch(workOrderNumber),
});

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "testrecord:create");
  const q = parseSearch(request, filingSearch);
  const slug = q.procedure ?? null;
  const recordingId = q.recording ?? null;
  const recording = recordingId ? await recordingForFiling(recordingId) : null;
  if (recordingId && !recording) throw data({ message: "That recording does not exist." }, { status: 404 });
  const today = new Date().toISOString().slice(0, 10);
  const build = q.build ?? "";
  if (!slug) return { filing: null, options: await publishedProcedureOptions(), recording, today, build, builds: [] };
  const f = await procedureForFiling(slug);
  if (!f)
    throw data({ message: "No published procedure by that name: a test record is filed against a published revision." }, { status: 404 });
  return {
    filing: {
      procedure: { id: f.procedure.id, slug: f.procedure.slug, title: f.procedure.title },
      revision: { id: f.revision.id, number: f.revision.number, publishedAt: f.revision.publishedAt },
      specs: f.specs.map((s) => ({ ...limitsOf(s), note: s.note })),
    },
    options: [],
    recording,
    today,
    build,
    // The record is attached to a build by choosing it (the form posts its work order number).
    builds: await buildChoices(),
  };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requirePermission(request, "testrecord:create");
  const form = await readForm(request);
  const specs = await revisionSpecLimits(String(form.get("revisionId") ?? ""));
  const parsed = parseRecordForm(newRecordSchema, form, specs, "Type at least one reading: the verdict is computed from them.");
  if (!parsed.ok) return data({ errors: parsed.errors, values: parsed.values }, { status: 400 });
  const d = parsed.data;
  // Old clients post the work order as text: it must name a build, whose number and serial the record takes.
  const build = await getBuildByNumber(d.workOrder);
  if (!build)
    return data(
      {
        errors: { workOrder: `No build has the work order ${d.workOrder}: open the build first (Builds, Open a build).` },
        values: parsed.values,
      },
      { status: 400 },
    );
  try {
    const rec = await createTestRecord(user, {
      ...d,
      workOrder: build.number,
      buildId: build.id,
      engineSerial: d.engineSerial || build.engineSerial,
      recordingId: d.recordingId || null,
      readings: parsed.readings,
    });
    return redirectWithFlash(`/test-records/${rec.id}`, {
      kind: flashKindOf(rec.verdict),
      message: `Test record filed for ${d.workOrder}: ${recordVerdictText(rec.verdict, rec.notMeasured, rec.placesMissing)}.`,
    });
  } catch (err) {
    return domainFailure(request, err, "", parsed.values);
  }
}

export default function NewTestRecord({ loaderData, actionData }: Route.ComponentProps) {
  const { filing, options, recording, today, build, builds } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  const busy = useNavigation().state === "submitting";
  const v = (k: string, d = "") => values[k] ?? d;

  if (!filing) {
    return (
      <>
        <PageHeader title="File a test record" kicker="Test records">
          A test record is filed against a procedure's published revision.{recording && <> From the recording “{recording.title}”.</>}
        </PageHeader>
        <Form method="get" className="card max-w-xl space-y-3">
          {recording && <input type="hidden" name="recording" value={recording.id} />}
          {build && <input type="hidden" name="build" value={build} />}
          {options.length ? (
            <>
              <SelectField label="Procedure" name="procedure" required defaultValue="">
                <option value="" disabled>
                  Choose a published procedure…
                </option>
                {options.map((o) => (
                  <option key={o.id} value={o.slug}>
                    {o.title}
                  </option>
                ))}
              </SelectField>
              <button className="btn btn-primary" type="submit">
                Continue
              </button>
            </>
          ) : (
            <p className="text-graphite-soft">No procedure is published yet, so there is nothing to file a test record against.</p>
          )}
        </Form>
      </>
    );
  }

  const { procedure, revision, specs } = filing;
  const initial = rowsFromValues(specs, actionData?.values);
  return (
    <>
      <PageHeader title="File a test record" kicker="Test records">
        Against <Link to={`/procedures/${procedure.slug}`}>{procedure.title}</Link>, <span className="num">revision {revision.number}</span>{" "}
        (the published one). The revision is recorded with the test and never changes afterwards.
      </PageHeader>
      <Form method="post" className="space-y-5" noValidate>
        <input type="hidden" name="revisionId" value={revision.id} />
        {recording && <input type="hidden" name="recordingId" value={recording.id} />}
        <FormError message={errors.form ?? (errors.revisionId && !errors.form ? errors.revisionId : undefined)} />
        <div className="card grid gap-4 sm:grid-cols-2">
          <div className="sm:col-span-2">
            <Field label="Title" name="title" required defaultValue={v("title", procedure.title)} error={errors.title} />
          </div>
          <SelectField label="Build (work order)" name="workOrder" required defaultValue={v("workOrder", build)} error={errors.workOrder}>
            <option value="">Choose the build…</option>
            {/* What an old client typed stays in view, beside its error, when no build has it. */}
            {v("workOrder") && !builds.some((b) => b.number === v("workOrder")) && (
              <option value={v("workOrder")}>{v("workOrder")} (no such build)</option>
            )}
            {builds.map((b) => (
              <option key={b.id} value={b.number}>
                {b.label}
              </option>
            ))}
          </SelectField>
          <Field
            label="Engine serial"
            name="engineSerial"
            defaultValue={v("engineSerial")}
            error={errors.engineSerial}
            hint="Left empty, the build's serial is used."
            autoComplete="off"
          />
          <Field
            label="Test date"
            name="testedOn"
            type="date"
            required
            defaultValue={v("testedOn", today)}
            max={today}
            error={errors.testedOn}
          />
          {recording && (
            <div className="sm:col-span-2">
              <p className="label">Recording</p>
              <p className="text-sm">
                <Link to={`/recordings/${recording.id}`}>{recording.title}</Link>
                {recording.durationS != null && <span className="num text-graphite-soft"> · {Math.round(recording.durationS)} s long</span>}
              </p>
              <div className="mt-2 grid grid-cols-2 gap-3">
                <Field
                  label="Test from (s)"
                  name="recordingStartS"
                  inputMode="decimal"
                  defaultValue={v("recordingStartS")}
                  error={errors.recordingStartS}
                />
                <Field
                  label="Test to (s)"
                  name="recordingEndS"
                  inputMode="decimal"
                  defaultValue={v("recordingEndS")}
                  error={errors.recordingEndS}
                />
              </div>
            </div>
          )}
          <TextAreaField
            label="Notes"
            name="notes"
            rows={3}
            defaultValue={v("notes")}
            error={errors.notes}
            wrapperClassName="sm:col-span-2"
          />
        </div>

        <h2 className="text-xl">Readings</h2>
        {specs.length ? (
          <>
            <p className="text-sm text-graphite-soft">
              Type each reading in the unit you measured in; it is converted to the spec's unit and checked against its limits (inclusive).
              Specs left empty are listed as not measured.
            </p>
            {errors.readings && (
              <p className="field-error" role="alert">
                {errors.readings}
              </p>
            )}
            <ReadingsEditor specs={specs} initial={initial} errors={errors} pull={recording?.readings} />
          </>
        ) : (
          <p className="card text-graphite-soft">
            Revision {revision.number} of this procedure has no specs, so there is nothing to check readings against.
          </p>
        )}
        <SafetyNote />
        <div className="flex gap-2">
          <button className="btn btn-primary" type="submit" disabled={busy || !specs.length}>
            {busy ? "Filing…" : "File the test record"}
          </button>
          <Link to={`/procedures/${procedure.slug}`} className="btn no-underline">
            Cancel
          </Link>
        </div>
      </Form>
    </>
  );
}
