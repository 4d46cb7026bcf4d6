import { useCallback, useEffect, useRef, useState } from "react";
import { Form, Link, useNavigation } from "react-router";
import { FormError } from "~/components/forms";
import { VerdictBadge } from "~/components/test-records/parts";
import { CALC_CAUTION, calcLabel } from "~/lib/calc-kinds";
import { parseNumber, unitLabel } from "~/lib/calc-ui/units";
import type { UnitCode } from "~/lib/calc";
import { specLimitsText } from "~/lib/procedures/reader-blocks";
import {
  type EntryInput as SentEntry,
  type Place,
  parsePlaceKey,
  placeKey,
  placeOf,
  placeLabel,
  placesBySpec,
  placeWord,
  progressOf,
  studsField,
} from "~/lib/runs/entries";
import { type DistortionGrid, type GridReading, gridCells, gridCellsBySpec, prefillDistortion, stepGrid, takesGrid } from "~/lib/runs/grid";
import { prefillCalculator, type Prefilled, type StepValue } from "~/lib/runs/prefill";
import type { RunCalculator } from "~/lib/runs/steps";
import type { RunView } from "~/lib/runs/runs.server";
import { stepTitle } from "~/lib/runs/steps";
import { READING_VERDICT_LABELS, type ReadingVerdict } from "~/lib/test-records/labels";
import { evaluateRecord, readingVerdict } from "~/lib/test-records/verdict";
import { typedDecimals, typedText } from "~/lib/typed-number";
import {
  addWaiting,
  addWaitingPhoto,
  discardPhoto,
  type QueuedEntry,
  type QueuedPhoto,
  removeWaiting,
  sendPhoto,
  sendWaiting,
  settlePhoto,
  waitingEntries,
  waitingPhotos,
} from "./queue";
import { RunPhotos } from "./RunPhotos";

type Spec = RunView["specs"][number];
/** One entry field: a spec, at its place when it is measured per cylinder, journal or stud. */
type Slot = { spec: Spec; place: Place | null; key: string; label: string };

