import { lazy, Suspense, useCallback, useEffect, useMemo, useRef, useState } from "react";
import { data, Form, Link, useNavigation, useRevalidator, useSearchParams } from "react-router";
import type { Route } from "./+types/watch";
import { notFound, parseParams, readForm } from "~/lib/edge.server";
import { idParams } from "~/lib/edge";
import { Field, FormError } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { currentMarkId, MarksPanel, useOptimisticMarks, type MarksPanelHandle } from "~/components/recordings/MarksPanel";
import type { PlayerApi } from "~/components/recordings/Player.client";
import { PlayerPlaceholder } from "~/components/recordings/PlayerPlaceholder";
import { ReadingsChart } from "~/components/recordings/ReadingsChart";
import { ReadingsPanel, useOptimisticReadings } from "~/components/recordings/ReadingsPanel";
import { RecordingStatePanel } from "~/components/recordings/RecordingStatePanel";
import { StateBadge } from "~/components/recordings/StateBadge";
import type { MarkRow, ReadingRow } from "~/components/recordings/types";
import { useWatchKeys, WatchKeyHelp } from "~/components/recordings/useWatchKeys";
import { assertCan, forbidden, requirePermission } from "~/lib/auth.server";
import { domainFailure, formValues, unknownAction } from "~/lib/domain-error.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { can, canOnOwned } from "~/lib/permissions";
import { getRecording, listReadings } from "~/lib/recordings/library.server";
import { deleteRecording, recordingDetailsSchema, retryProcessing, saveRecordingDetails } from "~/lib/recordings/manage.server";
import { marksFor, procedureChoicesFor } from "~/lib/recordings/notes.server";
import { formatBytes } from "~/lib/byte-format";
import { formatDuration } from "~/lib/time-format";
import { formatDay } from "~/lib/dates";
import { Transcript, type TranscriptCue, type TranscriptSource } from "~/components/recordings/Transcript";
import { captionsFor } from "~/lib/captions/captions.server";
import { BuildLink, BuildOptions } from "~/components/builds/BuildPicker";
import { buildChoices } from "~/lib/builds/builds.server";
import { buildNumberField } from "~/lib/builds/attach-form";
import { setRecordingBuild } from "~/lib/recordings/build-link.server";

const Player = lazy(() => import("~/components/recordings/Player.client"));

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.recording.title ?? "Recording"} · Recordings · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const recording = await getRecording(parseParams(request, idParams, params, "recording").id);
  if (!recording) notFound(request, "recording");
  const [marks, readings, procedures, captions] = await Promise.all([
    marksFor(user, recording.id),
    listReadings(recording.id),
    procedureChoicesFor(user),
    captionsFor(recording.id),
  ]);
  // The builds a recording or a mark may be put on, for those who may change one (mark:create
  // is every mark's writer; recording:edit this recording's details) and read builds.
  const mayAttach =
    can(user.role, "builds:read") && (can(user.role, "mark:create") || canOnOwned(user, "recording:edit", recording.uploadedBy));
  return {
    recording,
    marks,
    readings,
    procedures,
    captions,
    builds: mayAttach ? await buildChoices() : [],
    me: { id: user.id, role: user.role },
    can: {
      edit: canOnOwned(user, "recording:edit", recording.uploadedBy),
      download: can(user.role, "recording:download"),
      retry: can(user.role, "recording:retry"),
      fileTestRecord: can(user.role, "testrecord:create"),
      mark: can(user.role, "mark:create"),
      read: can(user.role, "reading:create"),
      captions: can(user.role, "caption:edit"),
    },
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "recording:edit:own");
  const rec = await getRecording(parseParams(request, idParams, params, "recording").id);
  if (!rec) notFound(request, "recording");
  const form = await readForm(request);
  const intent = form.get("intent");
  try {
    if (intent === "retry") {
      assertCan(request, user, "recording:retry");
      await retryProcessing(user.id, rec);
      return redirectWithFlash(`/recordings/${rec.id}`, { kind: "ok", message: "Processing started again." });
    }
    if (!canOnOwned(user, "recording:edit", rec.uploadedBy)) forbidden(request, "You can change only recordings you uploaded.");
    if (intent === "details") {
      const parsed = parseForm(recordingDetailsSchema.merge(buildNumberField), form);
      if (!parsed.ok) return data({ intent, errors: parsed.errors, values: parsed.values }, { status: 400 });
      const { buildNumber, ...details } = parsed.data;
      if (buildNumber !== rec.buildNumber) assertCan(request, user, "builds:read");
      // The build first: an unknown number is refused before anything is saved.
      await setRecordingBuild(user.id, rec.id, buildNumber);
      await saveRecordingDetails(user.id, rec.id, details);
      return redirectWithFlash(`/recordings/${rec.id}`, { kind: "ok", message: "Details saved." });
    }
    if (intent === "delete") {
      await deleteRecording(user.id, rec);
      return redirectWithFlash("/recordings", { kind: "ok", message: `Deleted “${rec.title}” with its marks and readings.` });
    }
  } catch (err) {
    return domainFailure(request, err, String(intent ?? ""), intent === "details" ? formValues(form) : undefined);
  }
  return unknownAction(request, intent);
}

