import { useEffect, useMemo, useState } from "react";
import {
  CALC_CAUTION,
  calcLabel,
  numericLeaves,
  setAtPath,
  tidyNumber,
  type CalcKind,
  type CalcOutcome,
} from "~/lib/procedures/calc-shared";

// The math (app/lib/calc with its zod schemas) loads only when a reader changes a number.
let math: Promise<typeof import("~/lib/procedures/calc-presets")> | undefined;
const loadMath = () => (math ??= import("~/lib/procedures/calc-presets"));

/**
 * A calculator embedded in a procedure: the author's preset inputs, the result (computed on the
 * server with the shared math module and passed in as `outcome`), and "try your numbers" for the
 * reader (changes stay on this screen; the math module is fetched on the first "Try your numbers").
 */
export function CalculatorWidget({
  kind,
  title,
  preset,
  outcome: presetOutcome,
  units = {},
  interactive = false,
  index = 0,
}: {
  kind: CalcKind;
  title?: string;
  preset: Record<string, unknown>;
  outcome: CalcOutcome;
  /** Unit code → label (from the server's unit table); a code without a label shows as is. */
  units?: Record<string, string>;
  interactive?: boolean;
  index?: number;
}) {
  const [values, setValues] = useState(preset);
  const [open, setOpen] = useState(false);
  const leaves = useMemo(() => numericLeaves(values), [values]);
  // Bore readings read as a depth × angle grid, like the bore log, not as one row per number.
  const grid = kind === "distortion" ? readingsGrid(values.readings, values.mode === "radial" ? "radius" : "diameter") : null;
  const listed = grid ? leaves.filter((l) => l.path[0] !== "readings") : leaves;
  const key = JSON.stringify(values);
  const changed = key !== JSON.stringify(preset);
  const [live, setLive] = useState<{ key: string; outcome: CalcOutcome } | null>(null);
  // biome-ignore lint/correctness/useExhaustiveDependencies: key is the values in words, so the effect runs again exactly when a number changes
  useEffect(() => {
    if (!changed) return;
    let stale = false;
    loadMath()
      .then((m) => !stale && setLive({ key, outcome: m.runCalculator(kind, values) }))
      .catch(() => !stale && setLive({ key, outcome: { ok: false, message: "the calculator could not be loaded; reload the page" } }));
    return () => {
      stale = true;
    };
  }, [kind, key, changed]);
  const computing = changed && live?.key !== key;
  const outcome = changed ? (live?.outcome ?? presetOutcome) : presetOutcome;
  const thread = typeof values.thread === "string" ? values.thread : null;
  const method = values.method as { kind?: string } | undefined;
  const label = (u?: string) => (u ? (units[u] ?? u) : "");
  const idp = `calc-${index}`;
  return (
    <section
      className="calc-block not-prose my-5 rounded-lg border border-brass/50 bg-card shadow-sm"
      aria-label={`${calcLabel(kind)} calculator`}
      data-calc-kind={kind}
    >
      <header className="flex flex-wrap items-baseline justify-between gap-2 border-b border-brass/30 bg-brass-soft/40 px-4 py-2">
        <h3 className="font-sans text-sm font-semibold uppercase tracking-[0.12em] text-brass">
          {calcLabel(kind)} calculator
          {title ? <span className="ml-2 font-serif text-base normal-case tracking-normal text-graphite">{title}</span> : null}
        </h3>
        {changed && <span className="text-xs font-semibold text-teal">Your numbers (not saved to the page)</span>}
      </header>
      <div className="grid gap-4 p-4 sm:grid-cols-2">
        <div>
          <p className="text-xs font-semibold uppercase tracking-wide text-graphite-soft">Inputs</p>
          <dl className="mt-1 space-y-0.5 text-sm">
            {thread && (
              <div className="flex justify-between gap-3">
                <dt className="text-graphite-soft">thread</dt>
                <dd className="num font-semibold">{thread}</dd>
              </div>
            )}
            {method?.kind && (
              <div className="flex justify-between gap-3">
                <dt className="text-graphite-soft">method</dt>
                <dd>{method.kind === "nut-factor" ? "nut factor" : "friction (ISO 16047)"}</dd>
              </div>
            )}
            {typeof values.kind === "string" && (
              <div className="flex justify-between gap-3">
                <dt className="text-graphite-soft">check</dt>
                <dd>{String(values.kind)}</dd>
              </div>
            )}
            {listed.map((l) => (
              <div key={l.path.join(".")} className="flex items-center justify-between gap-3">
                <dt className="text-graphite-soft">
                  <label htmlFor={`${idp}-${l.path.join("-")}`}>{l.label}</label>
                </dt>
                <dd className="flex items-center gap-1">
                  {interactive && open ? (
                    <input
                      id={`${idp}-${l.path.join("-")}`}
                      className="field num w-28 px-2 py-0.5 text-right text-sm"
                      type="number"
                      step="any"
                      defaultValue={tidyNumber(l.value)}
                      onChange={(e) => {
                        const v = e.currentTarget.valueAsNumber;
                        if (Number.isFinite(v)) setValues((prev) => setAtPath(prev, l.path, v));
                      }}
                    />
                  ) : (
                    <span id={`${idp}-${l.path.join("-")}`} className="num font-semibold">
                      {tidyNumber(l.value)}
                    </span>
                  )}
                  <span className="w-10 text-graphite-soft">{label(l.unit)}</span>
                </dd>
              </div>
            ))}
          </dl>
          {interactive && (
            <div className="no-print mt-3 flex gap-2">
              <button
                type="button"
                className="btn py-1 text-xs"
                onClick={() => {
                  if (!open) void loadMath();
                  setOpen((o) => !o);
                }}
                aria-expanded={open}
              >
                {open ? "Done" : "Try your numbers"}
              </button>
              {changed && (
                <button
                  type="button"
                  className="btn py-1 text-xs"
                  onClick={() => {
                    setValues(preset);
                    setOpen(false);
                  }}
                >
                  Back to the page's values
                </button>
              )}
            </div>
          )}
        </div>
        <div aria-live="polite" aria-busy={computing}>
          <p className="text-xs font-semibold uppercase tracking-wide text-graphite-soft">
            Result{computing && <span className="ml-2 normal-case tracking-normal">computing…</span>}
          </p>
          {outcome.ok ? (
            <>
              <dl className={`mt-1 space-y-0.5 text-sm ${computing ? "opacity-50" : ""}`} data-testid="calc-result">
                {outcome.rows.map((r) => (
                  <div key={r.label} className="flex justify-between gap-3">
                    <dt className="text-graphite-soft">{r.label}</dt>
                    <dd className={`num font-semibold ${r.tone === "bad" ? "text-spec-red" : ""}`}>{r.value}</dd>
                  </div>
                ))}
              </dl>
              {outcome.warnings.length > 0 && (
                <ul className="mt-2 list-none space-y-1 p-0 text-xs text-graphite">
                  {outcome.warnings.map((w) => (
                    <li key={w} className="border-l-2 border-brass pl-2">
                      {w}
                    </li>
                  ))}
                </ul>
              )}
            </>
          ) : (
            <p className="mt-1 text-sm text-spec-red" role="alert">
              Cannot compute: {outcome.message}
            </p>
          )}
        </div>
      </div>
      {grid && (
        <div className="px-4 pb-4">
          <ReadingsTable
            grid={grid}
            editing={interactive && open}
            unitLabel={label}
            idp={idp}
            onChange={(i, v) => setValues((prev) => setAtPath(prev, ["readings", i, grid.field, "value"], v))}
          />
        </div>
      )}
      <p className="border-t border-rule px-4 py-2 text-xs text-graphite-soft">{CALC_CAUTION}</p>
    </section>
  );
}

