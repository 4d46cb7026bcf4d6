import { Link } from "react-router";
import type { Route } from "./+types/sheet";
import { fmtDay, SafetyNote, VerdictBadge } from "~/components/test-records/parts";
import { ReadingsTable } from "~/components/test-records/RecordSheet";
import { requirePermission } from "~/lib/auth.server";
import { buildOr404 } from "~/lib/builds/builds.server";
import { buildPage } from "~/lib/builds/page.server";
import { calcSummary, sheetFacts, sheetSignOff } from "~/lib/builds/sheet";
import { CALC_CAUTION } from "~/lib/calc-kinds";
import { notFound } from "~/lib/edge.server";
import { photosForBuild } from "~/lib/runs/runs.server";
import { RunPhotoGallery } from "~/components/runs/RunPhotos";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Build sheet ${data?.build.number ?? ""} · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "builds:read");
  const b = await buildOr404(request, params);
  const page = await buildPage(b.number);
  if (!page) notFound(request, "build");
  return { ...page, photos: await photosForBuild(page.build.id), printedAt: new Date().toISOString() };
}

/** The build sheet for the clipboard: fluid width, so it prints on A4 and Letter alike. */
export default function BuildSheet({ loaderData }: Route.ComponentProps) {
  const page = loaderData;
  const { build, records, calcs, photos, printedAt } = page;
  return (
    <div
      className="record-sheet mx-auto max-w-4xl bg-card p-6 shadow-sm print:max-w-none print:bg-white print:p-0 print:shadow-none"
      data-testid="build-sheet"
    >
      <div className="no-print mb-4 flex flex-wrap gap-2">
        <button type="button" className="btn btn-primary" onClick={() => window.print()}>
          Print
        </button>
        <a className="btn no-underline" href={`/builds/${build.number}/sheet.pdf`} download>
          PDF (A4)
        </a>
        <a className="btn no-underline" href={`/builds/${build.number}/sheet.pdf?paper=letter`} download>
          PDF (Letter)
        </a>
        <Link className="btn no-underline" to={`/builds/${build.number}`}>
          Back to the build
        </Link>
      </div>
      <header className="mb-4 border-b-2 border-graphite pb-2">
        <p className="text-xs font-semibold uppercase tracking-[0.14em] text-brass">Larkspur Engine Works · Build sheet</p>
        <h1 className="text-2xl leading-tight">
          {build.number} · {build.engine || "Engine"}
        </h1>
        <dl className="num mt-2 grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
          {sheetFacts(build).map((f) => (
            <div key={f.label}>
              <dt className="text-xs text-graphite-soft">{f.label}</dt>
              <dd className={f.label === "Work order" ? "font-semibold" : ""}>{f.value}</dd>
            </div>
          ))}
        </dl>
      </header>
      <h2 className="text-lg">Measured</h2>
      {records.length === 0 && <p className="text-sm text-graphite-soft">No test record is filed for this build.</p>}
      {records.map((v) => (
        <section key={v.record.id} className="mt-3 break-inside-avoid-page">
          <div className="flex flex-wrap items-end justify-between gap-2">
            <h3 className="text-base">{v.record.title}</h3>
            <VerdictBadge
              verdict={v.evaluation.verdict}
              notMeasured={v.evaluation.notMeasured.length}
              places={v.evaluation.missingPlaces.length}
            />
          </div>
          {v.evaluation.missing.length > 0 && <p className="text-sm">{v.evaluation.missing.join(" ")}</p>}
          <p className="num text-xs text-graphite-soft">
            {v.procedure.title}, revision {v.revision.number} · tested {fmtDay(v.record.testedOn)} · signed off by{" "}
            {v.filedBy ?? "a former member of staff"} on {fmtDay(v.record.createdAt)}
          </p>
          <div className="overflow-x-auto">
            <ReadingsTable
              specs={v.specs}
              readings={v.readings}
              specVerdicts={v.evaluation.specs}
              recording={null}
              missingPlaces={v.evaluation.missingPlaces}
            />
          </div>
        </section>
      ))}
      {calcs.some((c) => c.ok) && (
        <section className="mt-4 break-inside-avoid-page">
          <h2 className="text-lg">Calculated from these readings</h2>
          <ul className="num text-sm">
            {calcs.map((c) => {
              const line = calcSummary(c);
              return line && <li key={c.label}>{line}</li>;
            })}
          </ul>
          <p className="text-xs text-graphite-soft">{CALC_CAUTION}</p>
        </section>
      )}
      {photos.length > 0 && (
        <div className="mt-4 break-inside-avoid-page">
          <RunPhotoGallery photos={photos} title="Photos taken at the bench" />
        </div>
      )}
      <section className="mt-4 break-inside-avoid-page">
        <h2 className="text-lg">Sign-off</h2>
        <ul className="num text-sm">
          {sheetSignOff(page).map((line) => (
            <li key={line}>{line}</li>
          ))}
        </ul>
      </section>
      <footer className="mt-10 grid grid-cols-2 gap-8 text-sm" data-testid="signatures">
        <div className="border-t border-graphite pt-1">
          Lead builder{build.leadBuilderName && ` · ${build.leadBuilderName}`}
          <span className="block text-xs text-graphite-soft">Signature and date</span>
        </div>
        <div className="border-t border-graphite pt-1">
          Received by the customer · {build.customerName}
          <span className="block text-xs text-graphite-soft">Signature and date</span>
        </div>
      </footer>
      <div className="mt-4">
        <SafetyNote />
      </div>
      <p className="num mt-2 text-xs text-graphite-soft">
        {build.number} · printed {fmtDay(printedAt)}
      </p>
    </div>
  );
}
