import { useEffect, useRef, useState } from "react";
import { useFetcher } from "react-router";
import { formatDay } from "~/lib/dates";
import { formatTime } from "~/lib/time-format";

/** Shapes the watch page gets from its loader (dates arrive as strings after serialisation). */
export type TranscriptEdit = { version: number; textBefore: string; textAfter: string; editorName: string | null; editedAt: string | Date };
export type TranscriptCue = {
  id: string;
  position: number;
  start: number;
  end: number;
  text: string;
  version: number;
  edits: TranscriptEdit[];
};
export type TranscriptSource = { kind: string; name: string; format: string; attachedAt: string | Date; by: string | null } | null;

type Props = {
  recordingId: string;
  cues: TranscriptCue[];
  source: TranscriptSource;
  currentTime: number;
  onSeek: (t: number) => void;
  canEdit: boolean;
  canMark: boolean;
  durationS: number | null;
};

type ApiAnswer = { reason?: string; issues?: { path: string; message: string }[] };

/** The line being said at `t`: the latest one started and not yet over, else none. */
export function currentCueId(cues: TranscriptCue[], t: number): string | null {
  let found: string | null = null;
  for (const c of cues) {
    if (c.start > t + 0.05) break;
    if (t < c.end) found = c.id;
  }
  return found;
}

const reducedMotion = () => window.matchMedia("(prefers-reduced-motion: reduce)").matches;

/**
 * What is said in the recording, beside the player: the line being said is highlighted and kept
 * in view while it plays; a line plays from its second when clicked, becomes a mark with one
 * action, and can be corrected in place (each correction kept with who and when).
 */
export function Transcript({ recordingId, cues, source, currentTime, onSeek, canEdit, canMark, durationS }: Props) {
  const current = currentCueId(cues, currentTime);
  const listRef = useRef<HTMLOListElement>(null);
  const [editing, setEditing] = useState<string | null>(null);

  // The list scrolls itself (never the page) to keep the line being said in view.
  useEffect(() => {
    const list = listRef.current;
    const el = current ? list?.querySelector<HTMLElement>(`[data-cue-id="${current}"]`) : null;
    if (!list || !el || editing) return;
    const top = el.offsetTop - list.offsetTop;
    if (top < list.scrollTop || top + el.offsetHeight > list.scrollTop + list.clientHeight) {
      list.scrollTo({ top: Math.max(0, top - list.clientHeight / 3), behavior: reducedMotion() ? "auto" : "smooth" });
    }
  }, [current, editing]);

  if (!cues.length && !canEdit) return null;

  return (
    <section className="card flex max-h-[30rem] flex-col p-0" aria-labelledby="transcript-h" data-testid="transcript">
      <div className="flex flex-wrap items-center justify-between gap-2 border-b border-rule px-4 py-3">
        <h2 id="transcript-h" className="text-lg">
          Transcript {cues.length > 0 && <span className="num text-sm font-normal text-graphite-soft">({cues.length} lines)</span>}
        </h2>
        {cues.length > 0 && (
          <span className="flex gap-3 text-sm">
            <a href={`/api/recordings/${recordingId}/captions.vtt?download=1`} download>
              WebVTT
            </a>
            <a href={`/api/recordings/${recordingId}/captions.srt?download=1`} download>
              SRT
            </a>
          </span>
        )}
      </div>
      {source && (
        <p className="border-b border-rule/70 px-4 py-1.5 text-xs text-graphite-soft">
          {source.kind === "embedded" ? "From the video's own subtitle track" : `From ${source.name}`}
          {source.by ? `, attached by ${source.by}` : ""} · {formatDay(source.attachedAt)}
        </p>
      )}
      {cues.length === 0 ? (
        <p className="px-4 py-4 text-sm text-graphite-soft">
          No captions yet. Attach a WebVTT or SRT file, as a phone, an editing program or a transcription service writes it.
        </p>
      ) : (
        <ol ref={listRef} className="min-h-0 flex-1 overflow-y-auto" data-testid="transcript-lines">
          {cues.map((c) => (
            <TranscriptLine
              key={c.id}
              recordingId={recordingId}
              cue={c}
              current={c.id === current}
              editing={editing === c.id}
              onEdit={(on) => setEditing(on ? c.id : null)}
              onSeek={onSeek}
              canEdit={canEdit}
              canMark={canMark}
              durationS={durationS}
            />
          ))}
        </ol>
      )}
      {canEdit && <AttachCaptions recordingId={recordingId} replacing={cues.length > 0} />}
    </section>
  );
}

