import { forwardRef, useEffect, useImperativeHandle, useMemo, useRef, useState } from "react";
import { useFetcher, useFetchers } from "react-router";
import { splitTags } from "~/lib/tags";
import { formatTime } from "~/lib/time-format";
import { issuesByPath, type MarkRow, type ProcedureChoice } from "./types";
import { BuildOptions, type BuildPick } from "~/components/builds/BuildPicker";

export type MarksPanelHandle = { openNew: (tStart: number, tEnd?: number | null) => void };

type Props = {
  recordingId: string;
  marks: MarkRow[];
  procedures: ProcedureChoice[];
  /** The builds a mark may be put on (empty: no choice offered, the server's default stands). */
  builds?: BuildPick[];
  /** The recording's build, which a new mark takes unless another or none is chosen. */
  recordingBuild?: string | null;
  currentTime: number;
  canCreate: boolean;
  canEdit: (m: MarkRow) => boolean;
  onSeek: (t: number) => void;
  spanStart: number | null;
  durationS: number | null;
};

/** Marks of a recording, with optimistic adds, edits and deletes through the marks API. */
export function useOptimisticMarks(recordingId: string, marks: MarkRow[]): MarkRow[] {
  const fetchers = useFetchers();
  return useMemo(() => {
    const base = `/api/recordings/${recordingId}/marks`;
    let list = [...marks];
    for (const f of fetchers) {
      if (!f.formAction?.startsWith(base)) continue;
      const json = f.json as (Partial<MarkRow> & { tags?: string[] }) | undefined;
      if (f.formMethod === "POST" && f.formAction === base && json) {
        list.push({
          id: `pending-${f.key}`,
          tStart: Number(json.tStart),
          tEnd: json.tEnd ?? null,
          text: String(json.text ?? ""),
          tags: json.tags ?? [],
          procedureId: json.procedureId ?? null,
          procedureTitle: null,
          procedureSlug: null,
          createdBy: null,
          authorName: "you",
          pending: true,
        });
      } else if (f.formMethod === "DELETE") {
        list = list.filter((m) => `${base}/${m.id}` !== f.formAction);
      } else if (f.formMethod === "PATCH" && json) {
        list = list.map((m) => (`${base}/${m.id}` === f.formAction ? { ...m, ...json, pending: true } : m));
      }
    }
    return list.sort((a, b) => a.tStart - b.tStart);
  }, [fetchers, marks, recordingId]);
}

/** The mark the playhead is in: a span containing it, else the latest point mark within 4 s before it. */
export function currentMarkId(marks: MarkRow[], t: number): string | null {
  let best: MarkRow | null = null;
  for (const m of marks) {
    if (m.tEnd != null ? t >= m.tStart && t <= m.tEnd : t >= m.tStart - 0.05 && t - m.tStart < 4) {
      if (!best || m.tStart >= best.tStart) best = m;
    }
  }
  return best?.id ?? null;
}

