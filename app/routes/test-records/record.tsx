import { Link } from "react-router";
import type { Route } from "./+types/record";
import { parseParams, parseSearch, readForm } from "~/lib/edge.server";
import { idParams, versionSearch } from "~/lib/edge";
import { PageHeader } from "~/components/page";
import { fmtDay, fmtNum, SafetyNote, VerdictBadge } from "~/components/test-records/parts";
import { FiledLine, ReadingsTable } from "~/components/test-records/RecordSheet";
import { RecordCalcs } from "~/components/test-records/RecordCalcs";
import { requirePermission } from "~/lib/auth.server";
import { DomainError } from "~/lib/domain-error";
import { domainFailure, unknownAction } from "~/lib/domain-error.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { can } from "~/lib/permissions";
import { calcFormSchema } from "~/lib/test-records/calc-form";
import { runRecordCalc } from "~/lib/test-records/calc-runs.server";
import { testRecordOr404 } from "~/lib/test-records/records.server";
import { RunPhotoGallery } from "~/components/runs/RunPhotos";
import { photosForTestRecord } from "~/lib/runs/runs.server";
import { RECORD_VERDICT_LABELS } from "~/lib/test-records/labels";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.record.workOrder ?? "Test record"} · Test records · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const { id } = parseParams(request, idParams, params, "test record");
  const view = await testRecordOr404(id, { version: parseSearch(request, versionSearch).v });
  return {
    ...view,
    photos: await photosForTestRecord(id),
    flags: { canAmend: can(user.role, "testrecord:amend"), canCalc: can(user.role, "testrecord:create") },
  };
}

/** Runs a calculator on the readings in force and keeps it with the record. */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "testrecord:create");
  const view = await testRecordOr404(parseParams(request, idParams, params, "test record").id);
  const form = await readForm(request);
  const parsed = parseForm(calcFormSchema, form);
  const intent = String(form.get("intent") ?? "");
  try {
    if (!parsed.ok) {
      if (parsed.errors.intent) return unknownAction(request, intent);
      throw new DomainError(Object.values(parsed.errors)[0], { status: 400, field: "calc" });
    }
    const message = await runRecordCalc(user, view, parsed.data);
    return redirectWithFlash(`/test-records/${view.record.id}#calcs`, { kind: "ok", message });
  } catch (err) {
    return domainFailure(request, err, intent, parsed.values);
  }
}

