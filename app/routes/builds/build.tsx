import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/build";
import { BuildOverview, BuildTimeline, ClampLoads, OutOfSpecList, RecordsByProcedure } from "~/components/builds/BuildSections";
import { StatusBadge } from "~/components/builds/parts";
import { buildSheetPdf } from "~/components/builds/sheet-pdf.server";
import { FormError } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { SafetyNote } from "~/components/test-records/parts";
import { CalcResult } from "~/components/test-records/RecordCalcs";
import { requirePermission } from "~/lib/auth.server";
import { buildOr404 } from "~/lib/builds/builds.server";
import { attachRecordingSchema, detachMarkSchema, detachRecordingSchema } from "~/lib/builds/attach-form";
import { mailSheetSchema, reopenSchema, statusSchema } from "~/lib/builds/form";
import {
  attachRecordingToBuild,
  detachMarkFromBuild,
  detachRecordingFromBuild,
  unattachedRecordings,
} from "~/lib/recordings/build-link.server";
import { mailBuildSheet } from "~/lib/builds/mail.server";
import { buildPage } from "~/lib/builds/page.server";
import { BuildRuns } from "~/components/runs/RunList";
import { RunPhotoGallery } from "~/components/runs/RunPhotos";
import { listRunsForBuild, photosForBuild } from "~/lib/runs/runs.server";
import { sheetPhotos } from "~/lib/runs/photos.server";
import { BUILD_STATUS_LABELS, canReopen, nextStatus } from "~/lib/builds/status";
import { moveBuild, reopenBuild } from "~/lib/builds/write.server";
import { CALC_CAUTION } from "~/lib/calc-kinds";
import { domainFailure, unknownAction } from "~/lib/domain-error.server";
import { notFound, readForm } from "~/lib/edge.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { can } from "~/lib/permissions";
import { BuildMedia } from "~/components/builds/BuildMedia";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.build.number ?? "Build"} · Builds · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "builds:read");
  const { number } = await buildOr404(request, params);
  const page = await buildPage(number);
  if (!page) notFound(request, "build");
  return {
    ...page,
    canWrite: can(user.role, "builds:write"),
    runs: await listRunsForBuild(page.build.id),
    photos: await photosForBuild(page.build.id),
    canRun: can(user.role, "run:work"),
    unattached: can(user.role, "builds:write") ? await unattachedRecordings() : [],
    canUpload: can(user.role, "recording:upload"),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "builds:write");
  const b = await buildOr404(request, params);
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const schema =
    intent === "status"
      ? statusSchema
      : intent === "reopen"
        ? reopenSchema
        : intent === "mail"
          ? mailSheetSchema
          : intent === "attach-recording"
            ? attachRecordingSchema
            : intent === "detach-recording"
              ? detachRecordingSchema
              : intent === "detach-mark"
                ? detachMarkSchema
                : null;
  if (!schema) return unknownAction(request, intent);
  const parsed = parseForm(schema, form);
  if (!parsed.ok) return data({ intent, errors: parsed.errors, values: parsed.values }, { status: 400 });
  try {
    if (intent === "status") {
      const to = (parsed.data as { to: "on_bench" | "finished" | "delivered" }).to;
      await moveBuild(user, b.id, to);
      return redirectWithFlash(`/builds/${b.number}`, { kind: "ok", message: `${b.number} is ${BUILD_STATUS_LABELS[to]}.` });
    }
    if (intent === "reopen") {
      await reopenBuild(user, b.id, (parsed.data as { reason: string }).reason);
      return redirectWithFlash(`/builds/${b.number}`, { kind: "ok", message: `${b.number} is reopened and back on the bench.` });
    }
    if (intent === "attach-recording") {
      const { title } = await attachRecordingToBuild(user.id, b.number, (parsed.data as { recordingId: string }).recordingId);
      return redirectWithFlash(`/builds/${b.number}#media`, { kind: "ok", message: `“${title}” is on ${b.number}.` });
    }
    if (intent === "detach-recording") {
      const { title } = await detachRecordingFromBuild(user.id, b.id, (parsed.data as { recordingId: string }).recordingId);
      return redirectWithFlash(`/builds/${b.number}#media`, { kind: "ok", message: `“${title}” is no longer on ${b.number}.` });
    }
    if (intent === "detach-mark") {
      const { text } = await detachMarkFromBuild(user.id, b.id, (parsed.data as { markId: string }).markId);
      return redirectWithFlash(`/builds/${b.number}#media`, { kind: "ok", message: `The mark “${text}” is no longer on ${b.number}.` });
    }
    const to = (parsed.data as { to: string }).to;
    const page = await buildPage(b.number);
    if (!page) notFound(request, "build");
    await mailBuildSheet(user, b, to, await buildSheetPdf(page, "a4", await sheetPhotos(b.id)));
    return redirectWithFlash(`/builds/${b.number}#timeline`, { kind: "ok", message: `The build sheet is on its way to ${to}.` });
  } catch (err) {
    return domainFailure(request, err, intent, parsed.values);
  }
}

/** The e-mail address in the customer's contact, if it holds one. */
function contactAddress(contact: string): string {
  return /[^\s<>,;]+@[^\s<>,;]+\.[^\s<>,;]+/.exec(contact)?.[0] ?? "";
}