export const MarksPanel = forwardRef<MarksPanelHandle, Props>(function MarksPanel(props, ref) {
  const { recordingId, marks, procedures, currentTime, canCreate, canEdit, onSeek, spanStart, durationS } = props;
  const builds = props.builds ?? [];
  const [draft, setDraft] = useState<{ tStart: number; tEnd: number | null } | null>(null);
  const [editing, setEditing] = useState<string | null>(null);
  const textRef = useRef<HTMLInputElement>(null);
  const listRef = useRef<HTMLOListElement>(null);
  const current = currentMarkId(marks, currentTime);

  useImperativeHandle(ref, () => ({
    openNew: (tStart, tEnd = null) => {
      setDraft({ tStart, tEnd });
      setTimeout(() => textRef.current?.focus(), 0);
    },
  }));

  useEffect(() => {
    if (!current || !listRef.current) return;
    const el = listRef.current.querySelector<HTMLElement>(`[data-mark-id="${current}"]`);
    // Motion follows the person's setting (prefers-reduced-motion).
    el?.scrollIntoView({ block: "nearest", behavior: window.matchMedia("(prefers-reduced-motion: reduce)").matches ? "auto" : "smooth" });
  }, [current]);

  return (
    <section className="card flex max-h-[34rem] flex-col p-0" aria-labelledby="marks-h">
      <div className="flex items-center justify-between gap-2 border-b border-rule px-4 py-3">
        <h2 id="marks-h" className="text-lg">
          Marks <span className="num text-sm font-normal text-graphite-soft">({marks.length})</span>
        </h2>
        {canCreate && !draft && (
          <button
            type="button"
            className="btn py-1 text-xs"
            onClick={() => {
              setDraft({ tStart: currentTime, tEnd: null });
              setTimeout(() => textRef.current?.focus(), 0);
            }}
          >
            Mark at {formatTime(currentTime)}
          </button>
        )}
      </div>
      {spanStart != null && (
        <p className="border-b border-rule bg-brass-soft/60 px-4 py-2 text-sm" role="status">
          Span started at <span className="num font-semibold">{formatTime(spanStart)}</span>; press{" "}
          <kbd className="rounded border border-rule bg-card px-1 font-mono text-xs">S</kbd> again at its end.
        </p>
      )}
      {draft && canCreate && (
        <MarkForm
          key={`new-${draft.tStart}-${draft.tEnd}`}
          fetcherKey={`mark-new-${draft.tStart}-${draft.tEnd}`}
          recordingId={recordingId}
          procedures={procedures}
          builds={builds}
          initial={{
            tStart: draft.tStart,
            tEnd: draft.tEnd,
            text: "",
            tags: [],
            procedureId: null,
            buildNumber: props.recordingBuild ?? null,
          }}
          textRef={textRef}
          durationS={durationS}
          onDone={() => setDraft(null)}
        />
      )}
      {marks.length === 0 && !draft ? (
        <p className="px-4 py-6 text-sm text-graphite-soft">
          No marks yet.
          {canCreate && (
            <span className="keyboard-only">
              {" "}
              Press <kbd className="rounded border border-rule bg-card px-1 font-mono text-xs">M</kbd> while watching to mark the moment
              that matters.
            </span>
          )}
          {canCreate && <span className="touch-only"> Tap “Mark at” above at the moment that matters.</span>}
        </p>
      ) : (
        <ol ref={listRef} className="min-h-0 flex-1 overflow-y-auto" data-testid="mark-list">
          {marks.map((m) =>
            editing === m.id ? (
              <li key={m.id} className="border-b border-rule/70">
                <MarkForm
                  recordingId={recordingId}
                  procedures={procedures}
                  builds={builds}
                  initial={m}
                  markId={m.id}
                  durationS={durationS}
                  onDone={() => setEditing(null)}
                />
              </li>
            ) : (
              <MarkItem
                key={m.id}
                recordingId={recordingId}
                mark={m}
                active={m.id === current}
                canEdit={!m.pending && canEdit(m)}
                onSeek={onSeek}
                onEdit={() => setEditing(m.id)}
              />
            ),
          )}
        </ol>
      )}
    </section>
  );
});

function MarkItem({
  recordingId,
  mark,
  active,
  canEdit,
  onSeek,
  onEdit,
}: {
  recordingId: string;
  mark: MarkRow;
  active: boolean;
  canEdit: boolean;
  onSeek: (t: number) => void;
  onEdit: () => void;
}) {
  const del = useFetcher({ key: `mark-del-${mark.id}` });
  return (
    <li
      data-mark-id={mark.id}
      data-testid="mark"
      aria-current={active ? "true" : undefined}
      className={`group border-b border-rule/70 border-l-4 px-3 py-2.5 ${active ? "border-l-brass bg-brass-soft/50" : "border-l-transparent"} ${mark.pending ? "opacity-60" : ""}`}
    >
      <button
        type="button"
        onClick={() => onSeek(mark.tStart)}
        className="block w-full text-left"
        aria-label={`Play from ${formatTime(mark.tStart)}: ${mark.text}`}
      >
        <span className="num mr-2 font-mono text-sm font-semibold text-teal" data-testid="mark-time">
          {formatTime(mark.tStart)}
          {mark.tEnd != null && <> – {formatTime(mark.tEnd)}</>}
        </span>
        <span className="text-sm">{mark.text}</span>
      </button>
      {(mark.tags.length > 0 || mark.procedureTitle || mark.buildNumber) && (
        <div className="mt-1 flex flex-wrap items-center gap-1.5 text-xs">
          {mark.tags.map((t) => (
            <span key={t} className="rounded-full bg-teal-soft px-2 py-0.5 font-semibold text-teal">
              {t}
            </span>
          ))}
          {/* No address: a procedure this person may not read (marksFor in notes.server.ts). */}
          {mark.procedureTitle &&
            (mark.procedureSlug ? (
              <a href={`/procedures/${mark.procedureSlug}`} className="font-semibold">
                ↳ {mark.procedureTitle}
              </a>
            ) : (
              <span className="italic">↳ {mark.procedureTitle}</span>
            ))}
          {mark.buildNumber && (
            <a href={`/builds/${mark.buildNumber}`} className="num font-semibold" data-testid="mark-build">
              Build {mark.buildNumber}
            </a>
          )}
        </div>
      )}
      <div className="mt-1 flex items-center gap-3 text-xs text-graphite-soft">
        <span>{mark.authorName ?? "Former staff"}</span>
        {canEdit && (
          <>
            <button type="button" className="font-semibold text-teal hover:underline" onClick={onEdit}>
              Edit
            </button>
            <button
              type="button"
              className="font-semibold text-spec-red hover:underline"
              onClick={() => {
                if (confirm(`Delete the mark at ${formatTime(mark.tStart)}?`))
                  del.submit(null, { method: "DELETE", action: `/api/recordings/${recordingId}/marks/${mark.id}` });
              }}
            >
              Delete
            </button>
          </>
        )}
      </div>
    </li>
  );
}

