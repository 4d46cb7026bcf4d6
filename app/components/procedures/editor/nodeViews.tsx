/** React node views for our custom blocks in the editor (the schema itself lives in app/lib/procedures/nodes.ts). */
import { NodeViewContent, NodeViewWrapper, ReactNodeViewRenderer, type ReactNodeViewProps } from "@tiptap/react";
import { lazy, Suspense, useEffect, useId, useMemo, useRef, useState } from "react";
import type { PlayerApi } from "~/components/recordings/Player.client";
import { UNIT_CODES, unitLabel, type UnitCode, type UnitKind } from "~/lib/calc";
import { readPastedPreset } from "~/lib/calc-preset";
import { CALC_KINDS, DEFAULT_PRESETS, numericLeaves, runCalculator, setAtPath, type CalcKind } from "~/lib/procedures/calc-presets";
import { blockProblems, calcLabel, formatSeconds, QUANTITY_KINDS, type JSONNode } from "~/lib/procedures/document";
import { CalculatorNode, CautionNode, ProcedureLinkNode, SpecNode, VideoMomentNode } from "~/lib/procedures/nodes";
import { useEditorShared } from "./context";

const numOrNull = (s: string) => (s.trim() === "" ? null : Number(s));

/** The name a screen reader announces for a block, and the plain-words list of what it still lacks. */
function BlockFrame({
  node,
  label,
  children,
  selected,
}: {
  node: ReactNodeViewProps["node"];
  label: string;
  children: React.ReactNode;
  selected: boolean;
}) {
  const problems = useMemo(() => blockProblems(node.toJSON() as JSONNode), [node]);
  const id = useId();
  return (
    <NodeViewWrapper
      role="group"
      aria-label={`${label}${problems.length ? " (incomplete)" : ""}`}
      aria-describedby={problems.length ? id : undefined}
      tabIndex={-1}
      data-block={node.type.name}
      data-incomplete={problems.length ? "" : undefined}
      className={`my-3 rounded-lg border bg-card font-sans text-sm shadow-sm focus:outline-none focus-visible:ring-2 focus-visible:ring-brass ${selected ? "border-brass" : problems.length ? "border-brass/70 border-dashed" : "border-rule"}`}
      contentEditable={false}
    >
      <div className="flex items-center justify-between border-b border-rule bg-paper-deep/60 px-3 py-1" data-drag-handle>
        <span className="text-xs font-semibold uppercase tracking-[0.12em] text-graphite-soft">{label}</span>
        <span className="cursor-grab text-graphite-soft" aria-hidden>
          ⠿
        </span>
      </div>
      <div className="p-3">{children}</div>
      {problems.length > 0 && (
        <p id={id} className="m-0 border-t border-brass/40 bg-brass-soft/50 px-3 py-1.5 font-sans text-sm" data-testid="block-problems">
          <span className="font-semibold text-graphite">To finish before review: </span>
          {problems.map((p) => p.message).join(" · ")}
        </p>
      )}
    </NodeViewWrapper>
  );
}

/** A number input that shows what the author types and follows changes made elsewhere (a mark picked, the preview's frame). */
function NumberField({
  value,
  onValue,
  ...rest
}: { value: number | null; onValue: (v: number | null) => void } & Omit<
  React.InputHTMLAttributes<HTMLInputElement>,
  "value" | "onChange"
>) {
  const [text, setText] = useState(value == null ? "" : String(value));
  useEffect(() => {
    setText((t) => (numOrNull(t) === value || (t.trim() === "" && value == null) ? t : value == null ? "" : String(value)));
  }, [value]);
  return (
    <input
      {...rest}
      type="number"
      step="any"
      inputMode="decimal"
      value={text}
      onChange={(e) => {
        setText(e.target.value);
        const n = numOrNull(e.target.value);
        onValue(n != null && Number.isFinite(n) ? n : null);
      }}
    />
  );
}

