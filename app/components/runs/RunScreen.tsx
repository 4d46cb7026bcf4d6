import { useCallback, useEffect, useRef, useState } from "react";
import { Form, Link, useNavigation } from "react-router";
import { FormError } from "~/components/forms";
import { VerdictBadge } from "~/components/test-records/parts";
import { CALC_CAUTION, calcLabel } from "~/lib/calc-kinds";
import { parseNumber, unitLabel } from "~/lib/calc-ui/units";
import type { UnitCode } from "~/lib/calc";
import { specLimitsText } from "~/lib/procedures/reader-blocks";
import type { EntryInput } from "~/lib/runs/entries";
import { prefillCalculator, type StepValue } from "~/lib/runs/prefill";
import type { RunView } from "~/lib/runs/runs.server";
import { stepTitle } from "~/lib/runs/steps";
import { READING_VERDICT_LABELS, type ReadingVerdict } from "~/lib/test-records/labels";
import { evaluateRecord, readingVerdict } from "~/lib/test-records/verdict";
import { typedDecimals, typedText } from "~/lib/typed-number";
import { addWaiting, type QueuedEntry, removeWaiting, sendWaiting, waitingEntries } from "./queue";
import { RunPhotos } from "./RunPhotos";

type Spec = RunView["specs"][number];
type Props = {
  view: RunView;
  canWork: boolean;
  actionData?: { intent?: unknown; errors?: Record<string, string>; values?: Record<string, string> } | undefined;
};

/** Typing pauses this long before the value is kept (and sent): a gauge reading is typed in one go. */
const SAVE_AFTER_MS = 600;
const RETRY_EVERY_MS = 5000;

const newKey = () =>
  typeof crypto !== "undefined" && "randomUUID" in crypto
    ? crypto.randomUUID()
    : `k${Date.now().toString(36)}${Math.random().toString(36).slice(2, 12)}`;

function deviceName(): string {
  if (typeof navigator === "undefined") return "";
  const ua = navigator.userAgent;
  const kind = /iPad|Tablet|Android(?!.*Mobile)/i.test(ua) ? "tablet" : /Mobile|iPhone/i.test(ua) ? "phone" : "computer";
  return `${kind}, ${Math.round(window.innerWidth)} px wide`;
}

function liveVerdict(spec: Spec, text: string): { verdict: ReadingVerdict | null; problem: string | null } {
  const v = parseNumber(text);
  if (v === undefined) return { verdict: null, problem: null };
  if (Number.isNaN(v)) return { verdict: null, problem: "Type a number, e.g. 88.012" };
  try {
    return { verdict: readingVerdict(spec, { value: v, unit: spec.unit }).verdict, problem: null };
  } catch (err) {
    return { verdict: null, problem: err instanceof Error ? err.message : "That number cannot be checked." };
  }
}

const VERDICT_CLASS: Record<ReadingVerdict, string> = {
  within: "border-ok/40 bg-ok-soft text-ok",
  below: "border-spec-red bg-spec-red-soft text-spec-red",
  above: "border-spec-red bg-spec-red-soft text-spec-red",
  unchecked: "border-rule bg-paper-deep text-graphite-soft",
};

