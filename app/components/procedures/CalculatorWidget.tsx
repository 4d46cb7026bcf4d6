import { useEffect, useMemo, useState } from "react";
import { CALC_CAUTION, calcLabel, numericLeaves, setAtPath, tidyNumber, type CalcKind, type CalcOutcome } from "~/lib/procedures/calc-shared";


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
  const key = JSON.stringify(values);
  const changed = key !== JSON.stringify(preset);
  const [live, setLive] = useState<{ key: string; outcome: CalcOutcome } | null>(null);
  useEffect(() => {
    if (!changed) return;
    let stale = false;
    loadMath()
      .then((m) => !stale && setLive({ key, outcome: m.runCalculator(kind, values) }))
      .catch(() => !stale && setLive({ key, outcome: { ok: false, message: "the calculator could not be loaded; reload the page" } }));
    return () => {
      stale = true;
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [kind, key, changed]);
  const computing = changed && live?.key !== key;
  const outcome = changed ? (live?.outcome ?? presetOutcome) : presetOutcome;
  const thread = typeof values.thread === "string" ? values.thread : null;
  const method = values.method as { kind?: string } | undefined;
  const label = (u?: string) => (u ? (units[u] ?? u) : "");
  const idp = `calc-${index}`;
  return (
    <section className="calc-block not-prose my-5 rounded-lg border border-brass/50 bg-card shadow-sm" aria-label={`${calcLabel(kind)} calculator`} data-calc-kind={kind}>
      <header className="flex flex-wrap items-baseline justify-between gap-2 border-b border-brass/30 bg-brass-soft/40 px-4 py-2">
        <h3 className="font-sans text-sm font-semibold uppercase tracking-[0.12em] text-brass">
          {calcLabel(kind)} calculator{title ? <span className="ml-2 font-serif text-base normal-case tracking-normal text-graphite">{title}</span> : null}
        </h3>
        {changed && <span className="text-xs font-semibold text-teal">Your numbers (not saved to the page)</span>}
      </header>
      <div className="grid gap-4 p-4 sm:grid-cols-2">
        <div>
          <p className="text-xs font-semibold uppercase tracking-wide text-graphite-soft">Inputs</p>
          <dl className="mt-1 space-y-0.5 text-sm">
            {thread && (
              <div className="flex justify-between gap-3"><dt className="text-graphite-soft">thread</dt><dd className="num font-semibold">{thread}</dd></div>
            )}
            {method?.kind && <div className="flex justify-between gap-3"><dt className="text-graphite-soft">method</dt><dd>{method.kind === "nut-factor" ? "nut factor" : "friction (ISO 16047)"}</dd></div>}
            {typeof values.kind === "string" && <div className="flex justify-between gap-3"><dt className="text-graphite-soft">check</dt><dd>{String(values.kind)}</dd></div>}
            {leaves.map((l) => (
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
                    <span id={`${idp}-${l.path.join("-")}`} className="num font-semibold">{tidyNumber(l.value)}</span>
                  )}
                  <span className="w-10 text-graphite-soft">{label(l.unit)}</span>
                </dd>
              </div>
            ))}
          </dl>
          {interactive && (
            <div className="no-print mt-3 flex gap-2">
              <button type="button" className="btn py-1 text-xs" onClick={() => { if (!open) void loadMath(); setOpen((o) => !o); }} aria-expanded={open}>
                {open ? "Done" : "Try your numbers"}
              </button>
              {changed && (
                <button type="button" className="btn py-1 text-xs" onClick={() => { setValues(preset); setOpen(false); }}>
                  Back to the page's values
                </button>
              )}
            </div>
          )}
        </div>
        <div aria-live="polite" aria-busy={computing}>
          <p className="text-xs font-semibold uppercase tracking-wide text-graphite-soft">Result{computing && <span className="ml-2 normal-case tracking-normal">computing…</span>}</p>
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
                  {outcome.warnings.map((w) => <li key={w} className="border-l-2 border-brass pl-2">{w}</li>)}
                </ul>
              )}
            </>
          ) : (
            <p className="mt-1 text-sm text-spec-red" role="alert">Cannot compute: {outcome.message}</p>
          )}
        </div>
      </div>
      <p className="border-t border-rule px-4 py-2 text-xs text-graphite-soft">{CALC_CAUTION}</p>
    </section>
  );
}