function SpecView({ node, updateAttributes, selected }: ReactNodeViewProps) {
  const a = node.attrs as {
    label: string;
    quantity: UnitKind | null;
    unit: string | null;
    nominal: number | null;
    min: number | null;
    max: number | null;
    note: string;
  };
  const units = (a.quantity && UNIT_CODES[a.quantity]) || [];
  const fid = useId();
  return (
    <BlockFrame node={node} label={a.label ? `Spec: ${a.label}` : "Spec"} selected={selected}>
      <div className="grid gap-2 sm:grid-cols-[2fr_1fr_1fr]" data-testid="spec-editor">
        <label className="sm:col-span-1">
          <span className="text-xs text-graphite-soft">Label</span>
          <input
            className="field py-1"
            data-field="label"
            value={a.label}
            placeholder="e.g. Head stud final torque"
            onChange={(e) => updateAttributes({ label: e.target.value })}
            aria-label="Spec label"
          />
        </label>
        <label>
          <span className="text-xs text-graphite-soft">Quantity</span>
          <select
            className="field py-1"
            data-field="quantity"
            value={a.quantity ?? ""}
            aria-label="Spec quantity"
            onChange={(e) => {
              const q = e.target.value as UnitKind;
              updateAttributes({ quantity: q || null, unit: q ? UNIT_CODES[q][0] : null });
            }}
          >
            {!a.quantity && <option value="">Choose…</option>}
            {QUANTITY_KINDS.map((k) => (
              <option key={k} value={k}>
                {k}
              </option>
            ))}
          </select>
        </label>
        <label>
          <span className="text-xs text-graphite-soft">Unit</span>
          <select
            className="field py-1"
            data-field="unit"
            value={a.unit ?? ""}
            aria-label="Spec unit"
            onChange={(e) => updateAttributes({ unit: e.target.value || null })}
          >
            {!(a.unit && (units as readonly string[]).includes(a.unit)) && <option value="">Choose…</option>}
            {units.map((u) => (
              <option key={u} value={u}>
                {unitLabel(u as UnitCode)}
              </option>
            ))}
          </select>
        </label>
      </div>
      <div className="mt-2 grid grid-cols-3 gap-2">
        {(["nominal", "min", "max"] as const).map((k) => (
          <label key={k} htmlFor={`${fid}-${k}`}>
            <span className="text-xs text-graphite-soft">{SPEC_FIELD_LABELS[k]}</span>
            <NumberField
              id={`${fid}-${k}`}
              className="field num py-1"
              data-field={k}
              aria-label={`Spec ${k}`}
              value={a[k]}
              onValue={(v) => updateAttributes({ [k]: v })}
            />
          </label>
        ))}
      </div>
      <label className="mt-2 block">
        <span className="text-xs text-graphite-soft">Note</span>
        <input
          className="field py-1"
          value={a.note}
          onChange={(e) => updateAttributes({ note: e.target.value })}
          placeholder="e.g. final pass, moly on threads and washer"
        />
      </label>
    </BlockFrame>
  );
}

const SPEC_FIELD_LABELS = { nominal: "Nominal", min: "Minimum", max: "Maximum" } as const;

