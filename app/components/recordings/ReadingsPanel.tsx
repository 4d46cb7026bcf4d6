import { useEffect, useMemo, useRef, useState } from "react";
import { useFetcher, useFetchers } from "react-router";
import { QUANTITIES, displayUnit, formatTime, quantityDef, toStoredSI, unitsFor } from "~/lib/recordings/rules";
import { issuesByPath, type ReadingRow } from "./types";
import { useLandingTarget } from "~/components/search/LandingTarget";

type SortKey = "t" | "quantity" | "label" | "value" | "pass";

export function useOptimisticReadings(recordingId: string, readings: ReadingRow[]): ReadingRow[] {
  const fetchers = useFetchers();
  return useMemo(() => {
    const base = `/api/recordings/${recordingId}/readings`;
    let list = [...readings];
    for (const f of fetchers) {
      if (!f.formAction || !f.formAction.startsWith(base)) continue;
      const json = f.json as Record<string, unknown> | undefined;
      if (f.formMethod === "POST" && f.formAction === base && json) {
        const items = (Array.isArray(json.readings) ? json.readings : [json]) as GridValue[];
        items.forEach((r, i) => list.push(pendingRow(`pending-${f.key}-${i}`, r)));
      } else if (f.formMethod === "DELETE") {
        list = list.filter((r) => `${base}/${r.id}` !== f.formAction);
      } else if (f.formMethod === "PATCH" && json) {
        list = list.map((r) => (`${base}/${r.id}` === f.formAction ? { ...pendingRow(r.id, json as GridValue), authorName: r.authorName, createdBy: r.createdBy } : r));
      }
    }
    return list;
  }, [fetchers, readings, recordingId]);
}

type GridValue = { quantity: string; value: number; unit: string; label: string; t: number | null; conditions: { pass?: string; lube?: string; tool?: string } };

function pendingRow(id: string, r: GridValue): ReadingRow {
  const value = Number(r.value);
  return { id, quantity: r.quantity, label: r.label ?? "", valueEntered: value, unitEntered: r.unit, valueSi: Number.isFinite(value) ? toStoredSI(r.quantity, value, r.unit) : 0, conditions: r.conditions ?? {}, t: r.t ?? null, createdBy: null, authorName: "you", pending: true };
}

function fmtValue(v: number) {
  return Number(v.toPrecision(6)).toString();
}

type Draft = { t: string; quantity: string; value: string; unit: string; label: string; pass: string; lube: string; tool: string };
const emptyDraft = (prev?: Draft): Draft => ({ t: "", quantity: prev?.quantity ?? "torque", value: "", unit: prev?.unit ?? "N.m", label: "", pass: prev?.pass ?? "", lube: prev?.lube ?? "", tool: prev?.tool ?? "" });

function draftToBody(d: Draft) {
  const t = d.t.trim() === "" ? null : Number(d.t);
  return {
    quantity: d.quantity,
    value: d.value.trim() === "" ? Number.NaN : Number(d.value.replace(",", ".")),
    unit: d.unit,
    label: d.label,
    t: t != null && Number.isFinite(t) ? t : t == null ? null : Number.NaN,
    conditions: { pass: d.pass || undefined, lube: d.lube || undefined, tool: d.tool || undefined },
  };
}

