import type { ReactNode } from "react";

/** The result column: sticky on wide screens, red-edged when a result is out of spec. */
export function ResultPanel({ children, bad, label = "Result" }: { children: ReactNode; bad?: boolean; label?: string }) {
  return (
    <section
      aria-label={label}
      aria-live="polite"
      data-testid="calc-result"
      data-state={bad ? "out-of-spec" : "ok"}
      className={`card grid gap-5 lg:sticky lg:top-4 ${bad ? "border-spec-red ring-1 ring-spec-red/40" : ""}`}
    >
      {children}
    </section>
  );
}

/** A compact two-column table of labelled figures. */
export function FigureTable({ rows, caption }: { rows: [string, ReactNode][]; caption?: string }) {
  return (
    <table className="w-full text-sm">
      {caption && (
        <caption className="mb-1 text-left text-xs font-semibold uppercase tracking-[0.12em] text-graphite-soft">{caption}</caption>
      )}
      <tbody>
        {rows.map(([k, v]) => (
          <tr key={k} className="border-t border-rule/70">
            <th scope="row" className="py-1.5 pr-3 text-left font-normal text-graphite-soft">
              {k}
            </th>
            <td className="num py-1.5 text-right">{v}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

/** What to show while the inputs cannot be computed. */
export function NoResult({ errors }: { errors: Record<string, string> }) {
  const n = Object.keys(errors).length;
  return (
    <div
      className="rounded-md border border-dashed border-rule px-4 py-6 text-center text-sm text-graphite-soft"
      data-testid="calc-no-result"
    >
      {n > 0 ? `Fix the ${n === 1 ? "field" : `${n} fields`} marked in the form to see a result.` : "Fill in the form to see a result."}
      {errors.form && <p className="mt-2 text-spec-red">{errors.form}</p>}
    </div>
  );
}

/**
 * On a tablet the form and the result stack, so the result is out of sight while one types:
 * this strip keeps the main figures at the bottom of the screen (hidden on wide screens,
 * where the result panel sits beside the form).
 */
export function ResultPeek({ items, bad, note }: { items: [string, string][]; bad?: boolean; note?: string }) {
  if (!items.length) return null;
  return (
    <div
      data-testid="result-peek"
      aria-hidden
      className={`no-print sticky bottom-0 z-20 -mx-1 flex flex-wrap items-baseline gap-x-5 gap-y-1 rounded-t-md border border-b-0 px-4 py-2 text-sm shadow-lg lg:hidden ${
        bad ? "border-spec-red/50 bg-spec-red-soft text-spec-red" : "border-rule bg-card text-graphite"
      }`}
    >
      {items.map(([k, v]) => (
        <span key={k}>
          <span className="text-graphite-soft">{k}</span> <span className="num font-semibold">{v}</span>
        </span>
      ))}
      {note && <span className="font-semibold">{note}</span>}
    </div>
  );
}
