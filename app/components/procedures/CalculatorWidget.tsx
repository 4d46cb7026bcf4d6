import { useMemo, useState } from "react";
import { unitLabel, type UnitCode } from "~/lib/calc";
import { CALC_CAUTION, numericLeaves, runCalculator, setAtPath, type CalcKind } from "~/lib/procedures/calc-presets";
import { calcLabel } from "~/lib/procedures/document";

const label = (u?: string) => {
  if (!u) return "";
  try {
    return unitLabel(u as UnitCode);
  } catch {
    return u;
  }
};

/**
 * A calculator embedded in a procedure: the author's preset inputs, the result computed with
 * the shared math module, and "try your numbers" for the reader (changes stay on this screen).
 * Rendered statically on the server; hydrated on the read page.
 */
export function CalculatorWidget({ kind, title, preset, interactive = false, index = 0 }: { kind: CalcKind; title?: string; preset: Record<string, unknown>; interactive?: boolean; index?: number }) {
  const [values, setValues] = useState(preset);
  const [open, setOpen] = useState(false);
  const leaves = useMemo(() => numericLeaves(values), [values]);
  const outcome = useMemo(() => runCalculator(kind, values), [kind, values]);
  const changed = JSON.stringify(values) !== JSON.stringify(preset);
  const thread = typeof values.thread === "string" ? values.thread : null;
  const method = values.method as { kind?: string } | undefined;
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
                      defaultValue={l.value}
                      onChange={(e) => {
                        const v = e.currentTarget.valueAsNumber;
                        if (Number.isFinite(v)) setValues((prev) => setAtPath(prev, l.path, v));
                      }}
                    />
                  ) : (
                    <span id={`${idp}-${l.path.join("-")}`} className="num font-semibold">{l.value}</span>
                  )}
                  <span className="w-10 text-graphite-soft">{label(l.unit)}</span>
                </dd>
              </div>
            ))}
          </dl>
          {interactive && (
            <div className="no-print mt-3 flex gap-2">
              <button type="button" className="btn py-1 text-xs" onClick={() => setOpen((o) => !o)} aria-expanded={open}>
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
        <div aria-live="polite">
          <p className="text-xs font-semibold uppercase tracking-wide text-graphite-soft">Result</p>
          {outcome.ok ? (
            <>
              <dl className="mt-1 space-y-0.5 text-sm" data-testid="calc-result">
                {outcome.rows.map((r) => (
                  <div key={r.label} className="flex justify-between gap-3">
                    <dt className="text-graphite-soft">{r.label}</dt>
                    <dd className={`num font-semibold ${r.tone === "bad" ? "text-spec-red" : ""}`}>{r.value}</dd>
                  </div>
                ))}
              </dl>
              {outcome.warnings.length > 0 && (
                <ul className="mt-2 space-y-1 text-xs text-graphite">
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