export default function TestRecordPage({ loaderData, actionData }: Route.ComponentProps) {
  const { record, procedure, revision, current, specs, readings, evaluation, amendments, calcs, recording, version, flags, filedBy } =
    loaderData;
  const historical = version !== record.currentVersion;
  return (
    <>
      <PageHeader
        title={record.title}
        kicker={`Test record · ${record.workOrder}`}
        actions={
          <>
            <Link className="btn no-underline" to={`/test-records/${record.id}/print${historical ? `?v=${version}` : ""}`}>
              Record sheet
            </Link>
            {flags.canAmend && !historical && (
              <Link className="btn no-underline" to={`/test-records/${record.id}/amend`}>
                Amend
              </Link>
            )}
          </>
        }
      >
        <FiledLine testedOn={record.testedOn} by={filedBy} createdAt={record.createdAt} />
      </PageHeader>

      {historical && (
        <p className="mb-4 rounded-md border border-brass/50 bg-brass-soft/50 px-4 py-2 text-sm" data-testid="historical-note">
          You are looking at {version === 0 ? "the record as originally filed" : `version ${version} (after amendment ${version})`}.{" "}
          <Link to={`/test-records/${record.id}`}>See the record in force</Link>.
        </p>
      )}

      <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_18rem]">
        <div className="min-w-0 space-y-5">
          <section className="card flex flex-wrap items-center justify-between gap-3" aria-label="Verdict">
            <div>
              <VerdictBadge
                verdict={evaluation.verdict}
                notMeasured={evaluation.notMeasured.length}
                places={evaluation.missingPlaces.length}
                size="lg"
              />
              <p className="mt-1 text-sm text-graphite-soft" data-testid="missing">
                {evaluation.missing.length ? evaluation.missing.join(" ") : "Every spec of the revision was measured."}
              </p>
            </div>
            <dl className="num grid grid-cols-[auto_1fr] gap-x-3 text-sm">
              <dt className="text-graphite-soft">Work order</dt>
              <dd className="font-semibold">{record.workOrder}</dd>
              <dt className="text-graphite-soft">Engine serial</dt>
              <dd>{record.engineSerial || "—"}</dd>
              <dt className="text-graphite-soft">Test date</dt>
              <dd>{fmtDay(record.testedOn)}</dd>
            </dl>
          </section>

          {current && (
            <p className="rounded-md border border-brass/50 bg-brass-soft/40 px-4 py-2 text-sm" data-testid="superseded-note">
              Filed against revision {revision.number}, which has since been superseded by revision {current.number}. The verdict stays the
              one against revision {revision.number}'s limits; the table shows both.
            </p>
          )}

          <section className="card overflow-x-auto p-0" aria-labelledby="readings-h">
            <h2 id="readings-h" className="px-4 pt-3 text-lg">
              Readings
            </h2>
            <div className="mt-2">
              <ReadingsTable
                specs={specs}
                readings={readings}
                specVerdicts={evaluation.specs}
                currentSpecs={current?.specs ?? null}
                currentNumber={current?.number}
                recording={recording}
                missingPlaces={evaluation.missingPlaces}
              />
            </div>
          </section>

          {record.notes && (
            <section className="card" aria-labelledby="notes-h">
              <h2 id="notes-h" className="text-lg">
                Notes
              </h2>
              <p className="mt-1 whitespace-pre-line font-serif">{record.notes}</p>
            </section>
          )}

          {loaderData.photos.length > 0 && <RunPhotoGallery photos={loaderData.photos} />}

          <RecordCalcs
            specs={specs}
            readings={readings}
            calcs={calcs}
            currentVersion={record.currentVersion}
            canRun={flags.canCalc && !historical}
            actionData={actionData}
          />
        </div>

        <aside className="space-y-4 text-sm">
          <section className="card p-4" aria-labelledby="proc-h">
            <h2 id="proc-h" className="text-base">
              Procedure
            </h2>
            <p className="mt-1">
              <Link to={`/procedures/${procedure.slug}`}>{procedure.title}</Link>
            </p>
            <p className="num mt-0.5 text-graphite-soft">
              Filed against <Link to={`/procedures/${procedure.slug}/r/${revision.number}`}>revision {revision.number}</Link>
              {revision.state === "superseded" ? " (superseded)" : revision.state === "published" ? " (published)" : ""}
            </p>
          </section>
          {recording && (
            <section className="card p-4" aria-labelledby="rec-h">
              <h2 id="rec-h" className="text-base">
                Recording
              </h2>
              <p className="mt-1">
                <Link to={`/recordings/${recording.id}${record.recordingStartS != null ? `?t=${Math.floor(record.recordingStartS)}` : ""}`}>
                  {recording.title}
                </Link>
              </p>
              {record.recordingStartS != null && (
                <p className="num text-graphite-soft">
                  from {fmtNum(record.recordingStartS)} s{record.recordingEndS != null && <> to {fmtNum(record.recordingEndS)} s</>}
                </p>
              )}
            </section>
          )}
          <section className="card p-4" aria-labelledby="hist-h" data-testid="amendments">
            <h2 id="hist-h" className="text-base">
              History
            </h2>
            <ol className="mt-1 space-y-3">
              <li>
                <p className="num">
                  <strong>Filed</strong> {fmtDay(record.createdAt)} by {filedBy ?? "—"}
                </p>
                {amendments.length > 0 && version !== 0 && <Link to={`/test-records/${record.id}?v=0`}>See the original</Link>}
              </li>
              {amendments.map((a) => (
                <li key={a.id} className="border-t border-rule/60 pt-2" data-testid="amendment">
                  <p className="num">
                    <strong>Amendment {a.version}</strong> · {fmtDay(a.createdAt)} by {a.by ?? "—"}
                  </p>
                  <p className="font-serif italic">“{a.reason}”</p>
                  <ul className="mt-1 space-y-0.5">
                    {a.changes.map((c) => (
                      <li key={c.key} className="num">
                        <span className="font-semibold">{c.label}:</span> <del className="text-graphite-soft">{c.before || "—"}</del> →{" "}
                        {c.after || "—"}
                      </li>
                    ))}
                  </ul>
                  {a.verdictBefore !== a.verdictAfter && (
                    <p className="mt-0.5">
                      Verdict {RECORD_VERDICT_LABELS[a.verdictBefore]} → {RECORD_VERDICT_LABELS[a.verdictAfter]}
                    </p>
                  )}
                  {version !== a.version && <Link to={`/test-records/${record.id}?v=${a.version}`}>See this version</Link>}
                </li>
              ))}
            </ol>
          </section>
          <SafetyNote />
        </aside>
      </div>
    </>
  );
}
