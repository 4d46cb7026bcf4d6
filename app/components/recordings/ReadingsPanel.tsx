import { useEffect, useMemo, useRef, useState } from "react";
import { Link, useFetcher, useFetchers } from "react-router";
import { isUnitCode, toSI } from "~/lib/calc";
import { formatMeasured, formatNumber } from "~/lib/calc-ui/units";
import {
  DEPTH_UNITS,
  POSITION_FIELD_WORDS,
  boreCylinders,
  depthEntered,
  labelPlaceholder,
  positionFieldsFor,
  positionText,
  type DepthUnit,
  type PositionField,
} from "~/lib/recordings/positions";
import { QUANTITIES, displayUnit, quantityDef, toStoredSI, unitsFor } from "~/lib/recordings/quantities";
import { formatTime } from "~/lib/time-format";
import { guessedDecimals, typedDecimals, typedText } from "~/lib/typed-number";
import { issuesByPath, type ReadingRow } from "./types";
import { useLandingTarget } from "~/components/search/LandingTarget";

type SortKey = "t" | "quantity" | "where" | "value" | "pass";

export function useOptimisticReadings(recordingId: string, readings: ReadingRow[]): ReadingRow[] {
  const fetchers = useFetchers();
  return useMemo(() => {
    const base = `/api/recordings/${recordingId}/readings`;
    let list = [...readings];
    for (const f of fetchers) {
      if (!f.formAction?.startsWith(base)) continue;
      const json = f.json as Record<string, unknown> | undefined;
      if (f.formMethod === "POST" && f.formAction === base && json) {
        const items = (Array.isArray(json.readings) ? json.readings : [json]) as GridValue[];
        items.forEach((r, i) => list.push(pendingRow(`pending-${f.key}-${i}`, r)));
      } else if (f.formMethod === "DELETE") {
        list = list.filter((r) => `${base}/${r.id}` !== f.formAction);
      } else if (f.formMethod === "PATCH" && json) {
        list = list.map((r) =>
          `${base}/${r.id}` === f.formAction
            ? { ...pendingRow(r.id, json as GridValue), authorName: r.authorName, createdBy: r.createdBy }
            : r,
        );
      }
    }
    return list;
  }, [fetchers, readings, recordingId]);
}

type GridValue = ReturnType<typeof draftToBody>;

function pendingRow(id: string, r: GridValue): ReadingRow {
  const value = Number(r.value);
  const num = (x: unknown) => (typeof x === "number" && Number.isFinite(x) ? x : null);
  const depth = r.depth && typeof r.depth === "object" && Number.isFinite(r.depth.value) ? r.depth : null;
  return {
    id,
    quantity: r.quantity,
    label: r.label ?? "",
    valueEntered: value,
    valueDecimals: r.valueDecimals ?? null,
    unitEntered: r.unit,
    valueSi: Number.isFinite(value) ? toStoredSI(r.quantity, value, r.unit) : 0,
    conditions: r.conditions ?? {},
    fastener: num(r.fastener),
    cylinder: num(r.cylinder),
    journal: num(r.journal),
    depthM: depth ? toSI(depth.value, depth.unit) : null,
    depthUnit: depth ? depth.unit : null,
    angleDeg: num(r.angle),
    t: r.t ?? null,
    createdBy: null,
    authorName: "you",
    pending: true,
  };
}

/** A reading at the resolution it was typed in (88.010 stays 88.010), in its own unit. */
function fmtValue(r: Pick<ReadingRow, "valueEntered" | "valueDecimals" | "unitEntered">) {
  const decimals = r.valueDecimals ?? guessedDecimals(r.valueEntered);
  return isUnitCode(r.unitEntered)
    ? formatMeasured(r.valueEntered, r.unitEntered, r.unitEntered, 0, decimals)
    : formatNumber(r.valueEntered, decimals);
}

type Draft = {
  t: string;
  quantity: string;
  value: string;
  unit: string;
  label: string;
  fastener: string;
  cylinder: string;
  journal: string;
  depth: string;
  depthUnit: DepthUnit;
  angle: string;
  pass: string;
  lube: string;
  tool: string;
};
const emptyDraft = (prev?: Draft): Draft => ({
  t: "",
  quantity: prev?.quantity ?? "torque",
  value: "",
  unit: prev?.unit ?? "N.m",
  label: "",
  fastener: "",
  cylinder: prev?.cylinder ?? "",
  journal: "",
  depth: "",
  depthUnit: prev?.depthUnit ?? "mm",
  angle: "",
  pass: prev?.pass ?? "",
  lube: prev?.lube ?? "",
  tool: prev?.tool ?? "",
});

