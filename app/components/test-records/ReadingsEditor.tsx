import { useMemo, useState } from "react";
import { UNIT_OPTIONS, type UnitKind } from "~/lib/calc";
import {
  DEPTH_UNITS,
  POSITION_FIELD_WORDS,
  positionFieldsForSpec,
  positionText,
  type Position,
  type PositionField,
} from "~/lib/recordings/positions";
import { quantityDef } from "~/lib/recordings/quantities";
import { evaluateRecord, readingVerdict, type MissingPlace, type ReadingInput, type SpecLimits } from "~/lib/test-records/verdict";
import { placesText } from "~/lib/test-records/labels";
import { placeOf } from "~/lib/runs/entries";
import { PLACE_KEYS, placeFields, type PlaceKey } from "~/lib/test-records/form";
import { typedText } from "~/lib/typed-number";
import { ReadingVerdictTag, SpecVerdictTag, VerdictBadge } from "./parts";
import { limitsText, typedReadingText, unitText } from "./units";

export type EditorSpec = SpecLimits & { note: string };
type Row = { value: string; unit: string; note: string; src: string } & Record<PlaceKey, string>;
export type PullReading = {
  id: string;
  quantity: string;
  label: string;
  valueEntered: number;
  valueDecimals: number | null;
  unitEntered: string;
  t: number | null;
} & Partial<Position>;

const blankRow = (unit: string, keep?: Partial<Row>): Row => ({
  value: "",
  unit,
  note: "",
  src: "",
  fastener: "",
  cylinder: keep?.cylinder ?? "",
  journal: "",
  depth: "",
  depthUnit: keep?.depthUnit || "mm",
  angle: "",
});

/** A row's typed place as numbers, so a value typed at a place a run left empty fills it in the preview. */
const rowPlace = (r: Row) => {
  const n = (x: string) => (/^\d+$/.test(x.trim()) ? Number(x) : null);
  return { fastener: n(r.fastener), cylinder: n(r.cylinder), journal: n(r.journal) };
};

const PLACE_WIDTH: Record<PositionField, string> = { fastener: "w-16", cylinder: "w-16", journal: "w-16", depth: "w-20", angle: "w-16" };

/** Rows from posted values (r.<specId>.<i>.value …) or from stored readings. */
export function rowsFromValues(specs: EditorSpec[], values: Record<string, string> | undefined): Record<string, Row[]> {
  const out: Record<string, Row[]> = {};
  if (!values) return out;
  const idx = new Map<string, Set<number>>();
  for (const k of Object.keys(values)) {
    const m = /^r\.([0-9a-f-]{36})\.(\d+)\.value$/.exec(k);
    if (m) idx.set(m[1], (idx.get(m[1]) ?? new Set()).add(Number(m[2])));
  }
  for (const s of specs) {
    const is = [...(idx.get(s.id) ?? [])].sort((a, b) => a - b);
    out[s.id] = is.map((i) => {
      const row = blankRow(values[`r.${s.id}.${i}.unit`] || s.unit);
      for (const k of ["value", "note", "src", ...PLACE_KEYS] as const) row[k] = values[`r.${s.id}.${i}.${k}`] ?? row[k];
      return row;
    });
  }
  return out;
}

const clock = (t: number) => `${Math.floor(t / 60)}:${String(Math.floor(t % 60)).padStart(2, "0")}`;