export function ReadingsPanel({ recordingId, readings, currentTime, canCreate, canEdit }: {
  recordingId: string;
  readings: ReadingRow[];
  currentTime: () => number;
  canCreate: boolean;
  canEdit: (r: ReadingRow) => boolean;
}) {
  useLandingTarget(); // a search hit's `#reading-…` scrolls to the reading's row and marks it
  const [sort, setSort] = useState<{ key: SortKey; dir: 1 | -1 }>({ key: "t", dir: 1 });
  const [editing, setEditing] = useState<string | null>(null);
  const sorted = useMemo(() => {
    const val = (r: ReadingRow): string | number => {
      switch (sort.key) {
        case "t": return r.t ?? Number.POSITIVE_INFINITY;
        case "quantity": return quantityDef(r.quantity)?.label ?? r.quantity;
        case "label": return r.label.toLowerCase();
        case "value": return r.valueSi;
        case "pass": return r.conditions?.pass ?? "";
      }
    };
    return [...readings].sort((a, b) => {
      const x = val(a);
      const y = val(b);
      return (x < y ? -1 : x > y ? 1 : 0) * sort.dir;
    });
  }, [readings, sort]);

  const header = (key: SortKey, label: string, className = "") => (
    <th className={`px-3 py-2 ${className}`} aria-sort={sort.key === key ? (sort.dir === 1 ? "ascending" : "descending") : "none"}>
      <button type="button" className="font-semibold uppercase tracking-wide hover:text-graphite" onClick={() => setSort((s) => ({ key, dir: s.key === key ? ((-s.dir) as 1 | -1) : 1 }))}>
        {label}{sort.key === key ? (sort.dir === 1 ? " ↑" : " ↓") : ""}
      </button>
    </th>
  );

  return (
    <section className="card p-0" aria-labelledby="readings-h">
      <div className="flex flex-wrap items-center justify-between gap-2 border-b border-rule px-4 py-3">
        <h2 id="readings-h" className="text-lg">Readings <span className="num text-sm font-normal text-graphite-soft">({readings.length})</span></h2>
        <a className="btn py-1 text-xs no-underline" href={`/api/recordings/${recordingId}/readings?format=csv`} download data-testid="readings-csv">Export CSV</a>
      </div>
      {readings.length === 0 ? (
        <p className="px-4 py-5 text-sm text-graphite-soft">No readings yet.{canCreate && " Type the numbers read off the gauges below; each can carry the time in the video."}</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="num w-full text-left text-sm" data-testid="readings-table">
            <thead className="border-b border-rule bg-paper-deep/60 text-xs text-graphite-soft">
              <tr>
                {header("t", "Time")}
                {header("quantity", "Quantity")}
                {header("label", "Label")}
                {header("value", "Value", "text-right")}
                {header("pass", "Pass")}
                <th className="px-3 py-2 text-xs font-semibold uppercase tracking-wide">Lube / tool</th>
                <th className="px-3 py-2"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody>
              {sorted.map((r) =>
                editing === r.id ? (
                  <EditRow key={r.id} recordingId={recordingId} reading={r} onDone={() => setEditing(null)} />
                ) : (
                  <ReadingLine key={r.id} recordingId={recordingId} reading={r} canEdit={!r.pending && canEdit(r)} onEdit={() => setEditing(r.id)} />
                ),
              )}
            </tbody>
          </table>
        </div>
      )}
      {canCreate && <AddGrid recordingId={recordingId} currentTime={currentTime} />}
    </section>
  );
}

function ReadingLine({ recordingId, reading: r, canEdit, onEdit }: { recordingId: string; reading: ReadingRow; canEdit: boolean; onEdit: () => void }) {
  const del = useFetcher({ key: `reading-del-${r.id}` });
  return (
    <tr id={`reading-${r.id}`} className={`border-b border-rule/70 last:border-0 ${r.pending ? "opacity-60" : ""}`} data-testid="reading-row">
      <td className="px-3 py-2 font-mono">{r.t != null ? formatTime(r.t) : "–"}</td>
      <td className="px-3 py-2">{quantityDef(r.quantity)?.label ?? r.quantity}</td>
      <td className="px-3 py-2">{r.label || <span className="text-graphite-soft">–</span>}</td>
      <td className="px-3 py-2 text-right font-semibold">{fmtValue(r.valueEntered)} {displayUnit(r.unitEntered)}</td>
      <td className="px-3 py-2">{r.conditions?.pass || "–"}</td>
      <td className="px-3 py-2 text-graphite-soft">{[r.conditions?.lube, r.conditions?.tool].filter(Boolean).join(" · ") || "–"}</td>
      <td className="whitespace-nowrap px-3 py-2 text-right text-xs">
        {canEdit && (
          <>
            <button type="button" className="font-semibold text-teal hover:underline" onClick={onEdit}>Edit</button>
            <button type="button" className="ml-3 font-semibold text-spec-red hover:underline" onClick={() => { if (confirm("Delete this reading?")) del.submit(null, { method: "DELETE", action: `/api/recordings/${recordingId}/readings/${r.id}` }); }}>Delete</button>
          </>
        )}
      </td>
    </tr>
  );
}

