import { Form, Link } from "react-router";
import { FormError } from "~/components/forms";
import type { BuildPage } from "~/lib/builds/page.server";
import { formatDay } from "~/lib/dates";
import { formatTime } from "~/lib/time-format";

type Unattached = { id: string; title: string; createdAt: Date | string };

/** A small Detach button: a form of its own, posting the intent and the id. */
function Detach({ intent, name, id, label, busy }: { intent: string; name: string; id: string; label: string; busy: boolean }) {
  return (
    <Form method="post" className="inline">
      <input type="hidden" name="intent" value={intent} />
      <input type="hidden" name={name} value={id} />
      <button type="submit" className="btn px-2 py-0.5 text-xs" disabled={busy} aria-label={label}>
        Detach
      </button>
    </Form>
  );
}

/**
 * The build page's recordings and marks: each recording with the marks of it on this build, then
 * marks on this build whose recording is not; for builds:write, Detach beside each and "Attach a
 * recording" among recent ones on no build.
 */
export function BuildMedia({
  recordings,
  marks,
  canWrite,
  canUpload,
  buildNumber,
  unattached,
  busy,
  errors,
  refused,
}: {
  recordings: BuildPage["recordings"];
  marks: BuildPage["marks"];
  canWrite: boolean;
  canUpload: boolean;
  buildNumber: string;
  unattached: Unattached[];
  busy: boolean;
  errors: Record<string, string>;
  refused?: string;
}) {
  const marksOf = (id: string) => marks.filter((m) => m.recordingId === id);
  const loose = marks.filter((m) => !recordings.some((r) => r.id === m.recordingId));
  const markLine = (m: BuildPage["marks"][number], withTitle: boolean) => (
    <li key={m.id} className="flex flex-wrap items-baseline gap-x-2" data-testid="build-mark">
      <span className="min-w-0 flex-1">
        <Link to={`/recordings/${m.recordingId}?t=${m.tStart}`} className="num">
          {withTitle ? (
            <>
              {m.recordingTitle} at <span className="num">{formatTime(m.tStart)}</span>
            </>
          ) : (
            formatTime(m.tStart)
          )}
        </Link>{" "}
        {withTitle ? ": " : ""}
        {m.text}
      </span>
      {canWrite && <Detach intent="detach-mark" name="markId" id={m.id} label={`Detach the mark “${m.text}”`} busy={busy} />}
    </li>
  );
  return (
    <section className="card" id="media" aria-labelledby="media-h">
      <h2 id="media-h" className="text-lg">
        Recordings and marks
      </h2>
      <FormError message={refused} />
      {recordings.length || marks.length ? (
        <ul className="mt-2 space-y-2 text-sm" data-testid="build-recordings">
          {recordings.map((r) => (
            <li key={r.id} data-testid="build-recording">
              <div className="flex flex-wrap items-baseline gap-x-2">
                <span className="min-w-0 flex-1">
                  <Link to={`/recordings/${r.id}`}>{r.title}</Link>
                  {r.durationS != null && <span className="num text-graphite-soft"> · {formatTime(r.durationS)}</span>}
                </span>
                {canWrite && (
                  <Detach intent="detach-recording" name="recordingId" id={r.id} label={`Detach the recording “${r.title}”`} busy={busy} />
                )}
              </div>
              {marksOf(r.id).length > 0 && (
                <ul className="mt-1 space-y-0.5 border-l border-rule pl-3">{marksOf(r.id).map((m) => markLine(m, false))}</ul>
              )}
            </li>
          ))}
          {loose.map((m) => markLine(m, true))}
        </ul>
      ) : (
        <p className="mt-1 text-sm text-graphite-soft">No recording or mark is attached to this build.</p>
      )}
      {canWrite && (
        <Form method="post" className="mt-4 flex flex-wrap items-end gap-2 border-t border-rule/60 pt-3">
          <input type="hidden" name="intent" value="attach-recording" />
          <div className="min-w-0 flex-1 basis-64">
            <label htmlFor="f-attach" className="label">
              Attach a recording <span className="font-normal text-graphite-soft">(recent ones on no build)</span>
            </label>
            <select
              id="f-attach"
              name="recordingId"
              className="field"
              defaultValue=""
              aria-invalid={errors.recordingId ? true : undefined}
              aria-describedby={errors.recordingId || errors.form ? "f-attach-error" : undefined}
            >
              <option value="">{unattached.length ? "Choose a recording…" : "Every recent recording is on a build"}</option>
              {unattached.map((u) => (
                <option key={u.id} value={u.id}>
                  {u.title} · {formatDay(u.createdAt)}
                </option>
              ))}
            </select>
            {(errors.recordingId || errors.form) && (
              <p id="f-attach-error" className="field-error" role="alert">
                {errors.recordingId ?? errors.form}
              </p>
            )}
          </div>
          <button type="submit" className="btn" disabled={busy || !unattached.length}>
            Attach
          </button>
        </Form>
      )}
      {canUpload && (
        <p className="mt-3 text-sm">
          <Link to={`/recordings/upload?build=${buildNumber}`}>Upload videos for this build</Link>
        </p>
      )}
    </section>
  );
}