function CalculatorView({ node, updateAttributes, selected }: ReactNodeViewProps) {
  const kind = node.attrs.kind as CalcKind;
  const preset = (node.attrs.preset ?? DEFAULT_PRESETS[kind]) as Record<string, unknown>;
  const [json, setJson] = useState(() => JSON.stringify(preset, null, 2));
  const [jsonError, setJsonError] = useState<string | null>(null);
  // biome-ignore lint/correctness/useExhaustiveDependencies: the text follows the stored preset, not the object made afresh each render
  useEffect(() => setJson(JSON.stringify(preset, null, 2)), [node.attrs.preset]);
  const outcome = useMemo(() => runCalculator(kind, preset), [kind, preset]);
  const leaves = numericLeaves(preset);
  return (
    <BlockFrame node={node} label={`${calcLabel(kind)} calculator${node.attrs.title ? `: ${node.attrs.title}` : ""}`} selected={selected}>
      <div className="flex flex-wrap gap-2">
        <label>
          <span className="text-xs text-graphite-soft">Calculator</span>
          <select
            className="field py-1"
            value={kind}
            aria-label="Calculator kind"
            onChange={(e) => {
              const k = e.target.value as CalcKind;
              updateAttributes({ kind: k, preset: DEFAULT_PRESETS[k] });
            }}
          >
            {CALC_KINDS.map((k) => (
              <option key={k} value={k}>
                {calcLabel(k)}
              </option>
            ))}
          </select>
        </label>
        <label className="flex-1">
          <span className="text-xs text-graphite-soft">Title (optional)</span>
          <input
            className="field py-1"
            value={node.attrs.title ?? ""}
            onChange={(e) => updateAttributes({ title: e.target.value })}
            placeholder="e.g. M12×1.5 studs, moly"
          />
        </label>
      </div>
      <div className="mt-3 grid gap-3 sm:grid-cols-2">
        <div className="space-y-1">
          <p className="text-xs font-semibold uppercase tracking-wide text-graphite-soft">Preset inputs</p>
          {typeof preset.thread === "string" && (
            <label className="flex items-center justify-between gap-2">
              <span>thread</span>
              <input
                className="field w-32 py-0.5"
                defaultValue={preset.thread}
                aria-label="Thread"
                onBlur={(e) => updateAttributes({ preset: { ...preset, thread: e.target.value.trim() } })}
              />
            </label>
          )}
          {leaves.map((l) => (
            <label key={l.path.join(".")} className="flex items-center justify-between gap-2">
              <span>{l.label}</span>
              <span className="flex items-center gap-1">
                <input
                  className="field num w-28 py-0.5 text-right"
                  type="number"
                  step="any"
                  defaultValue={l.value}
                  aria-label={`Preset ${l.label}`}
                  onChange={(e) => {
                    const v = e.currentTarget.valueAsNumber;
                    if (Number.isFinite(v)) updateAttributes({ preset: setAtPath(preset, l.path, v) });
                  }}
                />
                <span className="w-10 text-graphite-soft">{l.unit ? unitLabel(l.unit as UnitCode) : ""}</span>
              </span>
            </label>
          ))}
        </div>
        <div>
          <p className="text-xs font-semibold uppercase tracking-wide text-graphite-soft">Result readers will see</p>
          {outcome.ok ? (
            <dl className="mt-1 space-y-0.5">
              {outcome.rows.map((r) => (
                <div key={r.label} className="flex justify-between gap-2">
                  <dt className="text-graphite-soft">{r.label}</dt>
                  <dd className="num font-semibold">{r.value}</dd>
                </div>
              ))}
            </dl>
          ) : (
            <p className="mt-1 text-spec-red">Cannot compute: {outcome.message}</p>
          )}
        </div>
      </div>
      <details className="mt-3">
        <summary className="cursor-pointer text-sm text-teal">Paste inputs from a calculator page</summary>
        <p className="mt-1 text-xs text-graphite-soft">
          On a calculator page, “Copy as calculator block” copies every input (units, method, material). Paste it here to use those numbers
          in this block.
        </p>
        <textarea
          className="field mt-1 h-40 font-mono text-xs"
          data-field="preset"
          value={json}
          aria-label="Calculator inputs copied from a calculator page"
          onChange={(e) => {
            setJson(e.target.value);
            try {
              const pasted = readPastedPreset(JSON.parse(e.target.value));
              if (!pasted.ok) return setJsonError(pasted.message);
              setJsonError(null);
              // A whole copied preset brings its calculator along: the block becomes that kind.
              updateAttributes(pasted.calculator ? { kind: pasted.calculator, preset: pasted.input } : { preset: pasted.input });
            } catch {
              setJsonError("This is not the whole copied text yet; the last complete inputs are kept.");
            }
          }}
        />
        {jsonError && <p className="field-error">{jsonError}</p>}
      </details>
    </BlockFrame>
  );
}

// Our player (video.js plays, the controls are ours), loaded only when a preview is shown.
const Player = lazy(() => import("~/components/recordings/Player.client"));
const ignoreTime = () => {};

type RecordingOption = { id: string; title: string; durationS: number | null };
type MarkOption = { id: string; tStart: number; tEnd: number | null; text: string };

const roundTenth = (t: number) => Math.round(t * 10) / 10;

