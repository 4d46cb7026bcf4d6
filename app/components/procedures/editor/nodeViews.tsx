/** React node views for our custom blocks in the editor (the schema itself lives in app/lib/procedures/nodes.ts). */
import { NodeViewContent, NodeViewWrapper, ReactNodeViewRenderer, type ReactNodeViewProps } from "@tiptap/react";
import { useEffect, useMemo, useState } from "react";
import { UNIT_CODES, unitLabel, type UnitCode, type UnitKind } from "~/lib/calc";
import { CALC_KINDS, DEFAULT_PRESETS, numericLeaves, runCalculator, setAtPath, type CalcKind } from "~/lib/procedures/calc-presets";
import { calcLabel, QUANTITY_KINDS } from "~/lib/procedures/document";
import { CalculatorNode, CautionNode, ProcedureLinkNode, SpecNode, VideoMomentNode } from "~/lib/procedures/nodes";
import { useEditorShared } from "./context";

const numOrNull = (s: string) => (s.trim() === "" ? null : Number(s));

function BlockFrame({ label, children, selected }: { label: string; children: React.ReactNode; selected: boolean }) {
  return (
    <NodeViewWrapper className={`my-3 rounded-lg border bg-card font-sans text-sm shadow-sm ${selected ? "border-brass" : "border-rule"}`} contentEditable={false}>
      <div className="flex items-center justify-between border-b border-rule bg-paper-deep/60 px-3 py-1" data-drag-handle>
        <span className="text-xs font-semibold uppercase tracking-[0.12em] text-graphite-soft">{label}</span>
        <span className="cursor-grab text-graphite-soft" aria-hidden>⠿</span>
      </div>
      <div className="p-3">{children}</div>
    </NodeViewWrapper>
  );
}

function SpecView({ node, updateAttributes, selected }: ReactNodeViewProps) {
  const a = node.attrs as { label: string; quantity: UnitKind; unit: string; nominal: number | null; min: number | null; max: number | null; note: string };
  const units = UNIT_CODES[a.quantity] ?? [];
  const bad = a.min != null && a.max != null && a.min > a.max;
  return (
    <BlockFrame label="Spec" selected={selected}>
      <div className="grid gap-2 sm:grid-cols-[2fr_1fr_1fr]" data-testid="spec-editor">
        <label className="sm:col-span-1"><span className="text-xs text-graphite-soft">Label</span><input className="field py-1" value={a.label} placeholder="e.g. Head stud final torque" onChange={(e) => updateAttributes({ label: e.target.value })} aria-label="Spec label" /></label>
        <label><span className="text-xs text-graphite-soft">Quantity</span>
          <select className="field py-1" value={a.quantity} aria-label="Spec quantity" onChange={(e) => { const q = e.target.value as UnitKind; updateAttributes({ quantity: q, unit: UNIT_CODES[q][0] }); }}>
            {QUANTITY_KINDS.map((k) => <option key={k} value={k}>{k}</option>)}
          </select>
        </label>
        <label><span className="text-xs text-graphite-soft">Unit</span>
          <select className="field py-1" value={a.unit} aria-label="Spec unit" onChange={(e) => updateAttributes({ unit: e.target.value })}>
            {units.map((u) => <option key={u} value={u}>{unitLabel(u as UnitCode)}</option>)}
          </select>
        </label>
      </div>
      <div className="mt-2 grid grid-cols-3 gap-2">
        {(["nominal", "min", "max"] as const).map((k) => (
          <label key={k}><span className="text-xs text-graphite-soft">{k}</span>
            <input className="field num py-1" type="number" step="any" aria-label={`Spec ${k}`} defaultValue={a[k] ?? ""} onChange={(e) => updateAttributes({ [k]: numOrNull(e.target.value) })} />
          </label>
        ))}
      </div>
      <label className="mt-2 block"><span className="text-xs text-graphite-soft">Note</span><input className="field py-1" value={a.note} onChange={(e) => updateAttributes({ note: e.target.value })} placeholder="e.g. final pass, moly on threads and washer" /></label>
      {bad && <p className="field-error">Min is above max.</p>}
      {a.nominal == null && a.min == null && a.max == null && <p className="mt-1 text-xs text-brass">Give a nominal value or a limit.</p>}
    </BlockFrame>
  );
}