export function RunScreen({ view, canWork, actionData }: Props) {
  const { run, steps, specs } = view;
  const open = run.status === "open" && canWork;
  const specByKey = new Map(specs.map((s) => [s.key, s]));
  const [stepAt, setStepAt] = useState(Math.min(run.currentStep, Math.max(0, steps.length - 1)));
  const [texts, setTexts] = useState<Record<string, string>>(() =>
    Object.fromEntries(Object.entries(view.values).map(([k, v]) => [k, v.value == null ? "" : typedText(v.value, v.decimals)])),
  );
  const [waiting, setWaiting] = useState<QueuedEntry[]>([]);
  const [sending, setSending] = useState(false);
  const [online, setOnline] = useState(true);
  const [refusals, setRefusals] = useState<Record<string, string>>({});
  const [closed, setClosed] = useState<string | null>(null);
  // Fields typed in whose pause has not come yet: not kept anywhere, so not "saved" either.
  const [typing, setTyping] = useState<ReadonlySet<string>>(new Set());
  const timers = useRef(new Map<string, ReturnType<typeof setTimeout>>());
  const flushing = useRef(false);

  const flush = useCallback(async () => {
    if (flushing.current) return;
    flushing.current = true;
    setSending(true);
    try {
      let list = (await waitingEntries(run.id)).filter((e) => !e.refused);
      while (list.length) {
        const batch = list.slice(0, 100);
        const out = await sendWaiting(run.id, batch);
        if (out.kind === "offline") break;
        if (out.kind === "closed") {
          setClosed(out.reason);
          break;
        }
        if (out.kind === "refused" && batch.length > 1) {
          // One bad entry refuses the batch: send them one by one so only that one is held back.
          for (const e of batch) {
            const one = await sendWaiting(run.id, [e]);
            if (one.kind === "offline") break;
            if (one.kind === "refused") setRefusals((r) => ({ ...r, [e.specKey]: one.reason }));
            if (one.kind !== "closed") setWaiting(await removeWaiting(run.id, new Set([e.key])));
          }
          break;
        }
        if (out.kind === "refused") setRefusals((r) => ({ ...r, [batch[0].specKey]: out.reason }));
        list = await removeWaiting(run.id, new Set(out.keys));
        setWaiting(list);
      }
      setWaiting(await waitingEntries(run.id));
    } finally {
      flushing.current = false;
      setSending(false);
    }
  }, [run.id]);

  // The device's queue outlives the page: entries typed before a reload or while offline are shown and sent.
  useEffect(() => {
    let live = true;
    waitingEntries(run.id).then((list) => {
      if (!live) return;
      setWaiting(list);
      if (list.length) {
        setTexts((t) => {
          const next = { ...t };
          for (const e of list) next[e.specKey] = e.value == null ? "" : typedText(e.value, e.decimals);
          return next;
        });
        void flush();
      }
    });
    setOnline(navigator.onLine);
    const up = () => {
      setOnline(true);
      void flush();
    };
    const down = () => setOnline(false);
    window.addEventListener("online", up);
    window.addEventListener("offline", down);
    const retry = setInterval(() => {
      if (navigator.onLine) void flush();
    }, RETRY_EVERY_MS);
    return () => {
      live = false;
      window.removeEventListener("online", up);
      window.removeEventListener("offline", down);
      clearInterval(retry);
    };
  }, [run.id, flush]);

  function keep(spec: Spec, text: string) {
    setTyping((t) => {
      const next = new Set(t);
      next.delete(spec.key);
      return next;
    });
    const value = parseNumber(text);
    if (value !== undefined && Number.isNaN(value)) return;
    const entry: QueuedEntry = {
      key: newKey(),
      specKey: spec.key,
      value: value ?? null,
      unit: spec.unit as EntryInput["unit"],
      decimals: value == null ? null : typedDecimals(text),
      typedAt: new Date().toISOString(),
      device: deviceName(),
    };
    void addWaiting(run.id, entry).then((list) => {
      setWaiting(list);
      if (navigator.onLine) void flush();
    });
  }

  function onType(spec: Spec, text: string) {
    setTexts((t) => ({ ...t, [spec.key]: text }));
    setTyping((t) => new Set(t).add(spec.key));
    setRefusals((r) => {
      const { [spec.key]: _gone, ...rest } = r;
      return rest;
    });
    const timer = timers.current.get(spec.key);
    if (timer) clearTimeout(timer);
    timers.current.set(
      spec.key,
      setTimeout(() => keep(spec, text), SAVE_AFTER_MS),
    );
  }

  function go(to: number) {
    const at = Math.max(0, Math.min(to, steps.length - 1));
    setStepAt(at);
    window.scrollTo({ top: 0 });
    if (!open) return;
    // Where the run was left, for another device; a failure here loses nothing that matters.
    fetch(`/api/runs/${run.id}/entries`, {
      method: "POST",
      headers: { "Content-Type": "application/json" },
      body: JSON.stringify({ step: at }),
    }).catch(() => {});
  }

  const step = steps[stepAt];
  const stepSpecs = (step?.specKeys ?? []).map((k) => specByKey.get(k)).filter((s): s is Spec => Boolean(s));
  const stepValues: StepValue[] = stepSpecs.flatMap((s) => {
    const v = parseNumber(texts[s.key]);
    return v === undefined || Number.isNaN(v) ? [] : [{ label: s.label, quantity: s.quantity, value: v, unit: s.unit }];
  });
  const typedBySpec = Object.fromEntries(
    specs.flatMap((s) => {
      const v = parseNumber(texts[s.key]);
      return v === undefined || Number.isNaN(v) ? [] : [[s.id, [{ value: v, unit: s.unit }]]];
    }),
  );
  let evaluation: ReturnType<typeof evaluateRecord> | null = null;
  try {
    evaluation = evaluateRecord(specs, typedBySpec);
  } catch {
    evaluation = null;
  }
  const measured = specs.filter((s) => typedBySpec[s.id]).length;
  const unsent = waiting.filter((e) => !e.refused).length;

  return (
    <div className="mx-auto max-w-3xl" data-testid="run-screen" data-run-status={run.status}>
      <header className="mb-4 border-b border-rule pb-3">
        <p className="text-xs font-semibold uppercase tracking-[0.14em] text-brass">
          Run on <Link to={`/builds/${view.build.number}`}>{view.build.number}</Link>
          {view.build.engine ? ` · ${view.build.engine}` : ""}
        </p>
        <h1 className="text-2xl leading-tight sm:text-3xl">{view.procedure.title}</h1>
        <p className="num mt-1 text-graphite-soft">
          Revision {view.revision.number} · started by {view.startedByName ?? "someone no longer here"} ·{" "}
          <span data-testid="run-progress">
            {measured} of {specs.length} specs measured
          </span>
        </p>
      </header>

      {view.newerRevision != null && (
        <p className="mb-4 rounded-md border border-brass bg-brass-soft px-4 py-3" role="note" data-testid="newer-revision">
          {`Revision ${view.newerRevision} of this procedure was published after this run began. The run keeps revision ${view.revision.number}, the one it started with, and its record is filed against it.`}{" "}
          <Link to={`/procedures/${view.procedure.slug}`}>Read revision {view.newerRevision}</Link>
        </p>
      )}

      {run.status !== "open" && <ClosedNote view={view} />}
      {closed && <FormError message={closed} />}

      {open && <SaveState online={online} unsent={unsent} typing={typing.size} sending={sending} refused={Object.keys(refusals).length} />}

      {step ? (
        <section aria-labelledby="step-h" className="card mt-4 space-y-5 p-5" data-testid="run-step" data-step={stepAt}>
          <h2 id="step-h" className="text-xl">
            {stepTitle(step)}
            <span className="num block text-sm font-normal text-graphite-soft">{`Screen ${stepAt + 1} of ${steps.length}`}</span>
          </h2>
          {step.cautions.length > 0 && (
            <div className="rounded-md border border-l-[6px] border-brass bg-brass-soft px-4 py-3" role="note" aria-label="Caution">
              <p className="text-xs font-bold uppercase tracking-[0.14em] text-brass">Caution</p>
              {step.cautions.map((c) => (
                <p key={c} className="mt-1 font-serif text-lg leading-snug">
                  {c}
                </p>
              ))}
            </div>
          )}
          {step.text.map((t, i) => (
            // biome-ignore lint/suspicious/noArrayIndexKey: a step's paragraphs never move; two may read the same
            <p key={i} className={`font-serif leading-relaxed ${i === 0 ? "text-xl sm:text-2xl" : "text-lg"}`}>
              {t}
            </p>
          ))}
          {stepSpecs.map((s) => (
            <EntryField
              key={s.key}
              spec={s}
              text={texts[s.key] ?? ""}
              onType={(t) => onType(s, t)}
              disabled={!open}
              refused={refusals[s.key]}
              waiting={waiting.some((e) => e.specKey === s.key)}
              photos={view.photos.filter((p) => p.specKey === s.key)}
              runId={run.id}
              canPhoto={open}
            />
          ))}
          {step.calculators.map((c, i) => (
            // biome-ignore lint/suspicious/noArrayIndexKey: a step's calculators keep their document order
            <StepCalculator key={i} prefilled={prefillCalculator(c, stepValues)} />
          ))}
        </section>
      ) : (
        <p className="card mt-4">This revision has no steps to work through.</p>
      )}

      <nav className="mt-4 flex items-center justify-between gap-3" aria-label="Steps">
        <button type="button" className="btn min-h-12 px-5 text-base" onClick={() => go(stepAt - 1)} disabled={stepAt === 0}>
          ← Previous
        </button>
        <label className="flex min-w-0 flex-1 flex-col text-sm">
          <span className="sr-only">Go to step</span>
          <select className="field min-h-12" value={stepAt} onChange={(e) => go(Number(e.target.value))}>
            {steps.map((s) => (
              <option key={s.index} value={s.index}>
                {s.index + 1}. {stepTitle(s)}
                {s.specKeys.length ? ` (${s.specKeys.filter((k) => parseNumber(texts[k]) !== undefined).length}/${s.specKeys.length})` : ""}
              </option>
            ))}
          </select>
        </label>
        <button
          type="button"
          className="btn btn-primary min-h-12 px-5 text-base"
          onClick={() => go(stepAt + 1)}
          disabled={stepAt >= steps.length - 1}
        >
          Next →
        </button>
      </nav>

      {open && (
        <FinishPanel
          measured={measured}
          typing={typing.size}
          total={specs.length}
          evaluation={evaluation}
          unsent={unsent}
          actionData={actionData}
        />
      )}
    </div>
  );
}