/**
 * The author picks a recording, then one of its marks (times filled in) or the frame the small
 * preview stands on; typing the seconds stays possible. Marks come from the recordings API
 * (GET /api/recordings/:id/marks, which applies the recordings' own rules).
 */
function VideoMomentView({ node, updateAttributes, selected }: ReactNodeViewProps) {
  const a = node.attrs as { recordingId: string | null; start: number | null; end: number | null; caption: string };
  const fid = useId();
  const [options, setOptions] = useState<RecordingOption[] | null>(null);
  const [available, setAvailable] = useState(true);
  const [marks, setMarks] = useState<MarkOption[] | null>(null);
  const [markId, setMarkId] = useState("");
  const player = useRef<PlayerApi | null>(null);
  useEffect(() => {
    fetch("/api/procedures/recordings")
      .then((r) => r.json())
      .then((j: { available: boolean; results: RecordingOption[] }) => {
        setOptions(j.results);
        setAvailable(j.available);
      })
      .catch(() => setOptions([]));
  }, []);
  const chosen = a.recordingId && options?.some((o) => o.id === a.recordingId) ? a.recordingId : null;
  useEffect(() => {
    setMarks(null);
    if (!chosen) return;
    const ctl = new AbortController();
    fetch(`/api/recordings/${chosen}/marks`, { signal: ctl.signal })
      .then((r) => (r.ok ? r.json() : { marks: [] }))
      .then((j: { marks: MarkOption[] }) => setMarks(j.marks))
      .catch(() => {});
    return () => ctl.abort();
  }, [chosen]);
  const title = options?.find((o) => o.id === a.recordingId)?.title;
  const pickMark = (id: string) => {
    setMarkId(id);
    const m = marks?.find((x) => x.id === id);
    if (!m) return;
    updateAttributes({ start: m.tStart, end: m.tEnd ?? null, ...(a.caption.trim() ? {} : { caption: m.text }) });
    player.current?.seek(m.tStart);
  };
  const frame = (which: "start" | "end") => {
    const t = player.current?.currentTime();
    if (t == null || !Number.isFinite(t)) return;
    setMarkId("");
    updateAttributes({ [which]: roundTenth(t) });
  };
  return (
    <BlockFrame node={node} label={`Video moment${title ? `: ${title}` : ""}`} selected={selected}>
      <div className="grid gap-3 md:grid-cols-[minmax(0,1fr)_minmax(0,24rem)]">
        <div className="grid content-start gap-2">
          <label htmlFor={`${fid}-recording`}>
            <span className="text-xs text-graphite-soft">Recording</span>
            {options && options.length > 0 ? (
              <select
                id={`${fid}-recording`}
                className="field py-1"
                data-field="recording"
                value={a.recordingId ?? ""}
                aria-label="Recording"
                onChange={(e) => {
                  setMarkId("");
                  updateAttributes({ recordingId: e.target.value || null });
                }}
              >
                <option value="">Choose a recording…</option>
                {options.map((o) => (
                  <option key={o.id} value={o.id}>
                    {o.title}
                    {o.durationS != null ? ` (${formatSeconds(o.durationS)})` : ""}
                  </option>
                ))}
              </select>
            ) : (
              <input
                id={`${fid}-recording`}
                className="field py-1 font-mono text-xs"
                data-field="recording"
                value={a.recordingId ?? ""}
                aria-label="Recording id"
                placeholder="recording id"
                onChange={(e) => updateAttributes({ recordingId: e.target.value.trim() || null })}
              />
            )}
          </label>
          {options && options.length === 0 && (
            <p className="text-xs text-graphite-soft">
              {available
                ? "No recording is ready yet; paste a recording's id, or add the moment once one is."
                : "Recordings are not set up yet; paste a recording's id."}
            </p>
          )}
          {chosen && (
            <label>
              <span className="text-xs text-graphite-soft">Mark</span>
              <select
                className="field py-1"
                data-field="mark"
                value={markId}
                aria-label="Mark"
                disabled={!marks?.length}
                onChange={(e) => pickMark(e.target.value)}
              >
                <option value="">
                  {marks == null
                    ? "Loading the marks…"
                    : marks.length
                      ? "Choose a mark to fill in its time…"
                      : "This recording has no marks yet"}
                </option>
                {marks?.map((m) => (
                  <option key={m.id} value={m.id}>
                    {formatSeconds(m.tStart)}
                    {m.tEnd != null ? `–${formatSeconds(m.tEnd)}` : ""} · {m.text}
                  </option>
                ))}
              </select>
            </label>
          )}
          <div className="grid grid-cols-2 gap-2">
            <label htmlFor={`${fid}-start`}>
              <span className="text-xs text-graphite-soft">Start (seconds)</span>
              <NumberField
                id={`${fid}-start`}
                className="field num py-1"
                data-field="start"
                min={0}
                aria-label="Start seconds"
                value={a.start}
                onValue={(v) => {
                  setMarkId("");
                  updateAttributes({ start: v });
                }}
              />
            </label>
            <label htmlFor={`${fid}-end`}>
              <span className="text-xs text-graphite-soft">End (seconds, optional)</span>
              <NumberField
                id={`${fid}-end`}
                className="field num py-1"
                data-field="end"
                min={0}
                aria-label="End seconds"
                value={a.end}
                onValue={(v) => {
                  setMarkId("");
                  updateAttributes({ end: v });
                }}
              />
            </label>
          </div>
          <label className="block">
            <span className="text-xs text-graphite-soft">Caption</span>
            <input
              className="field py-1"
              value={a.caption}
              onChange={(e) => updateAttributes({ caption: e.target.value })}
              placeholder="What to watch for at this moment"
            />
          </label>
        </div>
        {chosen && (
          <div className="grid content-start gap-2" data-testid="moment-preview">
            <Suspense fallback={<div className="aspect-video w-full rounded border border-rule bg-graphite" />}>
              <Player
                key={chosen}
                compact
                src={`/api/recordings/${chosen}/media`}
                poster={`/api/recordings/${chosen}/poster`}
                title={title ?? "the chosen recording"}
                durationS={options?.find((o) => o.id === chosen)?.durationS}
                marks={marks ?? []}
                onReady={(api) => {
                  player.current = api;
                }}
                onTime={ignoreTime}
              />
            </Suspense>
            <div className="flex flex-wrap gap-2">
              <button type="button" className="btn px-3 py-1.5 text-sm" onClick={() => frame("start")}>
                Start at this frame
              </button>
              <button type="button" className="btn px-3 py-1.5 text-sm" onClick={() => frame("end")}>
                End at this frame
              </button>
            </div>
          </div>
        )}
      </div>
    </BlockFrame>
  );
}

