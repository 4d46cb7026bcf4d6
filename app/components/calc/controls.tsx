/**
 * Form controls shared by the calculator pages: a number with its unit selector, a plain
 * select, the caution, warnings, and "Copy as calculator block". All controlled by one
 * `values` map whose keys are the form field names, so the same names post without JS.
 */
import { useEffect, useState, type ReactNode } from "react";
import { unitLabel, type UnitCode } from "~/lib/calc";
import { UNIT_CHOICES, type ChoiceKind } from "~/lib/calc-ui/units";
import type { FieldErrors, FormValues } from "~/lib/calc-ui/outcome";
import { presetText } from "~/lib/calc-preset";
import { CALC_CAUTION, type CalcKind } from "~/lib/calc-kinds";

export type SetValue = (name: string, value: string) => void;

/** True after hydration: sections that only apply to one choice are hidden then (without JS all show). */
export function useHydrated(): boolean {
  const [h, setH] = useState(false);
  useEffect(() => setH(true), []);
  return h;
}

const fid = (name: string) => `c-${name.replace(/[^a-zA-Z0-9_-]/g, "-")}`;

export function UnitSelect({
  name,
  kind,
  values,
  set,
  label,
  units,
  className = "",
}: {
  name: string;
  kind: ChoiceKind;
  values: FormValues;
  set: SetValue;
  label: string;
  units?: readonly UnitCode[];
  className?: string;
}) {
  const list = units ?? UNIT_CHOICES[kind];
  return (
    <select
      name={name}
      aria-label={label}
      className={`field w-auto shrink-0 px-2 py-2 text-sm ${className}`}
      value={values[name] ?? list[0]}
      onChange={(e) => set(name, e.target.value)}
    >
      {list.map((u) => (
        <option key={u} value={u}>
          {unitLabel(u)}
        </option>
      ))}
    </select>
  );
}

/** Under a field: its error when it has one (named by the field's aria-describedby), else its hint. */
function FieldNote({ id, hint, error, block }: { id: string; hint?: ReactNode; error?: string; block?: boolean }) {
  if (error)
    return (
      <p id={`${id}-error`} className="field-error" role="alert">
        {error}
      </p>
    );
  if (!hint) return null;
  return block ? <div className="mt-1 text-xs text-graphite-soft">{hint}</div> : <p className="mt-1 text-xs text-graphite-soft">{hint}</p>;
}