const reducedMotion = () => typeof window !== "undefined" && window.matchMedia("(prefers-reduced-motion: reduce)").matches;

export default function Watch({ loaderData, actionData }: Route.ComponentProps) {
  const { recording: r, procedures, me } = loaderData;
  const perms = loaderData.can;
  const [params] = useSearchParams();
  const startAt = useMemo(() => {
    const t = Number(params.get("t"));
    return Number.isFinite(t) && t > 0 ? t : null;
  }, [params]);
  const [mounted, setMounted] = useState(false);
  useEffect(() => setMounted(true), []);
  const [time, setTime] = useState(startAt ?? 0);
  const [showDetails, setShowDetails] = useState(false);
  const api = useRef<PlayerApi | null>(null);
  const marksPanel = useRef<MarksPanelHandle>(null);
  const marks = useOptimisticMarks(r.id, loaderData.marks as MarkRow[]);
  const readings = useOptimisticReadings(r.id, loaderData.readings as ReadingRow[]);
  const ticks = useMemo(() => marks.map((m) => ({ id: m.id, tStart: m.tStart, tEnd: m.tEnd, text: m.text })), [marks]);
  const fps = r.frameRate && r.frameRate > 0 ? r.frameRate : 30;
  const activeMark = currentMarkId(marks, time);
  const busy = useNavigation().state !== "idle";
  const cues = loaderData.captions.cues as TranscriptCue[];
  // The player loads the captions anew after a correction or a new file (another address).
  const captionsSrc = cues.length
    ? `/api/recordings/${r.id}/captions.vtt?v=${new Date(loaderData.captions.source?.attachedAt ?? 0).getTime()}-${cues.reduce((n, c) => n + c.version, 0)}`
    : null;

  // Processing: poll the page data until the state changes.
  const revalidator = useRevalidator();
  useEffect(() => {
    if (r.state !== "processing") return;
    const t = setInterval(() => {
      if (revalidator.state === "idle") void revalidator.revalidate();
    }, 1500);
    return () => clearInterval(t);
  }, [r.state, revalidator]);

  // A moment chosen before the player has loaded (a busy tablet, a slow network) is kept and
  // played once it is ready, instead of being lost.
  const pendingSeek = useRef<number | null>(null);
  const seek = useCallback((t: number) => {
    if (api.current) api.current.seek(t);
    else pendingSeek.current = t;
    setTime(t);
    document.getElementById("player-region")?.scrollIntoView({ block: "nearest", behavior: reducedMotion() ? "auto" : "smooth" });
  }, []);

  const spanStart = useWatchKeys({ enabled: r.state === "ready", player: api, marksPanel, fps, canMark: perms.mark });

  const errors: Record<string, string> = actionData?.errors ?? {};
  // The same permission table as the server (app/lib/permissions.ts) decides what to offer.
  const canEditMark = (m: MarkRow) => canOnOwned(me, "mark:edit", m.createdBy);
  const canEditReading = (x: ReadingRow) => canOnOwned(me, "reading:edit", x.createdBy);

  const facts = [
    r.durationS != null && formatDuration(r.durationS),
    r.width && r.height && `${r.width}×${r.height}`,
    r.frameRate && `${Number(r.frameRate.toFixed(2))} fps`,
    r.videoCodec && `${r.videoCodec.toUpperCase()}${r.audioCodec ? ` / ${r.audioCodec.toUpperCase()}` : ""}`,
    formatBytes(r.originalSize),
    r.hasRendition && "browser copy made",
  ].filter(Boolean) as string[];

  return (
    <>
      <PageHeader
        title={r.title}
        kicker="Recording"
        actions={
          <>
            {perms.download && r.hasOriginal && (
              <a className="btn no-underline" href={`/api/recordings/${r.id}/original`} download>
                Download original
              </a>
            )}
            {perms.edit && (
              <button type="button" className="btn" onClick={() => setShowDetails((v) => !v)} aria-expanded={showDetails}>
                Edit details
              </button>
            )}
            {perms.fileTestRecord && (
              <Link className="btn no-underline" to={`/test-records/new?recording=${r.id}`}>
                File a test record from this recording
              </Link>
            )}
          </>
        }
      >
        <span className="flex flex-wrap items-center gap-x-3 gap-y-1 text-sm">
          <StateBadge state={r.state} progress={r.progress} />
          <span>
            {r.uploaderName ?? "Former staff"} · {formatDay(r.createdAt)}
          </span>
          <span className="num">{facts.join(" · ")}</span>
          <BuildLink number={r.buildNumber} none="On no build" />
        </span>
      </PageHeader>
      <FormError message={actionData?.intent !== "details" ? errors.form : undefined} />

      {(showDetails || actionData?.intent === "details") && perms.edit && (
        <Form method="post" className="card mb-6 grid gap-4 md:grid-cols-2" noValidate>
          <input type="hidden" name="intent" value="details" />
          <Field
            label="Title"
            name="title"
            defaultValue={actionData?.values?.title ?? r.title}
            error={errors.title}
            required
            maxLength={200}
          />
          <Field
            label="Tags (comma-separated)"
            name="tags"
            defaultValue={actionData?.values?.tags ?? r.tags.join(", ")}
            error={errors.tags}
          />
          {loaderData.builds.length > 0 && (
            <div>
              <label className="label" htmlFor="f-buildNumber">
                Build <span className="font-normal text-graphite-soft">(the engine this recording shows)</span>
              </label>
              <select
                id="f-buildNumber"
                name="buildNumber"
                className="field"
                defaultValue={actionData?.values?.buildNumber ?? r.buildNumber ?? ""}
                aria-invalid={errors.buildNumber ? true : undefined}
                aria-describedby={errors.buildNumber ? "f-buildNumber-error" : undefined}
              >
                <BuildOptions builds={loaderData.builds} keep={r.buildNumber} />
              </select>
              {errors.buildNumber && (
                <p id="f-buildNumber-error" className="field-error" role="alert">
                  {errors.buildNumber}
                </p>
              )}
            </div>
          )}
          <div className="md:col-span-2">
            <label className="label" htmlFor="f-description">
              Description
            </label>
            <textarea
              id="f-description"
              name="description"
              className="field min-h-20"
              defaultValue={actionData?.values?.description ?? r.description}
              maxLength={4000}
            />
          </div>
          <div className="flex flex-wrap gap-2 md:col-span-2">
            <button className="btn btn-primary" type="submit" disabled={busy}>
              Save details
            </button>
            <button
              className="btn btn-danger ml-auto"
              type="submit"
              name="intent"
              value="delete"
              disabled={busy}
              onClick={(e) => {
                if (!confirm("Delete this recording with all its marks and readings? This cannot be undone.")) e.preventDefault();
              }}
            >
              Delete recording
            </button>
          </div>
        </Form>
      )}

      {r.description && <p className="prose-proc mb-5 max-w-3xl whitespace-pre-line">{r.description}</p>}

      {r.state === "ready" ? (
        <>
          <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_22rem]">
            <div id="player-region" className="min-w-0 space-y-2">
              {mounted ? (
                <Suspense fallback={<PlayerPlaceholder recording={r} startAt={startAt} />}>
                  <Player
                    src={`/api/recordings/${r.id}/media`}
                    poster={r.hasPoster ? `/api/recordings/${r.id}/poster` : undefined}
                    title={r.title}
                    startAt={startAt}
                    durationS={r.durationS}
                    fps={fps}
                    marks={ticks}
                    activeMarkId={activeMark}
                    onReady={(p) => {
                      api.current = p;
                      if (pendingSeek.current != null) p.seek(pendingSeek.current);
                      pendingSeek.current = null;
                    }}
                    onTime={setTime}
                    captionsSrc={captionsSrc}
                  />
                </Suspense>
              ) : (
                <PlayerPlaceholder recording={r} startAt={startAt} />
              )}
              <WatchKeyHelp canMark={perms.mark} />
            </div>
            <div className="min-w-0 space-y-5">
              <Transcript
                recordingId={r.id}
                cues={cues}
                source={loaderData.captions.source as TranscriptSource}
                currentTime={time}
                onSeek={seek}
                canEdit={perms.captions}
                canMark={perms.mark}
                durationS={r.durationS}
              />
              <MarksPanel
                ref={marksPanel}
                recordingId={r.id}
                marks={marks}
                procedures={procedures}
                builds={loaderData.builds}
                recordingBuild={r.buildNumber}
                currentTime={time}
                canCreate={perms.mark}
                canEdit={canEditMark}
                onSeek={seek}
                spanStart={spanStart}
                durationS={r.durationS}
              />
            </div>
          </div>
          <div className="mt-6 space-y-5">
            <ReadingsPanel
              recordingId={r.id}
              readings={readings}
              currentTime={() => api.current?.currentTime() ?? time}
              canCreate={perms.read}
              canEdit={canEditReading}
            />
            <ReadingsChart readings={readings} onSeek={seek} durationS={r.durationS} />
          </div>
        </>
      ) : (
        <RecordingStatePanel recording={r} canRetry={perms.retry} busy={busy} />
      )}
    </>
  );
}