function draftOf(r: ReadingRow): Draft {
  const depth = depthEntered(r);
  const str = (x: number | null) => (x == null ? "" : String(x));
  return {
    t: r.t != null ? String(r.t) : "",
    quantity: r.quantity,
    value: typedText(r.valueEntered, r.valueDecimals),
    unit: r.unitEntered,
    label: r.label,
    fastener: str(r.fastener),
    cylinder: str(r.cylinder),
    journal: str(r.journal),
    depth: depth ? String(depth.value) : "",
    depthUnit: depth?.unit ?? "mm",
    angle: r.angleDeg != null ? String(r.angleDeg) : "",
    pass: r.conditions?.pass ?? "",
    lube: r.conditions?.lube ?? "",
    tool: r.conditions?.tool ?? "",
  };
}

/** A typed number, or the text itself when it is not one, so the API names the field's problem. */
function typedNumber(s: string): number | string | null {
  const t = s.trim();
  if (t === "") return null;
  const n = Number(t.replace(",", "."));
  return Number.isFinite(n) ? n : t;
}

function draftToBody(d: Draft) {
  const t = d.t.trim() === "" ? null : Number(d.t);
  const fits = positionFieldsFor(d.quantity);
  const pick = (f: PositionField, v: string) => (fits.includes(f) ? typedNumber(v) : null);
  const depth = pick("depth", d.depth);
  return {
    quantity: d.quantity,
    value: d.value.trim() === "" ? Number.NaN : Number(d.value.replace(",", ".")),
    // The number loses its trailing zeros on the way: the decimals typed travel beside it.
    valueDecimals: typedDecimals(d.value),
    unit: d.unit,
    label: d.label,
    fastener: pick("fastener", d.fastener),
    cylinder: pick("cylinder", d.cylinder),
    journal: pick("journal", d.journal),
    depth: depth == null ? null : { value: depth as number, unit: d.depthUnit },
    angle: pick("angle", d.angle),
    t: t != null && Number.isFinite(t) ? t : t == null ? null : Number.NaN,
    conditions: { pass: d.pass || undefined, lube: d.lube || undefined, tool: d.tool || undefined },
  };
}

/** The fields of a draft the API's issues can name (readings.<k>.<field> or <field>). */
const FIELDS = [
  "t",
  "quantity",
  "value",
  "unit",
  "label",
  "fastener",
  "cylinder",
  "journal",
  "depth",
  "depth.value",
  "depth.unit",
  "angle",
  "conditions.pass",
] as const;

export function ReadingsPanel({
  recordingId,
  readings,
  currentTime,
  canCreate,
  canEdit,
}: {
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
        case "t":
          return r.t ?? Number.POSITIVE_INFINITY;
        case "quantity":
          return quantityDef(r.quantity)?.label ?? r.quantity;
        case "where":
          return whereSortKey(r);
        case "value":
          return r.valueSi;
        case "pass":
          return r.conditions?.pass ?? "";
      }
    };
    return [...readings].sort((a, b) => {
      const x = val(a);
      const y = val(b);
      return (x < y ? -1 : x > y ? 1 : 0) * sort.dir;
    });
  }, [readings, sort]);
  const cylinders = useMemo(() => boreCylinders(readings.filter((r) => !r.pending)), [readings]);

  const header = (key: SortKey, label: string, className = "") => (
    <th className={`px-3 py-2 ${className}`} aria-sort={sort.key === key ? (sort.dir === 1 ? "ascending" : "descending") : "none"}>
      <button
        type="button"
        className="font-semibold uppercase tracking-wide hover:text-graphite"
        onClick={() => setSort((s) => ({ key, dir: s.key === key ? (-s.dir as 1 | -1) : 1 }))}
      >
        {label}
        {sort.key === key ? (sort.dir === 1 ? " ↑" : " ↓") : ""}
      </button>
    </th>
  );

  return (
    <section className="card p-0" aria-labelledby="readings-h">
      <div className="flex flex-wrap items-center justify-between gap-2 border-b border-rule px-4 py-3">
        <h2 id="readings-h" className="text-lg">
          Readings <span className="num text-sm font-normal text-graphite-soft">({readings.length})</span>
        </h2>
        <div className="flex flex-wrap items-center gap-2">
          {cylinders.map((c) => (
            <Link
              key={c}
              className="btn py-1 text-xs no-underline"
              to={`/calculators/distortion?recording=${recordingId}&cylinder=${c}`}
              data-testid="open-distortion"
            >
              Open cyl {c} in Bore distortion
            </Link>
          ))}
          <a
            className="btn py-1 text-xs no-underline"
            href={`/api/recordings/${recordingId}/readings?format=csv`}
            download
            data-testid="readings-csv"
          >
            Export CSV
          </a>
        </div>
      </div>
      {readings.length === 0 ? (
        <p className="px-4 py-5 text-sm text-graphite-soft">
          No readings yet.
          {canCreate && " Type the numbers read off the gauges below, with where each was taken; each can carry the time in the video."}
        </p>
      ) : (
        <table className="num w-full text-left text-sm" data-testid="readings-table">
          <thead className="border-b border-rule bg-paper-deep/60 text-xs text-graphite-soft">
            <tr>
              {header("t", "Time")}
              {header("quantity", "Quantity")}
              {header("where", "Where")}
              {header("value", "Value", "text-right")}
              {header("pass", "Pass, lube, tool")}
              <th className="px-3 py-2">
                <span className="sr-only">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {sorted.map((r) =>
              editing === r.id ? (
                <EditRow key={r.id} recordingId={recordingId} reading={r} onDone={() => setEditing(null)} />
              ) : (
                <ReadingLine
                  key={r.id}
                  recordingId={recordingId}
                  reading={r}
                  canEdit={!r.pending && canEdit(r)}
                  onEdit={() => setEditing(r.id)}
                />
              ),
            )}
          </tbody>
        </table>
      )}
      {canCreate && <AddGrid recordingId={recordingId} currentTime={currentTime} />}
    </section>
  );
}