export default function BuildPage({ loaderData, actionData }: Route.ComponentProps) {
  const { build, records, outOfSpec, incomplete, calcs, recordings, marks, timeline, canWrite } = loaderData;
  const busy = useNavigation().state === "submitting";
  const errors: Record<string, string> = actionData?.errors ?? {};
  const next = nextStatus(build.status);
  const failed = (i: string) => (actionData?.intent === i ? errors : {});
  return (
    <>
      <PageHeader
        title={build.number}
        kicker={`Build · ${build.customerName}`}
        actions={
          <>
            <Link className="btn no-underline" to={`/builds/${build.number}/sheet`}>
              Build sheet
            </Link>
            <a className="btn no-underline" href={`/builds/${build.number}/sheet.pdf`} download>
              PDF
            </a>
            <a className="btn no-underline" href={`/builds/${build.number}/readings.csv`} download>
              Readings CSV
            </a>
            {canWrite && (
              <>
                <Link className="btn no-underline" to={`/builds/${build.number}/edit`}>
                  Change
                </Link>
                <Link className="btn btn-primary no-underline" to={`/test-records/new?build=${build.number}`}>
                  File a test record
                </Link>
              </>
            )}
          </>
        }
      >
        <StatusBadge status={build.status} /> {build.engine || "Engine not described"}
        {build.engineSerial && <span className="num"> · serial {build.engineSerial}</span>}
      </PageHeader>

      <div className="space-y-6">
        <BuildOverview build={build} />

        {canWrite && (
          <section className="card flex flex-wrap items-end gap-4" aria-label="Where the build stands">
            {next && (
              <Form method="post" className="flex flex-wrap items-end gap-2">
                <input type="hidden" name="intent" value="status" />
                <input type="hidden" name="to" value={next} />
                <button className="btn btn-primary" type="submit" disabled={busy}>
                  Move to {BUILD_STATUS_LABELS[next]}
                </button>
                <FormError message={failed("status").form ?? failed("status").to} />
              </Form>
            )}
            {canReopen(build.status) && (
              <Form method="post" className="flex flex-1 flex-wrap items-end gap-2">
                <input type="hidden" name="intent" value="reopen" />
                <div className="min-w-56 flex-1">
                  <label htmlFor="f-reason" className="label">
                    Reason to reopen
                  </label>
                  <input id="f-reason" name="reason" className="field" aria-invalid={failed("reopen").reason ? true : undefined} />
                  {failed("reopen").reason && (
                    <p className="field-error" role="alert">
                      {failed("reopen").reason}
                    </p>
                  )}
                </div>
                <button className="btn" type="submit" disabled={busy}>
                  Reopen
                </button>
              </Form>
            )}
            <Form method="post" className="flex flex-1 flex-wrap items-end gap-2">
              <input type="hidden" name="intent" value="mail" />
              <div className="min-w-56 flex-1">
                <label htmlFor="f-mail-to" className="label">
                  Mail the build sheet (PDF) to
                </label>
                <input
                  id="f-mail-to"
                  name="to"
                  type="email"
                  className="field"
                  defaultValue={actionData?.intent === "mail" ? actionData.values?.to : contactAddress(build.customerContact)}
                  aria-invalid={failed("mail").to ? true : undefined}
                />
                {(failed("mail").to || failed("mail").form) && (
                  <p className="field-error" role="alert">
                    {failed("mail").to ?? failed("mail").form}
                  </p>
                )}
              </div>
              <button className="btn" type="submit" disabled={busy}>
                Mail the sheet
              </button>
            </Form>
          </section>
        )}

        <OutOfSpecList items={outOfSpec} />

        <section className="card" aria-labelledby="incomplete-h">
          <h2 id="incomplete-h" className="text-lg">
            Incomplete
          </h2>
          {incomplete.length ? (
            <ul className="mt-2 space-y-1 text-sm">
              {incomplete.map((i) => (
                <li key={i.recordId}>
                  <Link to={`/test-records/${i.recordId}`}>{i.title}</Link>: {i.missing.join(" ")}
                </li>
              ))}
            </ul>
          ) : (
            <p className="mt-1 text-sm text-graphite-soft">No test record of this build is missing a spec.</p>
          )}
          <BuildRuns rows={loaderData.runs} buildNumber={build.number} canStart={loaderData.canRun && build.status !== "delivered"} />
        </section>

        <RecordsByProcedure records={records} />

        {loaderData.photos.length > 0 && <RunPhotoGallery photos={loaderData.photos} title="Photos taken during runs" />}

        <section className="card space-y-3" aria-labelledby="calcs-h" id="calcs">
          <h2 id="calcs-h" className="text-lg">
            Calculators on this build's readings
          </h2>
          {calcs.length ? (
            calcs.map((c) =>
              c.kind === "preload" ? null : (
                <div key={c.label} className="border-b border-rule/60 pb-3 last:border-0" data-testid="build-calc">
                  <p className="font-semibold">
                    {c.label} · <Link to={`/test-records/${c.recordId}`}>from its test record</Link>
                  </p>
                  {c.ok ? (
                    <CalcResult kind={c.kind === "distortion" ? "distortion" : "clearance"} result={c.result} />
                  ) : (
                    <p className="text-sm text-brass">{c.reason}</p>
                  )}
                </div>
              ),
            )
          ) : (
            <p className="text-sm text-graphite-soft">
              No calculator applies yet: Bore distortion needs three or more bore diameters of a cylinder with their depth and angle,
              piston-to-wall a bore and a piston reading of the same cylinder, a clamp load a torque read where the procedure has a Preload
              calculator.
            </p>
          )}
          <ClampLoads calcs={calcs} />
          <p className="text-xs text-graphite-soft">{CALC_CAUTION}</p>
        </section>

        <BuildMedia
          recordings={recordings}
          marks={marks}
          canWrite={canWrite}
          canUpload={loaderData.canUpload}
          buildNumber={build.number}
          unattached={loaderData.unattached}
          busy={busy}
          errors={failed("attach-recording")}
          refused={failed("detach-recording").form ?? failed("detach-mark").form}
        />

        <BuildTimeline entries={timeline} />
        <SafetyNote />
      </div>
    </>
  );
}