function TranscriptLine({
  recordingId,
  cue,
  current,
  editing,
  onEdit,
  onSeek,
  canEdit,
  canMark,
  durationS,
}: {
  recordingId: string;
  cue: TranscriptCue;
  current: boolean;
  editing: boolean;
  onEdit: (on: boolean) => void;
  onSeek: (t: number) => void;
  canEdit: boolean;
  canMark: boolean;
  durationS: number | null;
}) {
  // A new mark goes through the marks API under the marks panel's key, so it shows there at once.
  const mark = useFetcher<ApiAnswer>({ key: `mark-from-cue-${cue.id}` });
  const marked = mark.state === "idle" && mark.data && !mark.data.issues && !mark.data.reason;
  const last = cue.edits[cue.edits.length - 1];
  return (
    <li
      data-cue-id={cue.id}
      aria-current={current ? "true" : undefined}
      className={`border-b border-rule/70 ${current ? "border-l-4 border-l-brass bg-brass-soft/70" : "border-l-4 border-l-transparent"}`}
    >
      {editing ? (
        <CorrectLine recordingId={recordingId} cue={cue} onDone={() => onEdit(false)} />
      ) : (
        // The actions sit beside the words where there is room (the tablet's full width) and
        // below them in the narrow column beside the player, so the words keep their width.
        <div className="flex flex-wrap items-start gap-x-1 pr-2">
          <button
            type="button"
            className="flex min-h-11 min-w-[15rem] flex-1 items-baseline gap-3 px-3 py-2 text-left hover:bg-paper lg:min-h-0"
            onClick={() => onSeek(cue.start)}
            aria-label={`Play the line at ${formatTime(cue.start)}: ${cue.text}`}
            data-testid="transcript-line"
          >
            <span className="num shrink-0 font-mono text-xs text-teal">{formatTime(cue.start)}</span>
            <span className="whitespace-pre-line font-serif text-[0.95rem] leading-snug">{cue.text}</span>
          </button>
          {(canMark || canEdit) && (
            <span className="ml-auto flex gap-1 pb-1.5 pl-3 pt-1">
              {canMark && (
                <button
                  type="button"
                  className="btn px-2 py-1 text-xs"
                  disabled={mark.state !== "idle" || Boolean(marked)}
                  onClick={() =>
                    mark.submit(
                      {
                        tStart: cue.start,
                        tEnd: durationS != null ? Math.min(cue.end, durationS) : cue.end,
                        text: cue.text.replace(/\n/g, " ").slice(0, 500),
                        tags: [],
                        procedureId: null,
                      },
                      { method: "POST", action: `/api/recordings/${recordingId}/marks`, encType: "application/json" },
                    )
                  }
                  aria-label={`Make a mark from the line at ${formatTime(cue.start)}`}
                >
                  {marked ? "Marked" : "Mark"}
                </button>
              )}
              {canEdit && (
                <button
                  type="button"
                  className="btn px-2 py-1 text-xs"
                  onClick={() => onEdit(true)}
                  aria-label={`Correct the line at ${formatTime(cue.start)}`}
                >
                  Correct
                </button>
              )}
            </span>
          )}
        </div>
      )}
      {last && !editing && (
        <details className="px-3 pb-2 pl-[4.6rem] text-xs text-graphite-soft">
          <summary className="cursor-pointer">
            Corrected by {last.editorName ?? "former staff"}, {formatDay(last.editedAt)}
          </summary>
          <ol className="mt-1 space-y-1">
            {cue.edits.map((e) => (
              <li key={e.version}>
                “{e.textBefore}” → “{e.textAfter}” — {e.editorName ?? "former staff"}, {formatDay(e.editedAt)}
              </li>
            ))}
          </ol>
        </details>
      )}
      {mark.data?.reason && <p className="px-3 pb-2 text-xs text-spec-red">{mark.data.reason}</p>}
    </li>
  );
}