type Quantity = { value: number; unit: string };
type Grid = {
  field: "diameter" | "radius";
  unit: string;
  depthUnit: string;
  depths: (number | null)[];
  angles: number[];
  /** `${depth}|${angle}` → index in preset.readings */
  cells: Map<string, number>;
  values: number[];
};

const isQuantity = (q: unknown): q is Quantity =>
  !!q && typeof (q as Quantity).value === "number" && typeof (q as Quantity).unit === "string";

/**
 * The preset's bore readings as depths × angles, or null when they do not form one (then the
 * plain list shows every number): `field` is the value the calculation uses (its mode), and
 * every reading must give it, an angle, and the same units as the others.
 */
export function readingsGrid(readings: unknown, field: "diameter" | "radius"): Grid | null {
  if (!Array.isArray(readings) || readings.length === 0) return null;
  if (!readings.every((r) => isQuantity(r?.[field]) && typeof r?.angleDeg === "number")) return null;
  if (new Set(readings.map((r) => r[field].unit)).size !== 1) return null;
  if (new Set(readings.map((r) => (isQuantity(r.depth) ? r.depth.unit : ""))).size !== 1) return null;
  const depthOf = (r: { depth?: unknown }) => (isQuantity(r.depth) ? r.depth.value : null);
  const depths = [...new Set(readings.map(depthOf))].sort((a, b) => (a ?? -Infinity) - (b ?? -Infinity));
  const angles = [...new Set(readings.map((r) => r.angleDeg as number))].sort((a, b) => a - b);
  const cells = new Map<string, number>();
  readings.forEach((r, i) => {
    const k = `${depthOf(r)}|${r.angleDeg}`;
    if (!cells.has(k)) cells.set(k, i);
  });
  if (cells.size !== readings.length) return null; // two readings in one cell: the plain list shows them all
  const withDepth = readings.find((r) => isQuantity(r.depth));
  return {
    field,
    unit: readings[0][field].unit,
    depthUnit: withDepth ? withDepth.depth.unit : "",
    depths,
    angles,
    cells,
    values: readings.map((r) => r[field].value as number),
  };
}

