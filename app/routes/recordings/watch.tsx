import { eq } from "drizzle-orm";
import { lazy, Suspense, useCallback, useEffect, useMemo, useRef, useState } from "react";
import { data, Form, Link, useNavigation, useRevalidator, useSearchParams } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/watch";
import { notFound, parseParams, readForm } from "~/lib/edge.server";
import { idParams } from "~/lib/edge";
import { Field, FormError } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { currentMarkId, MarksPanel, useOptimisticMarks, type MarksPanelHandle } from "~/components/recordings/MarksPanel";
import type { PlayerApi } from "~/components/recordings/Player.client";
import { Poster } from "~/components/recordings/Poster";
import { ReadingsChart } from "~/components/recordings/ReadingsChart";
import { ReadingsPanel, useOptimisticReadings } from "~/components/recordings/ReadingsPanel";
import { StateBadge } from "~/components/recordings/StateBadge";
import type { MarkRow, ReadingRow } from "~/components/recordings/types";
import { recordings } from "~/db/schema";
import { audit } from "~/lib/audit.server";
import { forbidden, requirePermission } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { can, canOnOwned } from "~/lib/permissions";
import { getRecording, listReadings } from "~/lib/recordings/library.server";
import { marksFor, procedureChoicesFor } from "~/lib/recordings/notes.server";
import { retryRecording } from "~/lib/recordings/processing.server";
import { formatBytes } from "~/lib/byte-format";
import { formatDuration, formatTime } from "~/lib/time-format";
import { recordingDir } from "~/lib/recordings/storage.server";
import { formatDay } from "~/lib/dates";
import { normalizeTags, splitTags } from "~/lib/tags";

const Player = lazy(() => import("~/components/recordings/Player.client"));

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.recording.title ?? "Recording"} · Recordings · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const recording = await getRecording(parseParams(request, idParams, params, "recording").id);
  if (!recording) notFound(request, "recording");
  const [marks, readings, procedures] = await Promise.all([marksFor(user, recording.id), listReadings(recording.id), procedureChoicesFor(user)]);
  return {
    recording,
    marks,
    readings,
    procedures,
    me: { id: user.id, role: user.role },
    can: {
      edit: canOnOwned(user, "recording:edit", recording.uploadedBy),
      download: can(user.role, "recording:download"),
      retry: can(user.role, "recording:retry"),
      fileTestRecord: can(user.role, "testrecord:create"),
      mark: can(user.role, "mark:create"),
      read: can(user.role, "reading:create"),
    },
  };
}

const detailsSchema = z.object({
  intent: z.literal("details"),
  title: z.string().trim().min(1, "Give the recording a title.").max(200, "Keep the title under 200 characters."),
  description: z.string().trim().max(4000, "Keep the description under 4000 characters.").default(""),
  tags: z.string().max(600).default(""),
});

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "recording:edit:own");
  const rec = await getRecording(parseParams(request, idParams, params, "recording").id);
  if (!rec) notFound(request, "recording");
  const form = await readForm(request);
  const intent = form.get("intent");
  if (intent === "retry") {
    if (!can(user.role, "recording:retry")) forbidden(request, "Only editors and admins can retry processing.");
    if (rec.state === "rejected" || !rec.hasOriginal) return data({ intent, errors: { form: "A rejected recording has no file left to process; upload it again." } as Record<string, string>, values: {} as Record<string, string> }, { status: 409 });
    await retryRecording(rec.id);
    await db().transaction((tx) => audit(tx, user.id, "recording.retry", "recording", rec.id, {}));
    return redirectWithFlash(`/recordings/${rec.id}`, { kind: "ok", message: "Processing started again." });
  }
  if (!canOnOwned(user, "recording:edit", rec.uploadedBy)) forbidden(request, "You can change only recordings you uploaded.");
  if (intent === "details") {
    const parsed = parseForm(detailsSchema, form);
    if (!parsed.ok) return data({ intent, errors: parsed.errors, values: parsed.values }, { status: 400 });
    const tags = normalizeTags(splitTags(parsed.data.tags));
    await db().transaction(async (tx) => {
      await tx.update(recordings).set({ title: parsed.data.title, description: parsed.data.description, tags, updatedAt: new Date() }).where(eq(recordings.id, rec.id));
      await audit(tx, user.id, "recording.edit", "recording", rec.id, { title: parsed.data.title });
    });
    return redirectWithFlash(`/recordings/${rec.id}`, { kind: "ok", message: "Details saved." });
  }
  if (intent === "delete") {
    await db().transaction(async (tx) => {
      await tx.delete(recordings).where(eq(recordings.id, rec.id));
      await audit(tx, user.id, "recording.delete", "recording", rec.id, { title: rec.title });
    });
    const { rm } = await import("node:fs/promises");
    await rm(recordingDir(rec.id), { recursive: true, force: true });
    return redirectWithFlash("/recordings", { kind: "ok", message: `Deleted “${rec.title}” with its marks and readings.` });
  }
  return data({ intent: "unknown", errors: { form: "Unknown action." } as Record<string, string>, values: {} as Record<string, string> }, { status: 400 });
}