function parseTime(s: string): number | null {
  const v = s.trim();
  if (!v) return null;
  const parts = v.split(":").map((p) => Number(p));
  if (parts.some((p) => !Number.isFinite(p))) return Number.NaN;
  return parts.reduce((acc, p) => acc * 60 + p, 0);
}

function MarkForm({
  recordingId,
  procedures,
  builds,
  initial,
  markId,
  textRef,
  durationS,
  onDone,
  fetcherKey,
}: {
  fetcherKey?: string;
  recordingId: string;
  procedures: ProcedureChoice[];
  builds: BuildPick[];
  initial: { tStart: number; tEnd: number | null; text: string; tags: string[]; procedureId: string | null; buildNumber?: string | null };
  markId?: string;
  textRef?: React.Ref<HTMLInputElement>;
  durationS: number | null;
  onDone: () => void;
}) {
  // A new mark shows in the list at once (optimistic, from useFetchers); the form closes when
  // the server has it and stays open with the messages when it refuses (nothing typed is lost).
  const fetcher = useFetcher<{ issues?: { path: string; message: string }[] }>({ key: markId ? `mark-edit-${markId}` : fetcherKey });
  const [start, setStart] = useState(formatTime(initial.tStart));
  const [end, setEnd] = useState(initial.tEnd != null ? formatTime(initial.tEnd) : "");
  const [text, setText] = useState(initial.text);
  const [tags, setTags] = useState(initial.tags.join(", "));
  const [procedureId, setProcedureId] = useState(initial.procedureId ?? "");
  const [buildNumber, setBuildNumber] = useState(initial.buildNumber ?? "");
  const [local, setLocal] = useState<Record<string, string>>({});
  const errors = { ...(fetcher.state === "idle" ? issuesByPath(fetcher.data) : {}), ...local };
  const submitted = useRef(false);

  useEffect(() => {
    if (submitted.current && fetcher.state === "idle" && fetcher.data && !("issues" in fetcher.data)) onDone();
    if (submitted.current && fetcher.state === "idle" && fetcher.data == null) onDone();
  }, [fetcher.state, fetcher.data, onDone]);

  const id = markId ?? "new";
  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    const tStart = parseTime(start);
    const tEnd = parseTime(end);
    const errs: Record<string, string> = {};
    if (tStart == null || Number.isNaN(tStart)) errs.tStart = "Enter the time as m:ss.s or seconds.";
    if (!text.trim()) errs.text = "Write what happens at this moment.";
    if (Number.isNaN(tEnd)) errs.tEnd = "Enter the end as m:ss.s or seconds, or leave it empty.";
    setLocal(errs);
    if (Object.keys(errs).length) return;
    submitted.current = true;
    // Without a list to choose from the build is left out: the server keeps the mark's (or, new, its recording's).
    const body = {
      tStart,
      tEnd: tEnd ?? null,
      text,
      tags: splitTags(tags),
      procedureId: procedureId || null,
      ...(builds.length ? { buildNumber: buildNumber || null } : {}),
    };
    fetcher.submit(body, {
      method: markId ? "PATCH" : "POST",
      action: `/api/recordings/${recordingId}/marks${markId ? `/${markId}` : ""}`,
      encType: "application/json",
    });
  };

  return (
    <form
      onSubmit={submit}
      className="space-y-2 border-b border-rule bg-paper/60 px-4 py-3"
      noValidate
      aria-label={markId ? "Edit mark" : "New mark"}
      onKeyDown={(e) => {
        if (e.key === "Escape") onDone();
      }}
    >
      <div className="grid grid-cols-2 gap-2">
        <div>
          <label className="label text-xs" htmlFor={`ms-${id}`}>
            {end ? "From" : "At"}
          </label>
          <input
            id={`ms-${id}`}
            className="field num py-1 font-mono text-sm"
            value={start}
            onChange={(e) => setStart(e.target.value)}
            aria-invalid={errors.tStart ? true : undefined}
          />
        </div>
        <div>
          <label className="label text-xs" htmlFor={`me-${id}`}>
            To <span className="font-normal text-graphite-soft">(span, optional)</span>
          </label>
          <input
            id={`me-${id}`}
            className="field num py-1 font-mono text-sm"
            value={end}
            placeholder="–"
            onChange={(e) => setEnd(e.target.value)}
            aria-invalid={errors.tEnd ? true : undefined}
          />
        </div>
      </div>
      {(errors.tStart || errors.tEnd) && (
        <p className="field-error" role="alert">
          {errors.tStart ?? errors.tEnd}
        </p>
      )}
      <div>
        <label className="label text-xs" htmlFor={`mt-${id}`}>
          What happens here
        </label>
        <input
          ref={textRef}
          id={`mt-${id}`}
          data-testid="mark-text"
          className="field py-1 text-sm"
          value={text}
          maxLength={2000}
          onChange={(e) => setText(e.target.value)}
          aria-invalid={errors.text ? true : undefined}
          placeholder="Stud 4 reaches 110 N·m, third pass"
        />
        {errors.text && (
          <p className="field-error" role="alert">
            {errors.text}
          </p>
        )}
      </div>
      <div className="grid gap-2 sm:grid-cols-2">
        <div>
          <label className="label text-xs" htmlFor={`mg-${id}`}>
            Tags
          </label>
          <input
            id={`mg-${id}`}
            className="field py-1 text-sm"
            value={tags}
            onChange={(e) => setTags(e.target.value)}
            placeholder="torque, moly"
          />
        </div>
        <div>
          <label className="label text-xs" htmlFor={`mp-${id}`}>
            Procedure
          </label>
          <select id={`mp-${id}`} className="field py-1 text-sm" value={procedureId} onChange={(e) => setProcedureId(e.target.value)}>
            <option value="">None</option>
            {procedures.map((p) => (
              <option key={p.id} value={p.id}>
                {p.title}
              </option>
            ))}
          </select>
          {errors.procedureId && (
            <p className="field-error" role="alert">
              {errors.procedureId}
            </p>
          )}
        </div>
        {builds.length > 0 && (
          <div className="sm:col-span-2">
            <label className="label text-xs" htmlFor={`mb-${id}`}>
              Build <span className="font-normal text-graphite-soft">(the engine this moment shows)</span>
            </label>
            <select
              id={`mb-${id}`}
              className="field py-1 text-sm"
              value={buildNumber}
              onChange={(e) => setBuildNumber(e.target.value)}
              aria-invalid={errors.buildNumber ? true : undefined}
            >
              <BuildOptions builds={builds} keep={initial.buildNumber} />
            </select>
            {errors.buildNumber && (
              <p className="field-error" role="alert">
                {errors.buildNumber}
              </p>
            )}
          </div>
        )}
      </div>
      {errors.form && (
        <p className="field-error" role="alert">
          {errors.form}
        </p>
      )}
      {durationS != null && <p className="sr-only">The video is {formatTime(durationS)} long.</p>}
      <div className="flex gap-2">
        <button type="submit" className="btn btn-primary py-1 text-sm" disabled={fetcher.state !== "idle"}>
          {fetcher.state !== "idle" ? "Saving…" : markId ? "Save" : "Add mark"}
        </button>
        <button type="button" className="btn py-1 text-sm" onClick={onDone}>
          Cancel
        </button>
      </div>
    </form>
  );
}