/** Sorts by place: stud, cylinder, journal, then depth and angle, then the label. */
function whereSortKey(r: ReadingRow): string {
  const n = (x: number | null, w = 4) => (x == null ? "~".repeat(w) : String(Math.round(x * 1000)).padStart(w + 3, "0"));
  return [
    n(r.fastener),
    n(r.cylinder),
    n(r.journal),
    n(r.depthM != null ? r.depthM * 1000 : null),
    n(r.angleDeg),
    r.label.toLowerCase(),
  ].join("|");
}

function ReadingLine({
  recordingId,
  reading: r,
  canEdit,
  onEdit,
}: {
  recordingId: string;
  reading: ReadingRow;
  canEdit: boolean;
  onEdit: () => void;
}) {
  const del = useFetcher({ key: `reading-del-${r.id}` });
  const where = positionText(r);
  const conditions = [r.conditions?.pass ? `pass ${r.conditions.pass}` : "", r.conditions?.lube, r.conditions?.tool]
    .filter(Boolean)
    .join(" · ");
  return (
    <tr
      id={`reading-${r.id}`}
      className={`border-b border-rule/70 align-top last:border-0 ${r.pending ? "opacity-60" : ""}`}
      data-testid="reading-row"
    >
      <td className="px-3 py-2 font-mono">{r.t != null ? formatTime(r.t) : "–"}</td>
      <td className="px-3 py-2">{quantityDef(r.quantity)?.label ?? r.quantity}</td>
      <td className="px-3 py-2" data-testid="reading-where">
        {where && <span className="whitespace-nowrap">{where}</span>}
        {where && r.label && <br />}
        {r.label && <span className="text-graphite-soft">{r.label}</span>}
        {!where && !r.label && <span className="text-graphite-soft">–</span>}
      </td>
      <td className="whitespace-nowrap px-3 py-2 text-right font-semibold">
        {fmtValue(r)} {displayUnit(r.unitEntered)}
      </td>
      <td className="px-3 py-2 text-graphite-soft">{conditions || "–"}</td>
      <td className="whitespace-nowrap px-3 py-2 text-right text-xs">
        {canEdit && (
          <>
            <button type="button" className="font-semibold text-teal hover:underline" onClick={onEdit}>
              Edit
            </button>
            <button
              type="button"
              className="ml-3 font-semibold text-spec-red hover:underline"
              onClick={() => {
                if (confirm("Delete this reading?"))
                  del.submit(null, { method: "DELETE", action: `/api/recordings/${recordingId}/readings/${r.id}` });
              }}
            >
              Delete
            </button>
          </>
        )}
      </td>
    </tr>
  );
}