function SaveState({
  online,
  unsent,
  typing,
  sending,
  refused,
}: {
  online: boolean;
  unsent: number;
  typing: number;
  sending: boolean;
  refused: number;
}) {
  const words =
    unsent === 0
      ? typing > 0
        ? "Keeping what you type…"
        : "Every entry is saved on the server."
      : !online
        ? `No network: ${unsent} ${unsent === 1 ? "entry is" : "entries are"} waiting on this device and will be sent when the network is back. Keep working.`
        : sending
          ? `Sending ${unsent} ${unsent === 1 ? "entry" : "entries"}…`
          : `${unsent} ${unsent === 1 ? "entry is" : "entries are"} waiting on this device; trying again…`;
  const tone = unsent === 0 && typing === 0 ? "border-ok/40 bg-ok-soft text-ok" : "border-brass bg-brass-soft text-graphite";
  return (
    <p
      className={`rounded-md border px-4 py-2 text-base font-semibold ${tone}`}
      role="status"
      data-testid="save-state"
      data-waiting={unsent}
    >
      {words}
      {refused > 0 && <span className="block font-normal">Some values were refused: see the fields marked below.</span>}
    </p>
  );
}

function EntryField({
  spec,
  text,
  onType,
  disabled,
  refused,
  waiting,
  photos,
  runId,
  canPhoto,
}: {
  spec: Spec;
  text: string;
  onType: (t: string) => void;
  disabled: boolean;
  refused?: string;
  waiting: boolean;
  photos: RunView["photos"];
  runId: string;
  canPhoto: boolean;
}) {
  const id = `entry-${spec.key}`;
  const live = liveVerdict(spec, text);
  const unit = unitLabel(spec.unit as UnitCode);
  const problem = refused ?? live.problem;
  return (
    <div className="rounded-lg border border-rule bg-paper/60 p-4" data-testid="entry" data-spec={spec.key}>
      <label htmlFor={id} className="block text-lg font-semibold">
        {spec.label}
      </label>
      <p className="num text-graphite-soft" id={`${id}-limits`}>
        {specLimitsText({ ...spec, nominal: spec.nominal ?? null }) || "no limits: recorded only"}
        {spec.note ? ` · ${spec.note}` : ""}
      </p>
      <div className="mt-2 flex flex-wrap items-center gap-3">
        <div className="flex items-center gap-2">
          <input
            id={id}
            className="field num w-44 text-2xl"
            inputMode="decimal"
            autoComplete="off"
            value={text}
            disabled={disabled}
            onChange={(e) => onType(e.target.value)}
            aria-describedby={`${id}-limits ${id}-verdict${problem ? ` ${id}-error` : ""}`}
            aria-invalid={problem ? true : undefined}
          />
          <span className="text-xl">{unit}</span>
        </div>
        <span id={`${id}-verdict`} aria-live="polite" className="min-h-8">
          {live.verdict && (
            <span
              className={`inline-block rounded border px-2 py-1 text-base font-semibold ${VERDICT_CLASS[live.verdict]}`}
              data-testid="entry-verdict"
            >
              {live.verdict === "within"
                ? "Within spec"
                : live.verdict === "unchecked"
                  ? "Recorded"
                  : `Out of spec: ${READING_VERDICT_LABELS[live.verdict]}`}
            </span>
          )}
          {waiting && <span className="ml-2 text-sm text-graphite-soft">waiting to send</span>}
        </span>
      </div>
      {problem && (
        <p id={`${id}-error`} className="field-error" role="alert">
          {problem}
        </p>
      )}
      <RunPhotos runId={runId} specKey={spec.key} specLabel={spec.label} photos={photos} canAdd={canPhoto} />
    </div>
  );
}