function ProcedureLinkView({ node }: ReactNodeViewProps) {
  const { titles } = useEditorShared();
  const t = titles[node.attrs.procedureId as string];
  return (
    <NodeViewWrapper
      as="span"
      className="rounded bg-teal-soft px-1 font-sans text-[0.95em] font-semibold text-teal"
      data-testid="procedure-link-chip"
    >
      → {t?.title ?? "linked procedure"}
    </NodeViewWrapper>
  );
}

function CautionView() {
  return (
    <NodeViewWrapper
      role="note"
      aria-label="Caution"
      className="my-3 rounded-md border border-brass border-l-[6px] bg-brass-soft px-4 py-2"
    >
      <p className="caution-title" contentEditable={false}>
        Caution
      </p>
      <NodeViewContent className="font-serif" />
    </NodeViewWrapper>
  );
}

export const editorNodes = [
  SpecNode.extend({ addNodeView: () => ReactNodeViewRenderer(SpecView) }),
  CalculatorNode.extend({ addNodeView: () => ReactNodeViewRenderer(CalculatorView) }),
  VideoMomentNode.extend({ addNodeView: () => ReactNodeViewRenderer(VideoMomentView) }),
  ProcedureLinkNode.extend({ addNodeView: () => ReactNodeViewRenderer(ProcedureLinkView) }),
  CautionNode.extend({ addNodeView: () => ReactNodeViewRenderer(CautionView) }),
];