function UnitSelect({
  quantity,
  value,
  onChange,
  id,
  invalid,
  label,
}: {
  quantity: string;
  value: string;
  onChange: (u: string) => void;
  id: string;
  invalid?: boolean;
  label: string;
}) {
  const units = unitsFor(quantity);
  if (quantity === "other")
    return (
      <input
        id={id}
        aria-label={label}
        className="field w-20 py-1 text-sm"
        value={value}
        onChange={(e) => onChange(e.target.value)}
        placeholder="rpm"
        aria-invalid={invalid || undefined}
      />
    );
  return (
    <select
      id={id}
      aria-label={label}
      className="field w-auto min-w-[4.5rem] py-1 text-sm"
      value={units.includes(value) ? value : ""}
      onChange={(e) => onChange(e.target.value)}
      aria-invalid={invalid || undefined}
    >
      {!units.includes(value) && <option value="">Unit…</option>}
      {units.map((u) => (
        <option key={u} value={u}>
          {displayUnit(u)}
        </option>
      ))}
    </select>
  );
}

/** A small labelled field of a reading line; the label sits above so a line can wrap on a tablet. */
function Cell({
  label,
  htmlFor,
  children,
  className = "",
}: {
  label: string;
  htmlFor?: string;
  children: React.ReactNode;
  className?: string;
}) {
  return (
    <div className={`flex flex-col ${className}`}>
      <label htmlFor={htmlFor} className="mb-0.5 text-xs font-semibold text-graphite-soft">
        {label}
      </label>
      {children}
    </div>
  );
}

const FIELD_WIDTH: Record<PositionField, string> = { fastener: "w-16", cylinder: "w-16", journal: "w-16", depth: "w-20", angle: "w-16" };

/**
 * One reading's fields: what and how much on the first line, where it was taken (the fields
 * that fit the quantity) and the label on the next, then pass, lube and tool. Lines wrap, so
 * nothing is hidden at 768 px.
 */