function CorrectLine({ recordingId, cue, onDone }: { recordingId: string; cue: TranscriptCue; onDone: () => void }) {
  const fetcher = useFetcher<ApiAnswer & { cue?: unknown }>({ key: `cue-${cue.id}` });
  const [text, setText] = useState(cue.text);
  const ref = useRef<HTMLTextAreaElement>(null);
  useEffect(() => ref.current?.focus(), []);
  const sent = useRef(false);
  useEffect(() => {
    if (sent.current && fetcher.state === "idle" && fetcher.data?.cue) onDone();
  }, [fetcher.state, fetcher.data, onDone]);
  const error = fetcher.data?.issues?.[0]?.message ?? fetcher.data?.reason;
  return (
    <form
      className="space-y-2 bg-paper/60 px-3 py-2"
      aria-label={`Correct the line at ${formatTime(cue.start)}`}
      noValidate
      onKeyDown={(e) => {
        if (e.key === "Escape") onDone();
      }}
      onSubmit={(e) => {
        e.preventDefault();
        sent.current = true;
        fetcher.submit(
          { text, version: cue.version },
          { method: "PATCH", action: `/api/recordings/${recordingId}/captions/${cue.id}`, encType: "application/json" },
        );
      }}
    >
      <label className="label text-xs" htmlFor={`cue-${cue.id}`}>
        Words at <span className="num">{formatTime(cue.start)}</span>
      </label>
      <textarea
        id={`cue-${cue.id}`}
        ref={ref}
        className="field min-h-16 font-serif text-sm"
        value={text}
        maxLength={500}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `cue-${cue.id}-error` : undefined}
        onChange={(e) => setText(e.currentTarget.value)}
      />
      {error && (
        <p id={`cue-${cue.id}-error`} className="field-error">
          {error}
        </p>
      )}
      <div className="flex gap-2">
        <button type="submit" className="btn btn-primary py-1 text-xs" disabled={fetcher.state !== "idle"}>
          Save correction
        </button>
        <button type="button" className="btn py-1 text-xs" onClick={onDone}>
          Cancel
        </button>
      </div>
    </form>
  );
}

function AttachCaptions({ recordingId, replacing }: { recordingId: string; replacing: boolean }) {
  const fetcher = useFetcher<ApiAnswer & { cues?: number }>({ key: `captions-attach-${recordingId}` });
  const problems = fetcher.data?.issues?.map((i) => i.message) ?? (fetcher.data?.reason ? [fetcher.data.reason] : []);
  const done = fetcher.state === "idle" && typeof fetcher.data?.cues === "number";
  return (
    <details className="border-t border-rule px-4 py-2 text-sm" open={!replacing || problems.length > 0 || undefined}>
      <summary className="min-h-11 cursor-pointer py-2 font-semibold lg:min-h-0 lg:py-1">
        {replacing ? "Replace the captions" : "Attach captions"}
      </summary>
      <fetcher.Form
        method="post"
        action={`/api/recordings/${recordingId}/captions`}
        encType="multipart/form-data"
        className="space-y-2 pb-2"
      >
        <label className="label text-xs" htmlFor="captions-file">
          WebVTT (.vtt) or SRT (.srt) file
        </label>
        <input
          id="captions-file"
          name="file"
          type="file"
          accept=".vtt,.srt,text/vtt,application/x-subrip"
          className="block w-full text-sm"
          aria-describedby={problems.length ? "captions-problems" : undefined}
          required
        />
        {replacing && <p className="text-xs text-graphite-soft">The file replaces these lines and their corrections.</p>}
        <button type="submit" className="btn py-1 text-xs" disabled={fetcher.state !== "idle"}>
          {replacing ? "Replace captions" : "Attach captions"}
        </button>
        {problems.length > 0 && (
          <ul id="captions-problems" className="list-disc space-y-0.5 pl-5 text-xs text-spec-red" role="alert">
            {problems.map((p) => (
              <li key={p}>{p}</li>
            ))}
          </ul>
        )}
        {done && (
          <p className="text-xs text-ok" role="status">
            {fetcher.data?.cues} lines attached.
          </p>
        )}
      </fetcher.Form>
    </details>
  );
}