export function ReadingsEditor({
  specs,
  initial,
  errors,
  pull,
  missingPlaces = [],
}: {
  specs: EditorSpec[];
  initial: Record<string, Row[]>;
  errors: Record<string, string>;
  pull?: PullReading[];
  /** Places a run left empty on the record being amended: Incomplete until a value fills them. */
  missingPlaces?: MissingPlace[];
}) {
  const [rows, setRows] = useState<Record<string, Row[]>>(() =>
    Object.fromEntries(specs.map((s) => [s.id, initial[s.id]?.length ? initial[s.id] : [blankRow(s.unit)]])),
  );
  const [used, setUsed] = useState<Set<string>>(
    () =>
      new Set(
        Object.values(initial)
          .flat()
          .map((r) => r.src)
          .filter(Boolean),
      ),
  );

  const set = (specId: string, i: number, patch: Partial<Row>) =>
    setRows((prev) => ({ ...prev, [specId]: prev[specId].map((r, j) => (j === i ? { ...r, ...patch } : r)) }));
  const add = (specId: string, row?: Partial<Row>) =>
    setRows((prev) => {
      const s = specs.find((x) => x.id === specId)!;
      const list = prev[specId].filter((r) => r.value.trim() !== "" || r.note.trim() !== "");
      return { ...prev, [specId]: [...list, { ...blankRow(list.at(-1)?.unit ?? s.unit, list.at(-1)), ...row }] };
    });
  const remove = (specId: string, i: number) =>
    setRows((prev) => {
      const gone = prev[specId][i];
      if (gone?.src) setUsed((u) => new Set([...u].filter((x) => x !== gone.src)));
      const next = prev[specId].filter((_, j) => j !== i);
      return { ...prev, [specId]: next.length ? next : [blankRow(specs.find((x) => x.id === specId)!.unit)] };
    });

  const evaluation = useMemo(() => {
    const typed: Record<string, ReadingInput[]> = {};
    for (const s of specs) {
      for (const r of rows[s.id] ?? []) {
        const v = Number(r.value.replace(",", "."));
        if (r.value.trim() === "" || !Number.isFinite(v)) continue;
        try {
          readingVerdict(s, { value: v, unit: r.unit });
          typed[s.id] = [...(typed[s.id] ?? []), { value: v, unit: r.unit, position: rowPlace(r) }];
        } catch {
          /* shown at the field on submit */
        }
      }
    }
    return evaluateRecord(specs, typed, missingPlaces);
  }, [rows, specs, missingPlaces]);
  const leftEmpty = (specId: string, r: Row) =>
    r.value.trim() === "" &&
    missingPlaces.some((p) => {
      const at = placeOf(p);
      return p.specId === specId && at != null && rowPlace(r)[at.field] === at.n;
    });

  return (
    <div className="space-y-4">
      {pull && pull.length > 0 && (
        <section className="card p-4" aria-labelledby="pull-h">
          <h3 id="pull-h" className="text-base">
            Readings typed on the recording
          </h3>
          <p className="text-sm text-graphite-soft">Pull a reading into the spec it belongs to; it keeps a link to its moment.</p>
          <ul className="mt-2 divide-y divide-rule/60 text-sm">
            {pull.map((p) => {
              // A reading fits a spec of its kind of unit (a bore diameter fits a length spec).
              const fits = specs.filter((s) => s.quantity === quantityDef(p.quantity)?.kind);
              const where = positionText(p);
              return (
                <li key={p.id} className="flex flex-wrap items-center gap-2 py-1.5" data-testid="pull-reading">
                  <span className="num w-14 text-graphite-soft">{p.t != null ? clock(p.t) : "—"}</span>
                  <span className="num font-semibold">{typedReadingText(p)}</span>
                  <span className="min-w-0 flex-1 truncate">{[where, p.label].filter(Boolean).join(" · ")}</span>
                  {used.has(p.id) ? (
                    <span className="text-graphite-soft">pulled in</span>
                  ) : fits.length ? (
                    <select
                      className="field w-auto py-1 text-sm"
                      aria-label={`Pull ${[where, p.label].filter(Boolean).join(", ") || "reading"} into spec`}
                      value=""
                      onChange={(e) => {
                        if (!e.target.value) return;
                        add(e.target.value, {
                          value: typedText(p.valueEntered, p.valueDecimals),
                          unit: p.unitEntered,
                          note: p.label,
                          src: p.id,
                          ...placeFields(p),
                        });
                        setUsed((u) => new Set(u).add(p.id));
                      }}
                    >
                      <option value="">Pull into…</option>
                      {fits.map((s) => (
                        <option key={s.id} value={s.id}>
                          {s.label}
                        </option>
                      ))}
                    </select>
                  ) : (
                    <span className="text-graphite-soft">no {(quantityDef(p.quantity)?.label ?? p.quantity).toLowerCase()} spec</span>
                  )}
                </li>
              );
            })}
          </ul>
        </section>
      )}

      {specs.map((s) => {
        const ev = evaluation.specs.find((e) => e.spec.id === s.id)!;
        const kind = s.quantity as UnitKind;
        const places = positionFieldsForSpec(s);
        return (
          <fieldset key={s.id} className="card p-4" data-testid="spec-readings" data-spec={s.label}>
            <legend className="sr-only">{s.label}</legend>
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <div>
                {/* The legend names the group for assistive technology; this is its visible twin. */}
                <p className="font-serif text-base font-semibold text-graphite" aria-hidden="true">
                  {s.label}
                </p>
                <p className="num text-sm text-graphite-soft">
                  Spec {limitsText(s)}
                  {s.note && <> · {s.note}</>}
                </p>
              </div>
              <SpecVerdictTag verdict={ev.verdict} places={ev.emptyPlaces} />
            </div>
            <div className="mt-2 space-y-2">
              {(rows[s.id] ?? []).map((r, i) => {
                const base = `r.${s.id}.${i}`;
                const v = Number(r.value.replace(",", "."));
                let verdict: ReturnType<typeof readingVerdict> | null = null;
                if (r.value.trim() !== "" && Number.isFinite(v)) {
                  try {
                    verdict = readingVerdict(s, { value: v, unit: r.unit });
                  } catch {
                    verdict = null;
                  }
                }
                const err = [...new Set(["value", "unit", ...places].map((f) => errors[`${base}.${f}`]).filter(Boolean))].join(" ");
                return (
                  <div key={i}>
                    <div className="flex flex-wrap items-end gap-x-3 gap-y-2" data-testid="spec-reading-row">
                      <Small label="Value" htmlFor={`${base}.value`}>
                        <div className="flex gap-1">
                          <input
                            id={`${base}.value`}
                            name={`${base}.value`}
                            inputMode="decimal"
                            autoComplete="off"
                            className="field num w-28 text-right"
                            aria-label={`${s.label} reading ${i + 1}`}
                            aria-invalid={errors[`${base}.value`] ? true : undefined}
                            value={r.value}
                            onChange={(e) => set(s.id, i, { value: e.target.value })}
                          />
                          <select
                            name={`${base}.unit`}
                            className="field w-auto"
                            aria-label={`${s.label} reading ${i + 1} unit`}
                            value={r.unit}
                            onChange={(e) => set(s.id, i, { unit: e.target.value })}
                          >
                            {(UNIT_OPTIONS[kind] ?? []).map((u) => (
                              <option key={u.code} value={u.code}>
                                {u.label}
                              </option>
                            ))}
                          </select>
                        </div>
                      </Small>
                      {places.map((f) => (
                        <Small key={f} label={POSITION_FIELD_WORDS[f].label} htmlFor={`${base}.${f}`}>
                          <div className="flex gap-1">
                            <input
                              id={`${base}.${f}`}
                              name={`${base}.${f}`}
                              inputMode={f === "depth" || f === "angle" ? "decimal" : "numeric"}
                              autoComplete="off"
                              className={`field num ${PLACE_WIDTH[f]} text-right`}
                              placeholder={POSITION_FIELD_WORDS[f].placeholder}
                              aria-label={`${s.label} reading ${i + 1} ${POSITION_FIELD_WORDS[f].label.toLowerCase()}`}
                              aria-invalid={errors[`${base}.${f}`] ? true : undefined}
                              value={r[f]}
                              onChange={(e) => set(s.id, i, { [f]: e.target.value })}
                            />
                            {f === "depth" && (
                              <select
                                name={`${base}.depthUnit`}
                                className="field w-auto"
                                aria-label={`${s.label} reading ${i + 1} depth unit`}
                                value={r.depthUnit}
                                onChange={(e) => set(s.id, i, { depthUnit: e.target.value })}
                              >
                                {DEPTH_UNITS.map((u) => (
                                  <option key={u} value={u}>
                                    {unitText(u)}
                                  </option>
                                ))}
                              </select>
                            )}
                          </div>
                        </Small>
                      ))}
                      <Small label="Note" htmlFor={`${base}.note`} className="min-w-40 flex-1">
                        <input
                          id={`${base}.note`}
                          name={`${base}.note`}
                          className="field"
                          placeholder={places.length ? "plate on, re-check" : "where and how it was read"}
                          aria-label={`${s.label} reading ${i + 1} note`}
                          value={r.note}
                          onChange={(e) => set(s.id, i, { note: e.target.value })}
                        />
                      </Small>
                      <div className="ml-auto flex items-center gap-2 whitespace-nowrap pb-2">
                        <span className="inline-block w-20 text-right">
                          {verdict ? (
                            <ReadingVerdictTag verdict={verdict.verdict} />
                          ) : leftEmpty(s.id, r) ? (
                            <span className="text-sm italic text-brass">left empty</span>
                          ) : (
                            <span className="text-sm text-graphite-soft">—</span>
                          )}
                        </span>
                        <button
                          type="button"
                          className="text-sm text-graphite-soft underline-offset-2 hover:underline"
                          onClick={() => remove(s.id, i)}
                          aria-label={`Remove ${s.label} reading ${i + 1}`}
                        >
                          Remove
                        </button>
                      </div>
                      {r.src && <input type="hidden" name={`${base}.src`} value={r.src} />}
                    </div>
                    {err && (
                      <p className="field-error" role="alert">
                        {err}
                      </p>
                    )}
                  </div>
                );
              })}
            </div>
            <button type="button" className="btn mt-2 py-1 text-sm" onClick={() => add(s.id)}>
              + Another reading
            </button>
          </fieldset>
        );
      })}

      <div
        className="card flex flex-wrap items-center justify-between gap-3 border-brass/40 bg-brass-soft/30 p-4"
        aria-live="polite"
        data-testid="verdict-preview"
      >
        <div>
          <p className="text-sm font-semibold">Verdict as typed</p>
          <p className="num text-sm text-graphite-soft">
            {evaluation.counts.within} within · {evaluation.counts.out} out · {evaluation.counts.notMeasured} not measured
            {evaluation.notMeasured.length > 0 && <> ({evaluation.notMeasured.map((s) => s.label).join(", ")})</>}
            {evaluation.missingPlaces.length > 0 && (
              <>
                {" "}
                · {evaluation.missingPlaces.length} left empty (
                {placesText(evaluation.missingPlaces.map((p) => ({ ...p, specLabel: specs.find((s) => s.id === p.specId)?.label ?? "" })))})
              </>
            )}
          </p>
        </div>
        <VerdictBadge
          verdict={evaluation.verdict}
          notMeasured={evaluation.notMeasured.length}
          places={evaluation.missingPlaces.length}
          size="lg"
        />
      </div>
    </div>
  );
}

/** A field with its small label above, so a reading's row can wrap on a tablet. */
function Small({
  label,
  htmlFor,
  className = "",
  children,
}: {
  label: string;
  htmlFor: string;
  className?: string;
  children: React.ReactNode;
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
