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
      {caption && <caption className="mb-1 text-left text-xs font-semibold uppercase tracking-[0.12em] text-graphite-soft">{caption}</caption>}
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
    <div className="rounded-md border border-dashed border-rule px-4 py-6 text-center text-sm text-graphite-soft" data-testid="calc-no-result">
      {n > 0 ? `Fix the ${n === 1 ? "field" : `${n} fields`} marked in the form to see a result.` : "Fill in the form to see a result."}
      {errors.form && <p className="mt-2 text-spec-red">{errors.form}</p>}
    </div>
  );
}