const fmtDate = formatDay;

function isTyping(el: EventTarget | null) {
  const e = el as HTMLElement | null;
  if (!e) return false;
  // The player's position and volume bars are inputs too, but nobody types in them: the page's
  // keys (arrows ±5 s, frames) work there as everywhere else.
  if (e.tagName === "INPUT" && (e as HTMLInputElement).type === "range") return false;
  return e.isContentEditable || ["INPUT", "TEXTAREA", "SELECT"].includes(e.tagName);
}

/** Space on a focused button, link or disclosure presses it, as everywhere else; it does not play. */
function pressesSomething(el: EventTarget | null) {
  const e = el as HTMLElement | null;
  return Boolean(e?.closest?.("button, a[href], summary, [role=button]"));
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
  const [spanStart, setSpanStart] = useState<number | null>(null);
  const [showDetails, setShowDetails] = useState(false);
  const api = useRef<PlayerApi | null>(null);
  const marksPanel = useRef<MarksPanelHandle>(null);
  const marks = useOptimisticMarks(r.id, loaderData.marks as MarkRow[]);
  const readings = useOptimisticReadings(r.id, loaderData.readings as ReadingRow[]);
  const ticks = useMemo(() => marks.map((m) => ({ id: m.id, tStart: m.tStart, tEnd: m.tEnd, text: m.text })), [marks]);
  const fps = r.frameRate && r.frameRate > 0 ? r.frameRate : 30;
  const activeMark = currentMarkId(marks, time);
  const busy = useNavigation().state !== "idle";

  // Processing: poll the page data until the state changes.
  const revalidator = useRevalidator();
  useEffect(() => {
    if (r.state !== "processing") return;
    const t = setInterval(() => {
      if (revalidator.state === "idle") void revalidator.revalidate();
    }, 1500);
    return () => clearInterval(t);
  }, [r.state, revalidator]);

  const seek = useCallback((t: number) => {
    api.current?.seek(t);
    setTime(t);
    document.getElementById("player-region")?.scrollIntoView({ block: "nearest", behavior: reducedMotion() ? "auto" : "smooth" });
  }, []);

  useEffect(() => {
    if (r.state !== "ready") return;
    const onKey = (e: KeyboardEvent) => {
      if (isTyping(e.target) || e.ctrlKey || e.metaKey || e.altKey) return;
      const p = api.current;
      if (!p) return;
      let handled = true;
      switch (e.key) {
        case " ":
          if (pressesSomething(e.target)) return;
          p.togglePlay();
          break;
        case "ArrowLeft":
          p.seek(p.currentTime() - 5);
          break;
        case "ArrowRight":
          p.seek(Math.min(p.duration() || Infinity, p.currentTime() + 5));
          break;
        case ",":
          p.step(-1, fps);
          break;
        case ".":
          p.step(1, fps);
          break;
        case "m":
        case "M":
          if (!perms.mark) return;
          marksPanel.current?.openNew(Number(p.currentTime().toFixed(2)));
          break;
        case "s":
        case "S":
          if (!perms.mark) return;
          if (spanStart == null) setSpanStart(Number(p.currentTime().toFixed(2)));
          else {
            const end = Number(p.currentTime().toFixed(2));
            const [a, b] = end > spanStart ? [spanStart, end] : [end, spanStart];
            setSpanStart(null);
            if (b - a < 0.05) return;
            marksPanel.current?.openNew(a, b);
          }
          break;
        default:
          handled = false;
      }
      if (handled) {
        e.preventDefault();
        e.stopPropagation();
      }
    };
    window.addEventListener("keydown", onKey, true);
    return () => window.removeEventListener("keydown", onKey, true);
  }, [r.state, fps, perms.mark, spanStart]);

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
            {perms.download && r.hasOriginal && <a className="btn no-underline" href={`/api/recordings/${r.id}/original`} download>Download original</a>}
            {perms.edit && <button type="button" className="btn" onClick={() => setShowDetails((v) => !v)} aria-expanded={showDetails}>Edit details</button>}
            {perms.fileTestRecord && <Link className="btn no-underline" to={`/test-records/new?recording=${r.id}`}>File a test record from this recording</Link>}
          </>
        }
      >
        <span className="flex flex-wrap items-center gap-x-3 gap-y-1 text-sm">
          <StateBadge state={r.state} progress={r.progress} />
          <span>{r.uploaderName ?? "Former staff"} · {fmtDate(r.createdAt)}</span>
          <span className="num">{facts.join(" · ")}</span>
        </span>
      </PageHeader>
      <FormError message={actionData?.intent !== "details" ? errors.form : undefined} />

      {(showDetails || actionData?.intent === "details") && perms.edit && (
        <Form method="post" className="card mb-6 grid gap-4 md:grid-cols-2" noValidate>
          <input type="hidden" name="intent" value="details" />
          <Field label="Title" name="title" defaultValue={actionData?.values?.title ?? r.title} error={errors.title} required maxLength={200} />
          <Field label="Tags (comma-separated)" name="tags" defaultValue={actionData?.values?.tags ?? r.tags.join(", ")} error={errors.tags} />
          <div className="md:col-span-2">
            <label className="label" htmlFor="f-description">Description</label>
            <textarea id="f-description" name="description" className="field min-h-20" defaultValue={actionData?.values?.description ?? r.description} maxLength={4000} />
          </div>
          <div className="flex flex-wrap gap-2 md:col-span-2">
            <button className="btn btn-primary" type="submit" disabled={busy}>Save details</button>
            <button className="btn btn-danger ml-auto" type="submit" name="intent" value="delete" disabled={busy} onClick={(e) => { if (!confirm("Delete this recording with all its marks and readings? This cannot be undone.")) e.preventDefault(); }}>Delete recording</button>
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
                    onReady={(p) => { api.current = p; }}
                    onTime={setTime}
                  />
                </Suspense>
              ) : (
                <PlayerPlaceholder recording={r} startAt={startAt} />
              )}
              <KeyHelp canMark={perms.mark} />
            </div>
            <MarksPanel
              ref={marksPanel}
              recordingId={r.id}
              marks={marks}
              procedures={procedures}
              currentTime={time}
              canCreate={perms.mark}
              canEdit={canEditMark}
              onSeek={seek}
              spanStart={spanStart}
              durationS={r.durationS}
            />
          </div>
          <div className="mt-6 space-y-5">
            <ReadingsPanel recordingId={r.id} readings={readings} currentTime={() => api.current?.currentTime() ?? time} canCreate={perms.read} canEdit={canEditReading} />
            <ReadingsChart readings={readings} onSeek={seek} durationS={r.durationS} />
          </div>
        </>
      ) : (
        <StatePanel recording={r} canRetry={perms.retry} busy={busy} />
      )}
    </>
  );
}