function UnitSelect({ quantity, value, onChange, id, invalid }: { quantity: string; value: string; onChange: (u: string) => void; id: string; invalid?: boolean }) {
  const units = unitsFor(quantity);
  if (quantity === "other") return <input id={id} className="field min-w-[5.5rem] py-1 text-sm" value={value} onChange={(e) => onChange(e.target.value)} placeholder="rpm" aria-invalid={invalid || undefined} />;
  return (
    <select id={id} className="field min-w-[5.5rem] py-1 text-sm" value={units.includes(value) ? value : ""} onChange={(e) => onChange(e.target.value)} aria-invalid={invalid || undefined}>
      {!units.includes(value) && <option value="">Unit…</option>}
      {units.map((u) => <option key={u} value={u}>{displayUnit(u)}</option>)}
    </select>
  );
}

function EditRow({ recordingId, reading: r, onDone }: { recordingId: string; reading: ReadingRow; onDone: () => void }) {
  const fetcher = useFetcher({ key: `reading-edit-${r.id}` });
  const [d, setD] = useState<Draft>({ t: r.t != null ? String(r.t) : "", quantity: r.quantity, value: String(r.valueEntered), unit: r.unitEntered, label: r.label, pass: r.conditions?.pass ?? "", lube: r.conditions?.lube ?? "", tool: r.conditions?.tool ?? "" });
  const submitted = useRef(false);
  const errors = fetcher.state === "idle" ? issuesByPath(fetcher.data) : {};
  useEffect(() => {
    if (submitted.current && fetcher.state === "idle" && fetcher.data && !(fetcher.data as { issues?: unknown }).issues) onDone();
  }, [fetcher.state, fetcher.data, onDone]);
  const save = () => {
    submitted.current = true;
    const body = draftToBody(d);
    fetcher.submit({ ...body, conditions: { ...r.conditions, pass: d.pass || undefined, lube: d.lube || undefined, tool: d.tool || undefined } } as never, { method: "PATCH", action: `/api/recordings/${recordingId}/readings/${r.id}`, encType: "application/json" });
  };
  const err = Object.values(errors)[0];
  return (
    <tr className="border-b border-rule/70 bg-paper/60" onKeyDown={(e) => { if (e.key === "Enter") { e.preventDefault(); save(); } if (e.key === "Escape") onDone(); }}>
      <td className="px-2 py-2"><input aria-label="Time (s)" className="field w-20 py-1 font-mono text-sm" value={d.t} onChange={(e) => setD({ ...d, t: e.target.value })} /></td>
      <td className="px-2 py-2">
        <select aria-label="Quantity" className="field py-1 text-sm" value={d.quantity} onChange={(e) => setD({ ...d, quantity: e.target.value, unit: quantityDef(e.target.value)?.defaultUnit ?? "" })}>
          {QUANTITIES.map((q) => <option key={q.id} value={q.id}>{q.label}</option>)}
        </select>
      </td>
      <td className="px-2 py-2"><input aria-label="Label" className="field py-1 text-sm" value={d.label} onChange={(e) => setD({ ...d, label: e.target.value })} /></td>
      <td className="px-2 py-2">
        <div className="flex gap-1">
          <input aria-label="Value" inputMode="decimal" className="field w-24 py-1 text-right text-sm" value={d.value} onChange={(e) => setD({ ...d, value: e.target.value })} aria-invalid={errors.value ? true : undefined} />
          <UnitSelect id={`eu-${r.id}`} quantity={d.quantity} value={d.unit} onChange={(unit) => setD({ ...d, unit })} invalid={Boolean(errors.unit)} />
        </div>
        {err && <p className="field-error" role="alert">{err}</p>}
      </td>
      <td className="px-2 py-2"><input aria-label="Pass" className="field w-16 py-1 text-sm" value={d.pass} onChange={(e) => setD({ ...d, pass: e.target.value })} /></td>
      <td className="px-2 py-2">
        <div className="flex gap-1">
          <input aria-label="Lube" className="field w-24 py-1 text-sm" value={d.lube} onChange={(e) => setD({ ...d, lube: e.target.value })} />
          <input aria-label="Tool" className="field w-24 py-1 text-sm" value={d.tool} onChange={(e) => setD({ ...d, tool: e.target.value })} />
        </div>
      </td>
      <td className="whitespace-nowrap px-2 py-2 text-right">
        <button type="button" className="btn btn-primary py-1 text-xs" onClick={save}>Save</button>
        <button type="button" className="btn ml-1 py-1 text-xs" onClick={onDone}>Cancel</button>
      </td>
    </tr>
  );
}

