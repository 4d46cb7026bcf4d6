import { Link } from "react-router";
import type { Route } from "./+types/print";
import { fmtDay, SafetyNote, VerdictBadge } from "~/components/test-records/parts";
import { ReadingsTable } from "~/components/test-records/RecordSheet";
import { requirePermission } from "~/lib/auth.server";
import { idParams, versionSearch } from "~/lib/edge";
import { parseParams, parseSearch } from "~/lib/edge.server";
import { testRecordOr404 } from "~/lib/test-records/records.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Record sheet ${data?.record.workOrder ?? ""} · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const { id } = parseParams(request, idParams, params, "test record");
  const view = await testRecordOr404(id, { version: parseSearch(request, versionSearch).v });
  return { ...view, printedAt: new Date().toISOString() };
}

export default function RecordSheetPrint({ loaderData }: Route.ComponentProps) {
  const { record, procedure, revision, current, specs, readings, evaluation, amendments, recording, version, filedBy, printedAt, calcs } =
    loaderData;
  const shown = amendments.filter((a) => a.version <= version);
  return (
    <div
      className="record-sheet mx-auto max-w-3xl bg-card p-6 shadow-sm print:max-w-none print:bg-white print:p-0 print:shadow-none"
      data-testid="record-sheet"
    >
      <div className="no-print mb-4 flex gap-2">
        <button type="button" className="btn btn-primary" onClick={() => window.print()}>
          Print
        </button>
        <Link className="btn no-underline" to={`/test-records/${record.id}`}>
          Back to the record
        </Link>
      </div>
      <header className="mb-4 border-b-2 border-graphite pb-2">
        <p className="text-xs font-semibold uppercase tracking-[0.14em] text-brass">Larkspur Engine Works · Test record</p>
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h1 className="text-2xl leading-tight">{record.title}</h1>
          <VerdictBadge
            verdict={evaluation.verdict}
            notMeasured={evaluation.notMeasured.length}
            places={evaluation.missingPlaces.length}
            size="lg"
          />
        </div>
        <dl className="num mt-2 grid grid-cols-2 gap-x-6 gap-y-0.5 text-sm sm:grid-cols-4">
          <div>
            <dt className="text-xs text-graphite-soft">Work order</dt>
            <dd className="font-semibold">{record.workOrder}</dd>
          </div>
          <div>
            <dt className="text-xs text-graphite-soft">Engine serial</dt>
            <dd>{record.engineSerial || "—"}</dd>
          </div>
          <div>
            <dt className="text-xs text-graphite-soft">Test date</dt>
            <dd>{fmtDay(record.testedOn)}</dd>
          </div>
          <div>
            <dt className="text-xs text-graphite-soft">Inspector</dt>
            <dd>{filedBy ?? "—"}</dd>
          </div>
        </dl>
        <p className="mt-2 text-sm">
          Procedure: <strong>{procedure.title}</strong>, revision {revision.number}
          {revision.publishedAt && <> (published {fmtDay(revision.publishedAt)})</>}
          {current && <> — superseded since by revision {current.number}; both revisions' limits are shown.</>}
        </p>
        {recording && (
          <p className="text-sm">
            Recording: {recording.title}
            {record.recordingStartS != null && <span className="num"> from {record.recordingStartS} s</span>}
          </p>
        )}
      </header>
      <ReadingsTable
        specs={specs}
        readings={readings}
        specVerdicts={evaluation.specs}
        currentSpecs={current?.specs ?? null}
        currentNumber={current?.number}
        recording={null}
        missingPlaces={evaluation.missingPlaces}
      />
      {evaluation.missing.length > 0 && <p className="mt-2 text-sm">{evaluation.missing.join(" ")}</p>}
      {calcs.filter((c) => c.version <= version).length > 0 && (
        <p className="mt-2 text-sm">
          Calculations kept with the record:{" "}
          {calcs
            .filter((c) => c.version <= version)
            .map((c) => c.label)
            .join("; ")}{" "}
          (see the record page).
        </p>
      )}
      {record.notes && (
        <section className="mt-3">
          <h2 className="text-base">Notes</h2>
          <p className="whitespace-pre-line font-serif text-sm">{record.notes}</p>
        </section>
      )}
      {shown.length > 0 && (
        <section className="mt-3">
          <h2 className="text-base">Amendments</h2>
          <ol className="text-sm">
            {shown.map((a) => (
              <li key={a.id} className="num">
                Amendment {a.version}, {fmtDay(a.createdAt)}, {a.by ?? "—"}: “{a.reason}” —{" "}
                {a.changes.map((c) => `${c.label}: ${c.before} → ${c.after}`).join("; ")}
              </li>
            ))}
          </ol>
        </section>
      )}
      <footer className="mt-6 grid grid-cols-2 gap-8 text-sm">
        <div className="border-t border-graphite pt-1">Inspected by</div>
        <div className="border-t border-graphite pt-1">Checked by</div>
      </footer>
      <div className="mt-4">
        <SafetyNote />
      </div>
      <p className="num mt-2 text-xs text-graphite-soft">
        Record {record.id.slice(0, 8)} · {version === record.currentVersion ? "in force" : `version ${version}, not the one in force`} ·
        printed {fmtDay(printedAt)}
      </p>
    </div>
  );
}