/**
 * What shows before the player has loaded, in the player's shape so nothing jumps: the poster, or,
 * when the page opens at a moment (?t=), no poster at all (the marked frame comes first).
 */
function PlayerPlaceholder({ recording: r, startAt }: { recording: Route.ComponentProps["loaderData"]["recording"]; startAt: number | null }) {
  return (
    <div className="overflow-hidden rounded-[0.6rem] border border-rule bg-card" data-testid="player-placeholder">
      {startAt != null ? (
        <div className="flex aspect-video w-full items-center justify-center bg-graphite text-paper" role="status">
          Opening at <span className="num mx-1 font-mono">{formatTime(startAt)}</span>…
        </div>
      ) : (
        <Poster id={r.id} hasPoster={r.hasPoster} title={r.title} className="rounded-none" />
      )}
      <div className="h-[6.4rem] border-t border-rule min-[1025px]:h-[5.35rem]" />
    </div>
  );
}

/** Keys of the watch page; shown only where a keyboard is likely (a fine pointer that hovers). */
function KeyHelp({ canMark }: { canMark: boolean }) {
  const k = "rounded border border-rule bg-card px-1 font-mono text-[11px] text-graphite";
  return (
    <p className="keyboard-only flex flex-wrap gap-x-3 gap-y-1 text-xs text-graphite-soft" aria-label="Keyboard" data-testid="key-help">
      <span><kbd className={k}>Space</kbd> play / pause</span>
      <span><kbd className={k}>←</kbd> <kbd className={k}>→</kbd> 5 s</span>
      <span><kbd className={k}>,</kbd> <kbd className={k}>.</kbd> one frame</span>
      {canMark && <span><kbd className={k}>M</kbd> mark here</span>}
      {canMark && <span><kbd className={k}>S</kbd> … <kbd className={k}>S</kbd> mark a span</span>}
    </p>
  );
}