/** The "add several" grid: one reading per line, empty lines are skipped, all saved in one request. */
function AddGrid({ recordingId, currentTime }: { recordingId: string; currentTime: () => number }) {
  const [rows, setRows] = useState<Draft[]>([emptyDraft(), emptyDraft(), emptyDraft()]);
  const [batch, setBatch] = useState(0);
  const fetcher = useFetcher({ key: `readings-add-${batch}` });
  const [sent, setSent] = useState<number[] | null>(null);
  const errors = fetcher.state === "idle" ? issuesByPath(fetcher.data) : {};
  const filled = rows.map((r, i) => ({ r, i })).filter(({ r }) => r.value.trim() !== "" || r.label.trim() !== "");

  useEffect(() => {
    if (sent && fetcher.state === "idle" && fetcher.data && !(fetcher.data as { issues?: unknown }).issues) {
      setRows((rs) => {
        const last = rs[rs.length - 1];
        return [emptyDraft(last), emptyDraft(last), emptyDraft(last)];
      });
      setSent(null);
      setBatch((b) => b + 1);
    }
  }, [fetcher.state, fetcher.data, sent]);

  const set = (i: number, p: Partial<Draft>) => setRows((rs) => rs.map((r, j) => (j === i ? { ...r, ...p } : r)));
  const save = () => {
    if (!filled.length) return;
    setSent(filled.map((f) => f.i));
    fetcher.submit({ readings: filled.map(({ r }) => draftToBody(r)) } as never, { method: "POST", action: `/api/recordings/${recordingId}/readings`, encType: "application/json" });
  };
  // Map "readings.<k>.<field>" back to the grid line and field.
  const cellError = (i: number, field: string) => {
    const k = sent ? sent.indexOf(i) : filled.findIndex((f) => f.i === i);
    return k >= 0 ? errors[`readings.${k}.${field}`] : undefined;
  };
  const rowErrors = (i: number) => ["value", "unit", "t", "quantity", "label"].map((f) => cellError(i, f)).filter(Boolean) as string[];

  return (
    <div className="border-t border-rule px-4 py-4" aria-labelledby="add-readings-h">
      <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <h3 id="add-readings-h" className="text-base">Add readings</h3>
        <p className="text-xs text-graphite-soft">One reading per line; empty lines are skipped. Values are stored in SI with the unit you typed kept for display.</p>
      </div>
      <div className="overflow-x-auto">
        <table className="num w-full min-w-[54rem] text-sm" data-testid="readings-grid">
          <thead className="text-left text-xs text-graphite-soft">
            <tr>
              <th className="pb-1 pr-2 font-semibold">Time (s)</th>
              <th className="pb-1 pr-2 font-semibold">Quantity</th>
              <th className="pb-1 pr-2 font-semibold">Value</th>
              <th className="pb-1 pr-2 font-semibold">Unit</th>
              <th className="pb-1 pr-2 font-semibold">Label</th>
              <th className="pb-1 pr-2 font-semibold">Pass</th>
              <th className="pb-1 pr-2 font-semibold">Lube</th>
              <th className="pb-1 pr-2 font-semibold">Tool</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r, i) => {
              const errs = rowErrors(i);
              return (
                <tr key={i} className="align-top" data-testid="grid-row">
                  <td className="pb-2 pr-2">
                    <div className="flex gap-1">
                      <input aria-label={`Line ${i + 1} time in seconds`} className="field w-20 py-1 font-mono text-sm" value={r.t} onChange={(e) => set(i, { t: e.target.value })} aria-invalid={cellError(i, "t") ? true : undefined} />
                      <button type="button" className="btn px-2 py-1 text-xs" title="Use the player's current time" aria-label={`Line ${i + 1}: use current time`} onClick={() => set(i, { t: currentTime().toFixed(2) })}>now</button>
                    </div>
                  </td>
                  <td className="pb-2 pr-2">
                    <select aria-label={`Line ${i + 1} quantity`} className="field py-1 text-sm" value={r.quantity} onChange={(e) => set(i, { quantity: e.target.value, unit: quantityDef(e.target.value)?.defaultUnit ?? "" })}>
                      {QUANTITIES.map((q) => <option key={q.id} value={q.id}>{q.label}</option>)}
                    </select>
                  </td>
                  <td className="pb-2 pr-2"><input aria-label={`Line ${i + 1} value`} inputMode="decimal" className="field w-24 py-1 text-right text-sm" value={r.value} onChange={(e) => set(i, { value: e.target.value })} aria-invalid={cellError(i, "value") ? true : undefined} /></td>
                  <td className="pb-2 pr-2"><UnitSelect id={`gu-${i}`} quantity={r.quantity} value={r.unit} onChange={(unit) => set(i, { unit })} invalid={Boolean(cellError(i, "unit"))} /></td>
                  <td className="pb-2 pr-2">
                    <input aria-label={`Line ${i + 1} label`} className="field py-1 text-sm" value={r.label} placeholder="stud 4" onChange={(e) => set(i, { label: e.target.value })} />
                    {errs.length > 0 && <p className="field-error text-xs" role="alert">{errs.join(" ")}</p>}
                  </td>
                  <td className="pb-2 pr-2"><input aria-label={`Line ${i + 1} pass`} className="field w-14 py-1 text-sm" value={r.pass} onChange={(e) => set(i, { pass: e.target.value })} /></td>
                  <td className="pb-2 pr-2"><input aria-label={`Line ${i + 1} lube`} className="field w-28 py-1 text-sm" value={r.lube} placeholder="moly" onChange={(e) => set(i, { lube: e.target.value })} /></td>
                  <td className="pb-2 pr-2"><input aria-label={`Line ${i + 1} tool`} className="field w-32 py-1 text-sm" value={r.tool} placeholder="click wrench #3" onChange={(e) => set(i, { tool: e.target.value })} /></td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {errors.form && <p className="field-error" role="alert">{errors.form}</p>}
      {errors.readings && <p className="field-error" role="alert">{errors.readings}</p>}
      <div className="mt-2 flex flex-wrap gap-2">
        <button type="button" className="btn btn-primary py-1.5 text-sm" onClick={save} disabled={!filled.length || fetcher.state !== "idle"} data-testid="save-readings">
          {fetcher.state !== "idle" ? "Saving…" : `Save ${filled.length || ""} ${filled.length === 1 ? "reading" : "readings"}`.replace("  ", " ")}
        </button>
        <button type="button" className="btn py-1.5 text-sm" onClick={() => setRows((rs) => [...rs, emptyDraft(rs[rs.length - 1])])}>Add a line</button>
      </div>
    </div>
  );
}