/** A number field with its unit selector beside it: fields `${name}.value` and `${name}.unit`. */
export function QuantityField({
  name,
  label,
  kind,
  values,
  set,
  errors,
  hint,
  units,
  optional,
}: {
  name: string;
  label: string;
  kind: ChoiceKind;
  values: FormValues;
  set: SetValue;
  errors: FieldErrors;
  hint?: ReactNode;
  units?: readonly UnitCode[];
  optional?: boolean;
}) {
  const id = fid(`${name}.value`);
  const error = errors[`${name}.value`];
  return (
    <div>
      <label htmlFor={id} className="label">
        {label}
        {optional && <span className="ml-1 font-normal text-graphite-soft">(optional)</span>}
      </label>
      <div className="flex gap-1.5">
        <input
          id={id}
          name={`${name}.value`}
          inputMode="decimal"
          autoComplete="off"
          className="field num min-w-0 flex-1"
          value={values[`${name}.value`] ?? ""}
          onChange={(e) => set(`${name}.value`, e.target.value)}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${id}-error` : undefined}
        />
        <UnitSelect name={`${name}.unit`} kind={kind} values={values} set={set} label={`${label}: unit`} units={units} />
      </div>
      <FieldNote id={id} hint={hint} error={error} />
    </div>
  );
}

/** A plain number or text field. */
export function TextField({
  name,
  label,
  values,
  set,
  errors,
  hint,
  list,
  numeric = true,
  className = "",
}: {
  name: string;
  label: string;
  values: FormValues;
  set: SetValue;
  errors: FieldErrors;
  hint?: ReactNode;
  list?: string;
  numeric?: boolean;
  className?: string;
}) {
  const id = fid(name);
  const error = errors[name];
  return (
    <div className={className}>
      <label htmlFor={id} className="label">
        {label}
      </label>
      <input
        id={id}
        name={name}
        list={list}
        inputMode={numeric ? "decimal" : undefined}
        autoComplete="off"
        className={`field ${numeric ? "num" : ""}`}
        value={values[name] ?? ""}
        onChange={(e) => set(name, e.target.value)}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
      />
      <FieldNote id={id} hint={hint} error={error} />
    </div>
  );
}

export function Choice({
  name,
  label,
  values,
  set,
  errors,
  options,
  hint,
  onPick,
  className = "",
}: {
  name: string;
  label: string;
  values: FormValues;
  set: SetValue;
  errors: FieldErrors;
  options: { value: string; label: string }[];
  hint?: ReactNode;
  onPick?: (value: string) => void;
  className?: string;
}) {
  const id = fid(name);
  const error = errors[name];
  return (
    <div className={className}>
      <label htmlFor={id} className="label">
        {label}
      </label>
      <select
        id={id}
        name={name}
        className="field"
        value={values[name] ?? ""}
        onChange={(e) => (onPick ? onPick(e.target.value) : set(name, e.target.value))}
        aria-invalid={error ? true : undefined}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      <FieldNote id={id} hint={hint} error={error} block />
    </div>
  );
}

export function Check({ name, label, values, set }: { name: string; label: string; values: FormValues; set: SetValue }) {
  return (
    <label className="flex items-center gap-2 text-sm font-semibold">
      <input
        type="checkbox"
        name={name}
        className="h-4 w-4 accent-[var(--color-brass)]"
        checked={values[name] === "on"}
        onChange={(e) => set(name, e.target.checked ? "on" : "")}
      />
      {label}
    </label>
  );
}

/** A group of fields with a small heading. */
export function Fieldset({ legend, children, className = "" }: { legend: string; children: ReactNode; className?: string }) {
  return (
    <fieldset className={`rounded-lg border border-rule bg-card p-4 ${className}`}>
      <legend className="px-1 font-serif text-base font-semibold">{legend}</legend>
      <div className="grid gap-4">{children}</div>
    </fieldset>
  );
}

export function Caution() {
  return (
    <p data-testid="calc-caution" className="rounded-md border border-brass/40 bg-brass-soft/60 px-3 py-2 text-sm text-graphite">
      {CALC_CAUTION}
    </p>
  );
}

export function Warnings({ warnings, red }: { warnings: string[]; red?: (w: string) => boolean }) {
  if (warnings.length === 0) return null;
  return (
    <ul className="grid gap-1.5" data-testid="calc-warnings">
      {warnings.map((w) => {
        const bad = red?.(w) ?? false;
        return (
          <li
            key={w}
            className={`rounded-md border px-3 py-2 text-sm ${bad ? "border-spec-red/50 bg-spec-red-soft text-spec-red" : "border-brass/40 bg-paper-deep text-graphite"}`}
          >
            {w}
          </li>
        );
      })}
    </ul>
  );
}

/** The result's key figure: a large number with its label and a unit selector. */
export function Figure({
  label,
  value,
  unitSelect,
  tone,
  testId,
}: {
  label: string;
  value: string;
  unitSelect?: ReactNode;
  tone?: "bad" | "ok";
  testId?: string;
}) {
  return (
    <div className="min-w-0">
      <div className="text-xs font-semibold uppercase tracking-[0.12em] text-graphite-soft">{label}</div>
      <div className="mt-0.5 flex flex-wrap items-baseline gap-2">
        <span
          data-testid={testId}
          className={`num font-serif text-2xl font-semibold ${tone === "bad" ? "text-spec-red" : tone === "ok" ? "text-ok" : "text-graphite"}`}
        >
          {value}
        </span>
        {unitSelect}
      </div>
    </div>
  );
}

/** "Copy as calculator block": copies `{ calculator, input }`; the JSON is also shown to select by hand. */
export function CopyBlock({ calculator, input }: { calculator: CalcKind; input: unknown }) {
  const [state, setState] = useState<"idle" | "copied" | "failed">("idle");
  const text = input === undefined ? "" : presetText(calculator, input);
  useEffect(() => setState("idle"), [text]);
  const hydrated = useHydrated();
  return (
    <div className="grid gap-2">
      <div className="flex flex-wrap items-center gap-3">
        <button
          type="button"
          className="btn"
          disabled={!hydrated || !text}
          onClick={async () => {
            try {
              await navigator.clipboard.writeText(text);
              setState("copied");
            } catch {
              setState("failed");
            }
          }}
        >
          Copy as calculator block
        </button>
        <span role="status" className="text-sm text-graphite-soft">
          {state === "copied"
            ? "Copied: paste it into a procedure's calculator block."
            : state === "failed"
              ? "The browser refused the clipboard; copy the text below and paste it into the block's “Paste inputs from a calculator page”."
              : ""}
        </span>
      </div>
      {text && (
        <details className="text-sm">
          <summary className="cursor-pointer text-teal">Show the text to paste into a procedure's calculator block</summary>
          <pre
            data-testid="calc-preset-json"
            className="mt-2 max-h-64 overflow-auto rounded-md border border-rule bg-paper px-3 py-2 font-mono text-xs"
          >
            {text}
          </pre>
        </details>
      )}
    </div>
  );
}

/** The formulas and their sources, in plain words. */
export function Method({ children }: { children: ReactNode }) {
  return (
    <section className="card prose-proc mt-8 grid gap-3 text-[0.95rem]" aria-labelledby="method-heading">
      <h2 id="method-heading" className="text-xl">
        How this is worked out
      </h2>
      {children}
    </section>
  );
}