function StepCalculator({ prefilled }: { prefilled: ReturnType<typeof prefillCalculator> }) {
  const { calculator, filled, outcome } = prefilled;
  return (
    <section
      className="rounded-lg border border-teal/40 bg-teal-soft/40 p-4"
      aria-label={`${calcLabel(calculator.kind)} calculator`}
      data-testid="step-calculator"
    >
      <h3 className="text-base font-semibold">
        {calcLabel(calculator.kind)} — {calculator.title}
      </h3>
      {filled.length > 0 ? (
        <p className="text-sm text-graphite-soft">From this step: {filled.map((f) => `${f.input} ← ${f.from}`).join("; ")}</p>
      ) : (
        <p className="text-sm text-graphite-soft">With the procedure's own values until this step's numbers are typed.</p>
      )}
      {outcome.ok ? (
        <dl className="num mt-2 grid grid-cols-[1fr_auto] gap-x-4 gap-y-1 text-base">
          {outcome.rows.map((r) => (
            <div key={r.label} className="contents">
              <dt>{r.label}</dt>
              <dd className={`text-right font-semibold ${r.tone === "bad" ? "text-spec-red" : ""}`}>{r.value}</dd>
            </div>
          ))}
        </dl>
      ) : (
        <p className="mt-2 text-sm">{outcome.message}</p>
      )}
      {outcome.ok &&
        outcome.warnings.map((w) => (
          <p key={w} className="mt-1 text-sm text-brass">
            {w}
          </p>
        ))}
      <p className="mt-2 text-xs text-graphite-soft">{CALC_CAUTION}</p>
    </section>
  );
}