const slotOf = (spec: Spec, n: number | null): Slot => {
  const place = spec.field && n != null ? { [spec.field]: n } : null;
  return { spec, place, key: placeKey(spec.key, place), label: spec.field && n != null ? placeLabel(spec.field, n) : spec.label };
};
/** A cell of a bore's distortion grid: the cylinder's diameter at a depth and an angle. */
const gridSlotOf = (spec: Spec, cylinder: number, place: Place, words: string): Slot => ({
  spec,
  place,
  key: placeKey(spec.key, place),
  label: `${placeLabel("cylinder", cylinder)}, ${words}`,
});
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
  // Keyed by spec and place (placeKey): "bore@cylinder3", or the spec's key for a spec measured once.
  const [texts, setTexts] = useState<Record<string, string>>(() =>
    Object.fromEntries(Object.entries(view.values).map(([k, v]) => [k, v.value == null ? "" : typedText(v.value, v.decimals)])),
  );
  // Rows added with "Next stud" (or "Next cylinder" where the build does not say how many).
  const [addedRows, setAddedRows] = useState<Record<string, number>>({});
  // The place last typed at, per spec: its value feeds the step's calculators and a photo belongs there.
  const [lastPlace, setLastPlace] = useState<Record<string, number>>({});
  const [waiting, setWaiting] = useState<QueuedEntry[]>([]);
  const [photosWaiting, setPhotosWaiting] = useState<QueuedPhoto[]>([]);
  const [sentPhotos, setSentPhotos] = useState<RunView["photos"]>([]);
  const [sending, setSending] = useState(false);
  const [online, setOnline] = useState(true);
  const [refusals, setRefusals] = useState<Record<string, string>>({});
  const [closed, setClosed] = useState<string | null>(null);
  // Fields typed in whose pause has not come yet: not kept anywhere, so not "saved" either.
  const [typing, setTyping] = useState<ReadonlySet<string>>(new Set());
  /** What is typed in the finish panel's "How many studs…" fields, by spec key. */
  const [studCounts, setStudCounts] = useState<Record<string, string>>({});
  const timers = useRef(new Map<string, ReturnType<typeof setTimeout>>());
  const flushing = useRef(false);
  const specByKeyRef = useRef(specByKey);
  specByKeyRef.current = specByKey;

  const flushPhotos = useCallback(async () => {
    for (const p of (await waitingPhotos(run.id)).filter((x) => !x.refused)) {
      const out = await sendPhoto(run.id, p);
      if (out.kind === "offline") break;
      if (out.kind === "closed") {
        setClosed(out.reason);
        break;
      }
      const spec = specByKeyRef.current.get(p.specKey);
      if (out.kind === "sent" && out.url && spec) {
        const at = slotOf(spec, placeOf(p.position)?.n ?? null);
        const id = out.url.split("/").pop() ?? p.key;
        setSentPhotos((list) => [
          ...list,
          {
            id,
            runId: run.id,
            specKey: p.specKey,
            specLabel: spec.label,
            where: at.place ? at.label : "",
            placeKey: at.key,
            url: out.url as string,
            mime: p.blob.type,
            takenByName: null,
            createdAt: new Date(p.takenAt),
          },
        ]);
      }
      setPhotosWaiting(await settlePhoto(run.id, p.key, out.kind === "refused" ? out.reason : undefined));
    }
  }, [run.id]);

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
            if (one.kind === "refused") setRefusals((r) => ({ ...r, [placeKey(e.specKey, e.position)]: one.reason }));
            if (one.kind !== "closed") setWaiting(await removeWaiting(run.id, new Set([e.key])));
          }
          break;
        }
        if (out.kind === "refused") setRefusals((r) => ({ ...r, [placeKey(batch[0].specKey, batch[0].position)]: out.reason }));
        list = await removeWaiting(run.id, new Set(out.keys));
        setWaiting(list);
      }
      setWaiting(await waitingEntries(run.id));
      await flushPhotos();
    } finally {
      flushing.current = false;
      setSending(false);
    }
  }, [run.id, flushPhotos]);

  // The device's queue outlives the page: entries and photos taken before a reload or while offline are shown and sent.
  useEffect(() => {
    let live = true;
    Promise.all([waitingEntries(run.id), waitingPhotos(run.id)]).then(([list, photos]) => {
      if (!live) return;
      setWaiting(list);
      setPhotosWaiting(photos);
      if (list.length) {
        setTexts((t) => {
          const next = { ...t };
          for (const e of list) next[placeKey(e.specKey, e.position)] = e.value == null ? "" : typedText(e.value, e.decimals);
          return next;
        });
      }
      if (list.length || photos.length) void flush();
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

  function keep(slot: Slot, text: string) {
    timers.current.delete(slot.key);
    // The field stops being "typed in" only once its entry is in the device's queue, in the same
    // render: in between, the screen would say every entry is saved while this one is not kept yet.
    // A field typed in again meanwhile has a new pause running and stays "typed in".
    const kept = () =>
      setTyping((t) => {
        if (timers.current.has(slot.key)) return t;
        const next = new Set(t);
        next.delete(slot.key);
        return next;
      });
    const value = parseNumber(text);
    if (value !== undefined && Number.isNaN(value)) {
      kept();
      return;
    }
    const entry: QueuedEntry = {
      key: newKey(),
      specKey: slot.spec.key,
      ...(slot.place ? { position: slot.place as NonNullable<SentEntry["position"]> } : {}),
      value: value ?? null,
      unit: slot.spec.unit as SentEntry["unit"],
      decimals: value == null ? null : typedDecimals(text),
      typedAt: new Date().toISOString(),
      device: deviceName(),
    };
    void addWaiting(run.id, entry).then((list) => {
      setWaiting(list);
      kept();
      if (navigator.onLine) void flush();
    });
  }

  function onType(slot: Slot, text: string) {
    setTexts((t) => ({ ...t, [slot.key]: text }));
    setTyping((t) => new Set(t).add(slot.key));
    if (slot.place && slot.spec.field) setLastPlace((l) => ({ ...l, [slot.spec.key]: slot.place?.[slot.spec.field!] as number }));
    setRefusals((r) => {
      const { [slot.key]: _gone, ...rest } = r;
      return rest;
    });
    const timer = timers.current.get(slot.key);
    if (timer) clearTimeout(timer);
    timers.current.set(
      slot.key,
      setTimeout(() => keep(slot, text), SAVE_AFTER_MS),
    );
  }

  function takePhoto(slot: Slot, file: File) {
    const photo: QueuedPhoto = {
      key: newKey(),
      specKey: slot.spec.key,
      position: slot.place,
      blob: file,
      name: file.name || "photo.jpg",
      takenAt: new Date().toISOString(),
    };
    // Kept on the device first, like an entry: a photo taken without a network goes when it is back.
    void addWaitingPhoto(run.id, photo).then((list) => {
      setPhotosWaiting(list);
      if (navigator.onLine) void flush();
    });
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

  /** The rows a spec shows: its offered places, the rows it starts with, those added, and any typed. */
  function slotsOf(spec: Spec): Slot[] {
    if (!spec.field) return [slotOf(spec, null)];
    const typed = Object.keys(texts)
      .map(parsePlaceKey)
      .filter((k) => k.specKey === spec.key && k.place)
      .map((k) => Object.values(k.place as Place)[0] as number);
    const rows = Math.max(spec.startRows, spec.offered.length, ...typed, 0) + (addedRows[spec.key] ?? 0);
    return Array.from({ length: rows }, (_, i) => slotOf(spec, i + 1));
  }
  /** A spec measured per cylinder or journal whose count the build gives has exactly those rows. */
  const fixedRows = (spec: Spec) =>
    (spec.field === "cylinder" && view.build.cylinders != null) || (spec.field === "journal" && view.build.mainJournals != null);

  // What is typed, as the server's latest-per-place map: progress and the verdict count places as finishing will.
  const typedLatest = new Map<string, { valueEntered: number | null } & Place>();
  const typedBySpec: Record<string, { value: number; unit: string }[]> = {};
  for (const [k, text] of Object.entries(texts)) {
    const v = parseNumber(text);
    const { specKey, place } = parsePlaceKey(k);
    const spec = specByKey.get(specKey);
    if (!spec) continue;
    const ok = v !== undefined && !Number.isNaN(v);
    typedLatest.set(k, { valueEntered: ok ? v : null, ...(place ?? {}) });
    if (ok) typedBySpec[spec.id] = [...(typedBySpec[spec.id] ?? []), { value: v, unit: spec.unit }];
  }
  const places = placesBySpec(specs, view.build, typedLatest, gridCellsBySpec(steps, specs));
  const progress = progressOf(places);
  // Finishing counts each per-stud spec's studs up to the number asked for in the finish panel
  // (its rows until one is typed): the panel's count and verdict say what filing will.
  const studSpecs = specs.filter((s) => s.field === "fastener").map((s) => ({ key: s.key, label: s.label, prefill: slotsOf(s).length }));
  const studs = Object.fromEntries(
    studSpecs.map((sp) => {
      const n = Number(studCounts[sp.key]);
      return [sp.key, Number.isInteger(n) && n >= 1 && n <= 200 ? n : sp.prefill];
    }),
  );
  const finishPlaces = placesBySpec(specs, view.build, typedLatest, gridCellsBySpec(steps, specs), studs);
  const finishProgress = progressOf(finishPlaces);
  // Cylinders whose distortion grid is begun and not full: filed as they are, and said before finishing.
  const partialGrids = steps.flatMap((st) => {
    const g = stepGrid(st.calculators);
    if (!g) return [];
    return st.specKeys
      .map((k) => specByKey.get(k))
      .filter((s): s is Spec => Boolean(s) && s?.field === "cylinder" && takesGrid(s))
      .flatMap((s) =>
        slotsOf(s).flatMap((sl) => {
          const cells = gridCells(g.grid, sl.place?.cylinder as number);
          const typed = cells.filter((c) => {
            const v = parseNumber(texts[placeKey(s.key, c.place)]);
            return v !== undefined && !Number.isNaN(v);
          }).length;
          return typed > 0 && typed < cells.length ? [`${s.label}, ${sl.label} (${typed} of ${cells.length})`] : [];
        }),
      );
  });
  const missingPlaces = finishPlaces.reduce(
    (n, p) => n + (p.offered.length && p.missing.length < p.offered.length ? p.missing.length : 0),
    0,
  );

  const step = steps[stepAt];
  const stepSpecs = (step?.specKeys ?? []).map((k) => specByKey.get(k)).filter((s): s is Spec => Boolean(s));
  // A bore measured per cylinder beside a Bore distortion calculator is read in that calculator's grid.
  const grid = step ? stepGrid(step.calculators) : null;
  const inGrid = (s: Spec) => Boolean(grid) && s.field === "cylinder" && takesGrid(s);
  const stepValues: StepValue[] = stepSpecs.flatMap((s) => {
    // A per-place spec feeds its calculators the place last typed at (else the highest typed).
    const slots = slotsOf(s).filter((sl) => {
      const v = parseNumber(texts[sl.key]);
      return v !== undefined && !Number.isNaN(v);
    });
    const last = lastPlace[s.key];
    const slot = slots.find((sl) => sl.place && s.field && sl.place[s.field] === last) ?? slots.at(-1);
    if (!slot) return [];
    const v = parseNumber(texts[slot.key]) as number;
    return [{ label: slot.place ? `${s.label} (${slot.label})` : s.label, quantity: s.quantity, value: v, unit: s.unit }];
  });
  let evaluation: ReturnType<typeof evaluateRecord> | null = null;
  try {
    evaluation = evaluateRecord(specs, typedBySpec);
    if (evaluation.verdict === "within" && missingPlaces) evaluation = { ...evaluation, verdict: "incomplete" };
  } catch {
    evaluation = null;
  }
  const unsent = waiting.filter((e) => !e.refused).length;
  const unsentPhotos = photosWaiting.filter((p) => !p.refused).length;
  const allPhotos = [...view.photos, ...sentPhotos];
  const stepProgress = (keys: string[]) => {
    const mine = places.filter((p) => keys.includes(p.key));
    const p = progressOf(mine);
    return keys.length ? ` (${p.measured}/${p.total})` : "";
  };

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
            {progress.measured} of {progress.total} measured
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

      {open && (
        <SaveState
          online={online}
          unsent={unsent}
          photos={unsentPhotos}
          typing={typing.size}
          sending={sending}
          refused={Object.keys(refusals).length + photosWaiting.filter((p) => p.refused).length}
        />
      )}

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
          {stepSpecs.map((s) => {
            const slots = slotsOf(s);
            const photos = (defaultSlot: string, chosenSlots: Slot[]) => (
              <RunPhotos
                specKey={s.key}
                specLabel={s.label}
                slots={chosenSlots.map((sl) => ({ key: sl.key, label: sl.label }))}
                defaultSlot={defaultSlot}
                photos={allPhotos.filter((p) => p.specKey === s.key)}
                waiting={photosWaiting.filter((p) => p.specKey === s.key)}
                canAdd={open}
                onPhoto={(slotKey, file) => takePhoto(chosenSlots.find((sl) => sl.key === slotKey) ?? chosenSlots[0], file)}
                onDiscard={(key) => void discardPhoto(run.id, key).then(setPhotosWaiting)}
              />
            );
            if (grid && inGrid(s))
              return (
                <BoreGrid
                  key={s.key}
                  spec={s}
                  cylinders={slots}
                  grid={grid.grid}
                  calculator={grid.calculator}
                  texts={texts}
                  onType={onType}
                  disabled={!open}
                  refusals={refusals}
                  waitingKeys={new Set(waiting.map((e) => placeKey(e.specKey, e.position)))}
                  onAddRow={open && !fixedRows(s) ? () => setAddedRows((a) => ({ ...a, [s.key]: (a[s.key] ?? 0) + 1 })) : undefined}
                  photos={photos}
                />
              );
            const last = s.field ? (slots.find((sl) => sl.place?.[s.field!] === lastPlace[s.key]) ?? slots[0]) : slots[0];
            return (
              <EntryGroup
                key={s.key}
                spec={s}
                slots={slots}
                texts={texts}
                onType={onType}
                disabled={!open}
                refusals={refusals}
                waitingKeys={new Set(waiting.map((e) => placeKey(e.specKey, e.position)))}
                onAddRow={
                  open && s.field && !fixedRows(s) ? () => setAddedRows((a) => ({ ...a, [s.key]: (a[s.key] ?? 0) + 1 })) : undefined
                }
              >
                {photos(last.key, slots)}
              </EntryGroup>
            );
          })}
          {step.calculators.map((c, i) =>
            // The grid's calculator is shown inside the bore's grid, per cylinder.
            c === grid?.calculator && stepSpecs.some(inGrid) ? null : (
              // biome-ignore lint/suspicious/noArrayIndexKey: a step's calculators keep their document order
              <StepCalculator key={i} prefilled={prefillCalculator(c, stepValues)} />
            ),
          )}
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
                {stepProgress(s.specKeys)}
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
          measured={finishProgress.measured}
          typing={typing.size}
          total={finishProgress.total}
          evaluation={evaluation}
          unsent={unsent + unsentPhotos}
          partialGrids={partialGrids}
          studSpecs={studSpecs}
          studCounts={studCounts}
          onStudCount={(key, text) => setStudCounts((c) => ({ ...c, [key]: text }))}
          actionData={actionData}
        />
      )}
    </div>
  );
}

function SaveState({
  online,
  unsent,
  photos,
  typing,
  sending,
  refused,
}: {
  online: boolean;
  unsent: number;
  photos: number;
  typing: number;
  sending: boolean;
  refused: number;
}) {
  const parts = [
    unsent ? `${unsent} ${unsent === 1 ? "entry" : "entries"}` : "",
    photos ? `${photos} ${photos === 1 ? "photo" : "photos"}` : "",
  ].filter(Boolean);
  const what = parts.join(" and ");
  const are = unsent + photos === 1 ? "is" : "are";
  const words =
    unsent + photos === 0
      ? typing > 0
        ? "Keeping what you type…"
        : "Every entry is saved on the server."
      : !online
        ? `No network: ${what} ${are} waiting on this device and will be sent when the network is back. Keep working.`
        : sending
          ? `Sending ${what}…`
          : `${what} ${are} waiting on this device; trying again…`;
  const tone = unsent + photos === 0 && typing === 0 ? "border-ok/40 bg-ok-soft text-ok" : "border-brass bg-brass-soft text-graphite";
  return (
    <p
      className={`rounded-md border px-4 py-2 text-base font-semibold ${tone}`}
      role="status"
      data-testid="save-state"
      data-waiting={unsent}
      data-waiting-photos={photos}
    >
      {words.charAt(0).toUpperCase() + words.slice(1)}
      {refused > 0 && <span className="block font-normal">Some values or photos were refused: see the fields marked below.</span>}
    </p>
  );
}

function VerdictTag({ verdict, short, small }: { verdict: ReadingVerdict; short?: boolean; small?: boolean }) {
  return (
    <span
      className={`inline-block rounded border font-semibold ${small ? "px-1 text-xs" : "px-2 py-1 text-base"} ${VERDICT_CLASS[verdict]}`}
      data-testid="entry-verdict"
    >
      {verdict === "within"
        ? short
          ? "Within"
          : "Within spec"
        : verdict === "unchecked"
          ? "Recorded"
          : `${short ? "Out:" : "Out of spec:"} ${READING_VERDICT_LABELS[verdict]}`}
    </span>
  );
}

/**
 * A spec's entry fields: one for a spec measured once; for one measured per cylinder, journal
 * or stud, a compact list of its places, each with its own field and verdict as typed.
 */
/** What every spec's entry fields are given: its typed texts, the typing handler, refusals and what waits. */
type EntryFieldsProps = {
  spec: Spec;
  texts: Record<string, string>;
  onType: (slot: Slot, t: string) => void;
  disabled: boolean;
  refusals: Record<string, string>;
  waitingKeys: ReadonlySet<string>;
  onAddRow?: () => void;
};

/** The spec's limits and note under its name, which each of its fields is described by. */
function LimitsLine({ spec, id }: { spec: Spec; id: string }) {
  return (
    <p className="num text-graphite-soft" id={id}>
      {specLimitsText({ ...spec, nominal: spec.nominal ?? null }) || "no limits: recorded only"}
      {spec.note ? ` · ${spec.note}` : ""}
    </p>
  );
}

function EntryGroup({
  spec,
  slots,
  texts,
  onType,
  disabled,
  refusals,
  waitingKeys,
  onAddRow,
  children,
}: EntryFieldsProps & { slots: Slot[]; children: React.ReactNode }) {
  const id = `entry-${spec.key}`;
  const unit = unitLabel(spec.unit as UnitCode);
  const limits = <LimitsLine spec={spec} id={`${id}-limits`} />;
  if (!spec.field) {
    const slot = slots[0];
    const text = texts[slot.key] ?? "";
    const live = liveVerdict(spec, text);
    const problem = refusals[slot.key] ?? live.problem;
    return (
      <div className="rounded-lg border border-rule bg-paper/60 p-4" data-testid="entry" data-spec={spec.key}>
        <label htmlFor={id} className="block text-lg font-semibold">
          {spec.label}
        </label>
        {limits}
        <div className="mt-2 flex flex-wrap items-center gap-3">
          <div className="flex items-center gap-2">
            <EntryInput id={id} limitsId={`${id}-limits`} className="w-44 text-2xl" {...{ slot, text, disabled, onType, problem }} />
            <span className="text-xl">{unit}</span>
          </div>
          <span id={`${id}-verdict`} aria-live="polite" className="min-h-8">
            {live.verdict && <VerdictTag verdict={live.verdict} />}
            {waitingKeys.has(slot.key) && <span className="ml-2 text-sm text-graphite-soft">waiting to send</span>}
          </span>
        </div>
        {problem && (
          <p id={`${id}-error`} className="field-error" role="alert">
            {problem}
          </p>
        )}
        {children}
      </div>
    );
  }
  const word = placeWord(spec.field);
  return (
    <fieldset className="rounded-lg border border-rule bg-paper/60 p-4" data-testid="entry" data-spec={spec.key}>
      <legend className="px-1 text-lg font-semibold">{spec.label}</legend>
      {limits}
      <p className="text-sm text-graphite-soft">
        {`One value per ${word}, in ${unit}.`}
        {onAddRow ? ` Add a row with “Next ${word}” as you go; a ${word} skipped in the numbering is filed as not measured.` : ""}
      </p>
      <ol className="mt-3 grid gap-2 sm:grid-cols-2" data-testid="entry-places">
        {slots.map((slot) => {
          const text = texts[slot.key] ?? "";
          const live = liveVerdict(spec, text);
          const problem = refusals[slot.key] ?? live.problem;
          const fid = `${id}-${slot.key.split("@")[1]}`;
          return (
            <li
              key={slot.key}
              className="rounded-md border border-rule/70 bg-card px-3 py-2"
              data-testid="entry-place"
              data-place={slot.label}
            >
              <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
                <label htmlFor={fid} className="num w-16 shrink-0 font-semibold">
                  {slot.label}
                  <span className="sr-only">, {spec.label}</span>
                </label>
                <EntryInput id={fid} limitsId={`${id}-limits`} className="w-28 text-xl" {...{ slot, text, disabled, onType, problem }} />
                <span id={`${fid}-verdict`} aria-live="polite" className="min-h-8">
                  {live.verdict && <VerdictTag verdict={live.verdict} short />}
                  {waitingKeys.has(slot.key) && <span className="ml-2 text-sm text-graphite-soft">waiting</span>}
                </span>
              </div>
              {problem && (
                <p id={`${fid}-error`} className="field-error" role="alert">
                  {problem}
                </p>
              )}
            </li>
          );
        })}
      </ol>
      {onAddRow && (
        <button type="button" className="btn mt-3 min-h-11" onClick={onAddRow}>
          {`Next ${word}`}
        </button>
      )}
      {children}
    </fieldset>
  );
}

/**
 * One entry field, the same wherever a value is typed (once, per place, in a bore's grid): the
 * decimal keypad, and the spec's limits, the field's verdict and any problem read out with it.
 */
function EntryInput({
  id,
  limitsId,
  className,
  slot,
  text,
  disabled,
  onType,
  problem,
}: {
  id: string;
  limitsId: string;
  className: string;
  slot: Slot;
  text: string;
  disabled: boolean;
  onType: (slot: Slot, t: string) => void;
  problem: string | null;
}) {
  return (
    <input
      id={id}
      className={`field num ${className}`}
      inputMode="decimal"
      autoComplete="off"
      value={text}
      disabled={disabled}
      onChange={(e) => onType(slot, e.target.value)}
      aria-describedby={`${limitsId} ${id}-verdict${problem ? ` ${id}-error` : ""}`}
      aria-invalid={problem ? true : undefined}
    />
  );
}

/**
 * A bore read per cylinder in its step's Bore distortion grid: one cylinder at a time (the
 * tablet is held in one hand), a diameter at each of the calculator's depths and angles, each
 * judged against the bore's limits as typed, and the cylinder's distortion from those numbers.
 */
function BoreGrid({
  spec,
  cylinders,
  grid,
  calculator,
  texts,
  onType,
  disabled,
  refusals,
  waitingKeys,
  onAddRow,
  photos,
}: EntryFieldsProps & {
  cylinders: Slot[];
  grid: DistortionGrid;
  calculator: RunCalculator;
  photos: (defaultSlot: string, slots: Slot[]) => React.ReactNode;
}) {
  const [at, setAt] = useState(0);
  const i = Math.max(0, Math.min(at, cylinders.length - 1));
  const id = `entry-${spec.key}`;
  const unit = unitLabel(spec.unit as UnitCode);
  const depthWords = (d: { value: number; unit: string }) => `${d.value} ${d.unit}`;
  const cellsOf = (slot: Slot) => {
    const n = slot.place?.cylinder as number;
    return gridCells(grid, n).map((c) => ({ ...c, slot: gridSlotOf(spec, n, c.place, `${depthWords(c.depth)} down, ${c.angle}°`) }));
  };
  const typedIn = (slot: Slot) =>
    cellsOf(slot).filter((c) => {
      const v = parseNumber(texts[c.slot.key]);
      return v !== undefined && !Number.isNaN(v);
    });
  const current = cylinders[i];
  const n = current.place?.cylinder as number;
  const cells = cellsOf(current);
  const readings: GridReading[] = typedIn(current).map((c) => ({
    depth: c.depth,
    angle: c.angle,
    value: parseNumber(texts[c.slot.key]) as number,
    unit: spec.unit,
  }));
  const last = i === cylinders.length - 1;
  return (
    <fieldset className="rounded-lg border border-rule bg-paper/60 p-4" data-testid="entry" data-spec={spec.key}>
      <legend className="px-1 text-lg font-semibold">{spec.label}</legend>
      <LimitsLine spec={spec} id={`${id}-limits`} />
      <p className="text-sm text-graphite-soft">
        {`Each cylinder at ${grid.depths.length} ${grid.depths.length === 1 ? "depth" : "depths"} below the deck and ${grid.angles.length} ${grid.angles.length === 1 ? "angle" : "angles"}, in ${unit}; every diameter is judged against the bore's limits.`}
      </p>
      <fieldset className="mt-3 flex flex-wrap gap-2">
        <legend className="sr-only">Cylinders</legend>
        {cylinders.map((c, j) => (
          <button
            key={c.key}
            type="button"
            className={`btn min-h-11 num ${j === i ? "btn-primary" : ""}`}
            aria-pressed={j === i}
            onClick={() => setAt(j)}
          >
            {`${c.label} · ${typedIn(c).length}/${cells.length}`}
          </button>
        ))}
      </fieldset>
      <div className="mt-3 overflow-x-auto" data-testid="bore-grid" data-cylinder={n}>
        <table className="w-full min-w-[28rem] table-fixed border-separate border-spacing-1">
          <caption className="text-left font-serif text-xl">{`${placeLabel("cylinder", n)}: diameters in ${unit}`}</caption>
          <thead>
            <tr>
              <th scope="col" className="w-20 text-left text-sm font-semibold">
                Depth
              </th>
              {grid.angles.map((a) => (
                <th key={a} scope="col" className="num text-sm font-semibold">{`${a}°`}</th>
              ))}
            </tr>
          </thead>
          <tbody>
            {grid.depths.map((d, di) => (
              <tr key={`${d.value}${d.unit}`}>
                <th scope="row" className="num text-left text-sm font-semibold">
                  {depthWords(d)}
                </th>
                {grid.angles.map((a, ai) => {
                  const cell = cells[di * grid.angles.length + ai];
                  const text = texts[cell.slot.key] ?? "";
                  const live = liveVerdict(spec, text);
                  const problem = refusals[cell.slot.key] ?? live.problem;
                  const cid = `${id}-c${n}-d${di}-a${ai}`;
                  return (
                    <td key={a} className="align-top" data-testid="grid-cell" data-place={cell.slot.label}>
                      <label htmlFor={cid} className="sr-only">
                        {`${cell.slot.label}, ${spec.label}`}
                      </label>
                      <EntryInput
                        id={cid}
                        limitsId={`${id}-limits`}
                        className="min-h-12 w-full px-2 text-xl"
                        {...{ slot: cell.slot, text, disabled, onType, problem }}
                      />
                      <span id={`${cid}-verdict`} aria-live="polite" className="block min-h-6 text-center">
                        {live.verdict && <VerdictTag verdict={live.verdict} short small />}
                        {waitingKeys.has(cell.slot.key) && <span className="block text-xs text-graphite-soft">waiting</span>}
                      </span>
                      {problem && (
                        <p id={`${cid}-error`} className="field-error text-xs" role="alert">
                          {problem}
                        </p>
                      )}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="mt-3 flex flex-wrap justify-between gap-2">
        <button type="button" className="btn min-h-12 px-4" disabled={i === 0} onClick={() => setAt(i - 1)}>
          ← Previous cylinder
        </button>
        {(!last || onAddRow) && (
          <button
            type="button"
            className="btn min-h-12 px-4"
            onClick={() => {
              if (last) onAddRow?.();
              setAt(i + 1);
            }}
          >
            Next cylinder →
          </button>
        )}
      </div>
      <div className="mt-3">
        <StepCalculator
          title={`${calcLabel(calculator.kind)} — ${placeLabel("cylinder", n)}`}
          prefilled={prefillDistortion(calculator, `${spec.label}, ${placeLabel("cylinder", n)}`, readings, cells.length)}
        />
      </div>
      {photos(current.key, cylinders)}
    </fieldset>
  );
}

function StepCalculator({ prefilled, title }: { prefilled: Prefilled; title?: string }) {
  const { calculator, filled, outcome } = prefilled;
  return (
    <section
      className="rounded-lg border border-teal/40 bg-teal-soft/40 p-4"
      aria-label={`${calcLabel(calculator.kind)} calculator`}
      data-testid="step-calculator"
    >
      <h3 className="text-base font-semibold">{title ?? `${calcLabel(calculator.kind)} — ${calculator.title}`}</h3>
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
  partialGrids,
  studSpecs,
  studCounts,
  onStudCount,
  actionData,
}: {
  measured: number;
  typing: number;
  total: number;
  evaluation: ReturnType<typeof evaluateRecord> | null;
  unsent: number;
  partialGrids: string[];
  /** Per-stud specs and the count offered (the last run's or the spec's own, or the rows shown). */
  studSpecs: { key: string; label: string; prefill: number }[];
  studCounts: Record<string, string>;
  onStudCount: (key: string, text: string) => void;
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
          ? `${missing} ${missing === 1 ? "place has" : "places have"} no value yet: the record will be Incomplete, never Within spec.`
          : "Every spec has a value at every place offered."}{" "}
        Now: <VerdictBadge verdict={evaluation?.verdict ?? null} notMeasured={evaluation?.counts.notMeasured ?? 0} />
      </p>
      {partialGrids.length > 0 && (
        <p className="text-sm" data-testid="partial-grids">
          {`Distortion grids not full, filed with the diameters typed: ${partialGrids.join("; ")}.`}
        </p>
      )}
      <Form method="post" className="space-y-3" noValidate>
        <input type="hidden" name="intent" value="finish" />
        {actionData?.intent === "finish" && <FormError message={errors.form} />}
        {studSpecs.map((sp) => {
          const name = studsField(sp.key);
          const error = actionData?.intent === "finish" ? errors[name] : undefined;
          return (
            <div key={sp.key} className="space-y-1" data-testid="stud-count">
              <label htmlFor={`f-${name}`} className="label">
                {`How many studs does “${sp.label}” cover?`}
              </label>
              <input
                id={`f-${name}`}
                name={name}
                type="number"
                inputMode="numeric"
                min={1}
                max={200}
                value={studCounts[sp.key] ?? String(sp.prefill)}
                onChange={(e) => onStudCount(sp.key, e.currentTarget.value)}
                className="field w-28 tabular-nums"
                aria-invalid={error ? true : undefined}
                aria-describedby={`f-${name}-hint`}
              />
              <p id={`f-${name}-hint`} className="text-sm text-graphite-soft">
                Every stud up to this number left without a value makes the record Incomplete.
              </p>
              {error && (
                <p className="field-error" role="alert">
                  {error}
                </p>
              )}
            </div>
          );
        })}
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
        {unsent > 0 && <p className="text-sm text-graphite-soft">Wait until the entries and photos waiting on this device are sent.</p>}
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