function LineFields({
  id,
  name,
  d,
  set,
  error,
  currentTime,
}: {
  id: string;
  name: string;
  d: Draft;
  set: (p: Partial<Draft>) => void;
  error: (field: string) => string | undefined;
  currentTime?: () => number;
}) {
  const fits = positionFieldsFor(d.quantity);
  const invalid = (...f: string[]) => (f.some((x) => error(x)) ? true : undefined);
  return (
    <div className="flex flex-wrap items-end gap-x-3 gap-y-2">
      <div className="flex flex-wrap items-end gap-x-3 gap-y-2">
        <Cell label="Time (s)" htmlFor={`${id}-t`}>
          <div className="flex gap-1">
            <input
              id={`${id}-t`}
              aria-label={`${name} time in seconds`}
              className="field w-20 py-1 font-mono text-sm"
              value={d.t}
              onChange={(e) => set({ t: e.target.value })}
              aria-invalid={invalid("t")}
            />
            {currentTime && (
              <button
                type="button"
                className="btn px-2 py-1 text-xs"
                title="Use the player's current time"
                aria-label={`${name}: use current time`}
                onClick={() => set({ t: currentTime().toFixed(2) })}
              >
                now
              </button>
            )}
          </div>
        </Cell>
        <Cell label="Quantity" htmlFor={`${id}-q`}>
          <select
            id={`${id}-q`}
            aria-label={`${name} quantity`}
            className="field w-auto py-1 text-sm"
            value={d.quantity}
            onChange={(e) => set({ quantity: e.target.value, unit: quantityDef(e.target.value)?.defaultUnit ?? "" })}
          >
            {QUANTITIES.map((q) => (
              <option key={q.id} value={q.id}>
                {q.label}
              </option>
            ))}
          </select>
        </Cell>
        <Cell label="Value" htmlFor={`${id}-v`}>
          <div className="flex gap-1">
            <input
              id={`${id}-v`}
              aria-label={`${name} value`}
              inputMode="decimal"
              className="field w-24 py-1 text-right text-sm"
              value={d.value}
              onChange={(e) => set({ value: e.target.value })}
              aria-invalid={invalid("value")}
            />
            <UnitSelect
              id={`${id}-u`}
              label={`${name} unit`}
              quantity={d.quantity}
              value={d.unit}
              onChange={(unit) => set({ unit })}
              invalid={Boolean(error("unit"))}
            />
          </div>
        </Cell>
      </div>
      <div className="flex flex-wrap items-end gap-x-3 gap-y-2" data-testid="position-fields">
        {fits.map((f) => {
          const ui = { ...POSITION_FIELD_WORDS[f], width: FIELD_WIDTH[f] };
          const value = d[f];
          return (
            <Cell key={f} label={ui.label} htmlFor={`${id}-${f}`}>
              <div className="flex gap-1">
                <input
                  id={`${id}-${f}`}
                  aria-label={`${name} ${ui.label.toLowerCase()}`}
                  inputMode={f === "depth" || f === "angle" ? "decimal" : "numeric"}
                  className={`field ${ui.width} py-1 text-right text-sm`}
                  placeholder={ui.placeholder}
                  value={value}
                  onChange={(e) => set({ [f]: e.target.value } as Partial<Draft>)}
                  aria-invalid={invalid(f, `${f}.value`)}
                />
                {f === "depth" && (
                  <select
                    aria-label={`${name} depth unit`}
                    className="field w-auto py-1 text-sm"
                    value={d.depthUnit}
                    onChange={(e) => set({ depthUnit: e.target.value as DepthUnit })}
                  >
                    {DEPTH_UNITS.map((u) => (
                      <option key={u} value={u}>
                        {displayUnit(u)}
                      </option>
                    ))}
                  </select>
                )}
              </div>
            </Cell>
          );
        })}
        <Cell label="Label" htmlFor={`${id}-l`}>
          <input
            id={`${id}-l`}
            aria-label={`${name} label`}
            className="field w-40 py-1 text-sm"
            value={d.label}
            placeholder={labelPlaceholder(d.quantity)}
            onChange={(e) => set({ label: e.target.value })}
            aria-invalid={invalid("label")}
          />
        </Cell>
      </div>
      <div className="flex flex-wrap items-end gap-x-3 gap-y-2">
        <Cell label="Pass" htmlFor={`${id}-p`}>
          <input
            id={`${id}-p`}
            aria-label={`${name} pass`}
            className="field w-14 py-1 text-sm"
            value={d.pass}
            onChange={(e) => set({ pass: e.target.value })}
            aria-invalid={invalid("conditions.pass")}
          />
        </Cell>
        <Cell label="Lube" htmlFor={`${id}-lube`}>
          <input
            id={`${id}-lube`}
            aria-label={`${name} lube`}
            className="field w-24 py-1 text-sm"
            value={d.lube}
            placeholder={d.quantity === "torque" || d.quantity === "clamp-load" ? "moly" : ""}
            onChange={(e) => set({ lube: e.target.value })}
          />
        </Cell>
        <Cell label="Tool" htmlFor={`${id}-tool`}>
          <input
            id={`${id}-tool`}
            aria-label={`${name} tool`}
            className="field w-32 py-1 text-sm"
            value={d.tool}
            placeholder={TOOL_PLACEHOLDER[d.quantity] ?? ""}
            onChange={(e) => set({ tool: e.target.value })}
          />
        </Cell>
      </div>
    </div>
  );
}

const TOOL_PLACEHOLDER: Record<string, string> = {
  torque: "click wrench #3",
  "clamp-load": "load cell",
  "bore-diameter": "bore gauge",
  "out-of-round": "bore gauge",
  clearance: "Plastigage",
  "ring-gap": "feeler gauge",
  "leak-down": "leak-down tester",
  temperature: "thermocouple",
  length: "depth mic",
};