function StatePanel({ recording: r, canRetry, busy }: { recording: Route.ComponentProps["loaderData"]["recording"]; canRetry: boolean; busy: boolean }) {
  return (
    <div className="grid gap-5 md:grid-cols-[20rem_1fr]">
      <Poster id={r.id} hasPoster={r.hasPoster} title={r.title} />
      <div className="card space-y-3">
        {r.state === "processing" && (
          <>
            <h2 className="text-lg">Processing</h2>
            <p className="text-sm text-graphite-soft">The server is checking the file, taking a poster frame and, if needed, making a copy every browser plays. This page updates by itself.</p>
            <div role="progressbar" aria-label="Processing" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(r.progress * 100)} className="h-2.5 overflow-hidden rounded-full bg-paper-deep">
              <div className="h-full rounded-full bg-brass transition-all" style={{ width: `${Math.max(3, r.progress * 100)}%` }} />
            </div>
            {r.stateReason && <p className="text-sm text-graphite-soft">{r.stateReason}</p>}
          </>
        )}
        {r.state === "rejected" && (
          <>
            <h2 className="text-lg text-spec-red">Not a video</h2>
            <p className="text-sm" data-testid="state-reason">{r.stateReason}</p>
            <p className="text-sm text-graphite-soft">The file's bytes were removed. Check that you picked the right file, then <Link to="/recordings/upload">upload again</Link>.</p>
          </>
        )}
        {r.state === "damaged" && (
          <>
            <h2 className="text-lg text-spec-red">The video is damaged</h2>
            <p className="text-sm" data-testid="state-reason">{r.stateReason}</p>
          </>
        )}
        {r.state === "failed" && (
          <>
            <h2 className="text-lg text-spec-red">Processing failed</h2>
            <p className="text-sm" data-testid="state-reason">{r.stateReason}</p>
            {!canRetry && <p className="text-sm text-graphite-soft">An editor can retry it; the original file is kept.</p>}
          </>
        )}
        {canRetry && (r.state === "failed" || r.state === "processing") && r.hasOriginal && (
          <Form method="post">
            <input type="hidden" name="intent" value="retry" />
            <button type="submit" className="btn" disabled={busy}>{r.state === "failed" ? "Retry processing" : "Start processing again"}</button>
          </Form>
        )}
        <p className="num text-xs text-graphite-soft">{r.originalName} · {formatBytes(r.originalSize)}</p>
      </div>
    </div>
  );
}