function ReadingsTable({
  grid,
  editing,
  unitLabel,
  idp,
  onChange,
}: {
  grid: Grid;
  editing: boolean;
  unitLabel: (u?: string) => string;
  idp: string;
  onChange: (index: number, value: number) => void;
}) {
  const what = grid.field === "radius" ? "Radius" : "Bore diameter";
  const depthText = (d: number | null) => (d == null ? "—" : `${tidyNumber(d)} ${unitLabel(grid.depthUnit)}`);
  const depthWords = (d: number | null) => (d == null ? "no depth given" : `${depthText(d)} depth`);
  const captionId = `${idp}-readings-caption`;
  return (
    <div className="mt-3">
      <p id={captionId} className="text-xs text-graphite-soft">
        {what} readings, {unitLabel(grid.unit)}: depth down the bore × gauge angle
      </p>
      <div className="mt-1 overflow-x-auto">
        <table className="readings-grid num w-auto border-collapse text-sm" data-testid="readings-grid" aria-describedby={captionId}>
          <thead>
            <tr>
              <th scope="col" className="px-1.5 py-0.5 text-left text-xs font-semibold text-graphite-soft">
                depth
              </th>
              {grid.angles.map((a) => (
                <th key={a} scope="col" className="px-1.5 py-0.5 text-right text-xs font-semibold text-graphite-soft">
                  {tidyNumber(a)}°
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {grid.depths.map((d) => (
              <tr key={String(d)} className="border-t border-rule">
                <th scope="row" className="whitespace-nowrap px-1.5 py-0.5 text-left text-xs font-semibold text-graphite-soft">
                  {depthText(d)}
                </th>
                {grid.angles.map((a) => {
                  const i = grid.cells.get(`${d}|${a}`);
                  if (i == null)
                    return (
                      <td key={a} className="px-1.5 py-0.5 text-right text-graphite-soft">
                        <span aria-hidden="true">·</span>
                        <span className="sr-only">no reading</span>
                      </td>
                    );
                  return (
                    <td key={a} className="px-1 py-0.5 text-right">
                      {editing ? (
                        <input
                          id={`${idp}-readings-${i}`}
                          aria-label={`${what}, ${unitLabel(grid.unit)}, at ${depthWords(d)}, ${tidyNumber(a)}°`}
                          className="field num w-[5.5rem] px-1.5 py-0.5 text-right text-sm"
                          type="number"
                          step="any"
                          defaultValue={tidyNumber(grid.values[i])}
                          onChange={(e) => {
                            const v = e.currentTarget.valueAsNumber;
                            if (Number.isFinite(v)) onChange(i, v);
                          }}
                        />
                      ) : (
                        <span className="font-semibold">{tidyNumber(grid.values[i])}</span>
                      )}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