function EditRow({ recordingId, reading: r, onDone }: { recordingId: string; reading: ReadingRow; onDone: () => void }) {
  const fetcher = useFetcher({ key: `reading-edit-${r.id}` });
  const [d, setD] = useState<Draft>(() => draftOf(r));
  const submitted = useRef(false);
  const errors = fetcher.state === "idle" ? issuesByPath(fetcher.data) : {};
  useEffect(() => {
    if (submitted.current && fetcher.state === "idle" && fetcher.data && !(fetcher.data as { issues?: unknown }).issues) onDone();
  }, [fetcher.state, fetcher.data, onDone]);
  const save = () => {
    submitted.current = true;
    const body = draftToBody(d);
    fetcher.submit({ ...body, conditions: { ...r.conditions, ...body.conditions } } as never, {
      method: "PATCH",
      action: `/api/recordings/${recordingId}/readings/${r.id}`,
      encType: "application/json",
    });
  };
  const messages = [...new Set(Object.values(errors))];
  return (
    <tr
      className="border-b border-rule/70 bg-paper/60"
      onKeyDown={(e) => {
        if (e.key === "Enter") {
          e.preventDefault();
          save();
        }
        if (e.key === "Escape") onDone();
      }}
    >
      <td colSpan={6} className="px-3 py-3">
        <LineFields id={`edit-${r.id}`} name="Reading" d={d} set={(p) => setD((x) => ({ ...x, ...p }))} error={(f) => errors[f]} />
        {messages.length > 0 && (
          <p className="field-error" role="alert">
            {messages.join(" ")}
          </p>
        )}
        <div className="mt-2 flex gap-2">
          <button type="button" className="btn btn-primary py-1 text-sm" onClick={save}>
            Save
          </button>
          <button type="button" className="btn py-1 text-sm" onClick={onDone}>
            Cancel
          </button>
        </div>
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
  // A line is a reading once something of its own is typed; the cylinder, quantity and pass a
  // saved line keeps for the next reading do not make it one.
  const filled = rows
    .map((r, i) => ({ r, i }))
    .filter(({ r }) => [r.value, r.label, r.fastener, r.journal, r.depth, r.angle].some((x) => x.trim() !== ""));

  useEffect(() => {
    if (sent && fetcher.state === "idle" && fetcher.data && !(fetcher.data as { issues?: unknown }).issues) {
      // Each saved line is emptied for the next reading but keeps what the person chose on it
      // (quantity, unit, cylinder, pass, lube, tool); lines not sent stay exactly as they were.
      setRows((rs) => rs.map((r, i) => (sent.includes(i) ? emptyDraft(r) : r)));
      setSent(null);
      setBatch((b) => b + 1);
    }
  }, [fetcher.state, fetcher.data, sent]);

  const set = (i: number, p: Partial<Draft>) => setRows((rs) => rs.map((r, j) => (j === i ? { ...r, ...p } : r)));
  const save = () => {
    if (!filled.length) return;
    setSent(filled.map((f) => f.i));
    fetcher.submit({ readings: filled.map(({ r }) => draftToBody(r)) } as never, {
      method: "POST",
      action: `/api/recordings/${recordingId}/readings`,
      encType: "application/json",
    });
  };
  // Map "readings.<k>.<field>" back to the grid line and field.
  const cellError = (i: number, field: string) => {
    const k = sent ? sent.indexOf(i) : filled.findIndex((f) => f.i === i);
    return k >= 0 ? errors[`readings.${k}.${field}`] : undefined;
  };
  const rowErrors = (i: number) => [...new Set(FIELDS.map((f) => cellError(i, f)).filter(Boolean) as string[])];

  return (
    <section className="border-t border-rule px-4 py-4" aria-labelledby="add-readings-h">
      <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <h3 id="add-readings-h" className="text-base">
          Add readings
        </h3>
        <p className="text-xs text-graphite-soft">
          One reading per line; empty lines are skipped. Values are stored in SI with the unit you typed kept for display.
        </p>
      </div>
      <ol className="space-y-2" data-testid="readings-grid">
        {rows.map((r, i) => {
          const errs = rowErrors(i);
          return (
            <li
              key={i}
              className="rounded-md border border-rule/80 bg-paper/40 px-3 py-2"
              data-testid="grid-row"
              aria-label={`Line ${i + 1}`}
            >
              <LineFields
                id={`line-${i}`}
                name={`Line ${i + 1}`}
                d={r}
                set={(p) => set(i, p)}
                error={(f) => cellError(i, f)}
                currentTime={currentTime}
              />
              {errs.length > 0 && (
                <p className="field-error text-xs" role="alert">
                  {errs.join(" ")}
                </p>
              )}
            </li>
          );
        })}
      </ol>
      {errors.form && (
        <p className="field-error" role="alert">
          {errors.form}
        </p>
      )}
      {errors.readings && (
        <p className="field-error" role="alert">
          {errors.readings}
        </p>
      )}
      <div className="mt-2 flex flex-wrap gap-2">
        <button
          type="button"
          className="btn btn-primary py-1.5 text-sm"
          onClick={save}
          disabled={!filled.length || fetcher.state !== "idle"}
          data-testid="save-readings"
        >
          {fetcher.state !== "idle"
            ? "Saving…"
            : `Save ${filled.length || ""} ${filled.length === 1 ? "reading" : "readings"}`.replace("  ", " ")}
        </button>
        <button type="button" className="btn py-1.5 text-sm" onClick={() => setRows((rs) => [...rs, emptyDraft(rs[rs.length - 1])])}>
          Add a line
        </button>
      </div>
    </section>
  );
}