function CalculatorView({ node, updateAttributes, selected }: ReactNodeViewProps) {
  const kind = node.attrs.kind as CalcKind;
  const preset = (node.attrs.preset ?? DEFAULT_PRESETS[kind]) as Record<string, unknown>;
  const [json, setJson] = useState(() => JSON.stringify(preset, null, 2));
  const [jsonError, setJsonError] = useState<string | null>(null);
  useEffect(() => setJson(JSON.stringify(preset, null, 2)), [node.attrs.preset]); // eslint-disable-line react-hooks/exhaustive-deps
  const outcome = useMemo(() => runCalculator(kind, preset), [kind, preset]);
  const leaves = numericLeaves(preset);
  return (
    <BlockFrame label={`${calcLabel(kind)} calculator`} selected={selected}>
      <div className="flex flex-wrap gap-2">
        <label><span className="text-xs text-graphite-soft">Calculator</span>
          <select className="field py-1" value={kind} aria-label="Calculator kind" onChange={(e) => { const k = e.target.value as CalcKind; updateAttributes({ kind: k, preset: DEFAULT_PRESETS[k] }); }}>
            {CALC_KINDS.map((k) => <option key={k} value={k}>{calcLabel(k)}</option>)}
          </select>
        </label>
        <label className="flex-1"><span className="text-xs text-graphite-soft">Title (optional)</span><input className="field py-1" value={node.attrs.title ?? ""} onChange={(e) => updateAttributes({ title: e.target.value })} placeholder="e.g. M12×1.5 studs, moly" /></label>
      </div>
      <div className="mt-3 grid gap-3 sm:grid-cols-2">
        <div className="space-y-1">
          <p className="text-xs font-semibold uppercase tracking-wide text-graphite-soft">Preset inputs</p>
          {typeof preset.thread === "string" && (
            <label className="flex items-center justify-between gap-2"><span>thread</span><input className="field w-32 py-0.5" defaultValue={preset.thread} aria-label="Thread" onBlur={(e) => updateAttributes({ preset: { ...preset, thread: e.target.value.trim() } })} /></label>
          )}
          {leaves.map((l) => (
            <label key={l.path.join(".")} className="flex items-center justify-between gap-2">
              <span>{l.label}</span>
              <span className="flex items-center gap-1"><input className="field num w-28 py-0.5 text-right" type="number" step="any" defaultValue={l.value} aria-label={`Preset ${l.label}`} onChange={(e) => { const v = e.currentTarget.valueAsNumber; if (Number.isFinite(v)) updateAttributes({ preset: setAtPath(preset, l.path, v) }); }} /><span className="w-10 text-graphite-soft">{l.unit ? unitLabel(l.unit as UnitCode) : ""}</span></span>
            </label>
          ))}
        </div>
        <div>
          <p className="text-xs font-semibold uppercase tracking-wide text-graphite-soft">Result readers will see</p>
          {outcome.ok ? (
            <dl className="mt-1 space-y-0.5">{outcome.rows.map((r) => <div key={r.label} className="flex justify-between gap-2"><dt className="text-graphite-soft">{r.label}</dt><dd className="num font-semibold">{r.value}</dd></div>)}</dl>
          ) : (
            <p className="mt-1 text-spec-red">Cannot compute: {outcome.message}</p>
          )}
        </div>
      </div>
      <details className="mt-3">
        <summary className="cursor-pointer text-xs text-graphite-soft">All inputs as JSON (units, method, material…)</summary>
        <textarea className="field mt-1 h-40 font-mono text-xs" value={json} aria-label="Preset JSON" onChange={(e) => {
          setJson(e.target.value);
          try { const v = JSON.parse(e.target.value); setJsonError(null); updateAttributes({ preset: v }); } catch { setJsonError("Not valid JSON yet; the last valid inputs are kept."); }
        }} />
        {jsonError && <p className="field-error">{jsonError}</p>}
      </details>
    </BlockFrame>
  );
}

type RecordingOption = { id: string; title: string; durationS: number | null };

function VideoMomentView({ node, updateAttributes, selected }: ReactNodeViewProps) {
  const a = node.attrs as { recordingId: string | null; start: number; end: number | null; caption: string };
  const [options, setOptions] = useState<RecordingOption[] | null>(null);
  const [available, setAvailable] = useState(true);
  useEffect(() => {
    fetch("/api/procedures/recordings").then((r) => r.json()).then((j: { available: boolean; results: RecordingOption[] }) => { setOptions(j.results); setAvailable(j.available); }).catch(() => setOptions([]));
  }, []);
  return (
    <BlockFrame label="Video moment" selected={selected}>
      <div className="grid gap-2 sm:grid-cols-[2fr_1fr_1fr]">
        <label><span className="text-xs text-graphite-soft">Recording</span>
          {options && options.length > 0 ? (
            <select className="field py-1" value={a.recordingId ?? ""} aria-label="Recording" onChange={(e) => updateAttributes({ recordingId: e.target.value || null })}>
              <option value="">Choose a ready recording…</option>
              {options.map((o) => <option key={o.id} value={o.id}>{o.title}</option>)}
            </select>
          ) : (
            <input className="field py-1 font-mono text-xs" value={a.recordingId ?? ""} aria-label="Recording id" placeholder="recording id" onChange={(e) => updateAttributes({ recordingId: e.target.value.trim() || null })} />
          )}
        </label>
        <label><span className="text-xs text-graphite-soft">Start (s)</span><input className="field num py-1" type="number" min={0} step="any" defaultValue={a.start} aria-label="Start seconds" onChange={(e) => updateAttributes({ start: Number(e.target.value) || 0 })} /></label>
        <label><span className="text-xs text-graphite-soft">End (s, optional)</span><input className="field num py-1" type="number" min={0} step="any" defaultValue={a.end ?? ""} aria-label="End seconds" onChange={(e) => updateAttributes({ end: numOrNull(e.target.value) })} /></label>
      </div>
      <label className="mt-2 block"><span className="text-xs text-graphite-soft">Caption</span><input className="field py-1" value={a.caption} onChange={(e) => updateAttributes({ caption: e.target.value })} placeholder="What to watch for at this moment" /></label>
      {options && options.length === 0 && <p className="mt-1 text-xs text-graphite-soft">{available ? "No ready recordings match yet; paste a recording's id." : "Recordings are not set up yet; paste a recording's id."}</p>}
      {!a.recordingId && <p className="mt-1 text-xs text-brass">Choose the recording.</p>}
    </BlockFrame>
  );
}

function ProcedureLinkView({ node }: ReactNodeViewProps) {
  const { titles } = useEditorShared();
  const t = titles[node.attrs.procedureId as string];
  return (
    <NodeViewWrapper as="span" className="rounded bg-teal-soft px-1 font-sans text-[0.95em] font-semibold text-teal" data-testid="procedure-link-chip">
      → {t?.title ?? "linked procedure"}
    </NodeViewWrapper>
  );
}

function CautionView() {
  return (
    <NodeViewWrapper className="my-3 rounded-md border border-brass border-l-[6px] bg-brass-soft px-4 py-2">
      <p className="caution-title" contentEditable={false}>Caution</p>
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