function FinishPanel({
  measured,
  typing,
  total,
  evaluation,
  unsent,
  actionData,
}: {
  measured: number;
  typing: number;
  total: number;
  evaluation: ReturnType<typeof evaluateRecord> | null;
  unsent: number;
  actionData: Props["actionData"];
}) {
  const busy = useNavigation().state === "submitting";
  const errors = actionData?.errors ?? {};
  const missing = total - measured;
  return (
    <section className="card mt-8 space-y-4" aria-labelledby="finish-h" data-testid="finish-panel">
      <h2 id="finish-h" className="text-xl">
        Finish the run
      </h2>
      <p>
        Finishing files the test record against this run's revision.{" "}
        {missing > 0
          ? `${missing} ${missing === 1 ? "spec has" : "specs have"} no value yet: the record will be Incomplete, never Within spec.`
          : "Every spec has a value."}{" "}
        Now: <VerdictBadge verdict={evaluation?.verdict ?? null} notMeasured={evaluation?.counts.notMeasured ?? 0} />
      </p>
      <Form method="post" className="space-y-3" noValidate>
        <input type="hidden" name="intent" value="finish" />
        {actionData?.intent === "finish" && <FormError message={errors.form} />}
        <label htmlFor="f-notes" className="label">
          Notes for the record (optional)
        </label>
        <textarea id="f-notes" name="notes" rows={2} className="field" maxLength={4000} />
        <button
          type="submit"
          className="btn btn-primary min-h-12 px-5 text-base"
          disabled={busy || unsent > 0 || typing > 0 || measured === 0}
        >
          {busy ? "Filing…" : "Finish and file the test record"}
        </button>
        {unsent > 0 && <p className="text-sm text-graphite-soft">Wait until the entries waiting on this device are sent.</p>}
      </Form>
      <details>
        <summary className="cursor-pointer py-2 text-graphite-soft">Stop this run without filing</summary>
        <Form method="post" className="mt-2 space-y-3" noValidate>
          <input type="hidden" name="intent" value="abandon" />
          {actionData?.intent === "abandon" && <FormError message={errors.form} />}
          <label htmlFor="f-reason" className="label">
            Why is it stopped?
          </label>
          <input id="f-reason" name="reason" className="field" aria-invalid={errors.reason ? true : undefined} />
          {errors.reason && (
            <p className="field-error" role="alert">
              {errors.reason}
            </p>
          )}
          <button type="submit" className="btn btn-danger min-h-12">
            Stop the run
          </button>
        </Form>
      </details>
    </section>
  );
}

function ClosedNote({ view }: { view: RunView }) {
  const { run } = view;
  if (run.status === "finished")
    return (
      <p className="mb-4 rounded-md border border-rule bg-card px-4 py-3" data-testid="run-closed">
        This run is finished.{" "}
        {run.testRecordId ? <Link to={`/test-records/${run.testRecordId}`}>Open its test record</Link> : "Its test record was removed."}
      </p>
    );
  return (
    <p className="mb-4 rounded-md border border-rule bg-card px-4 py-3" data-testid="run-closed">
      This run was stopped without filing{run.abandonReason ? `: ${run.abandonReason}` : "."}
    </p>
  );
}
