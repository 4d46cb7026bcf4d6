import { useMemo, useState } from "react";
import { NUT_FACTOR_R_SQUARED_LABEL, THREAD_PRESETS, fitNutFactor, fromSI, isUnitCode, type NutFactorFit, type UnitCode } from "~/lib/calc";
import { displayUnit, quantityDef } from "~/lib/recordings/quantities";
import { formatTime } from "~/lib/time-format";
import { CALC_CAUTION } from "~/lib/calc-kinds";
import { Plot } from "~/components/calc/chart";
import type { ReadingRow } from "./types";

// One size for both charts of a recording, on the calculators' chart kit.
const SIZE = { width: 560, height: 240, margin: { l: 56, r: 16, t: 14, b: 38 }, className: "num h-auto w-full" };

function fromStored(r: ReadingRow, unit: string): number {
  if (unit === "%") return r.valueSi * 100;
  if (isUnitCode(unit) && isUnitCode(r.unitEntered)) return fromSI(r.valueSi, unit as UnitCode);
  return r.valueEntered;
}

/** Value against video time for one quantity. */
function TimeChart({ readings, onSeek, durationS }: { readings: ReadingRow[]; onSeek: (t: number) => void; durationS: number | null }) {
  const timed = readings.filter((r) => r.t != null);
  const quantities = [...new Set(timed.map((r) => r.quantity))];
  const [q, setQ] = useState(quantities[0] ?? "");
  const active = quantities.includes(q) ? q : quantities[0];
  if (!active) return <p className="text-sm text-graphite-soft">Readings with a time in the video are drawn here against the time.</p>;
  const pts = timed.filter((r) => r.quantity === active);
  const unit = pts[0].unitEntered;
  const data = pts.map((r) => ({ t: r.t as number, v: fromStored(r, unit), r }));
  const tMax = Math.max(durationS ?? 0, ...data.map((d) => d.t * 1.05), 1);
  const vMin = Math.min(...data.map((d) => d.v));
  const vMax = Math.max(...data.map((d) => d.v));
  const lo = vMin === vMax ? vMin - Math.abs(vMin || 1) * 0.1 : vMin - (vMax - vMin) * 0.08;
  const hi = vMin === vMax ? vMax + Math.abs(vMax || 1) * 0.1 : vMax + (vMax - vMin) * 0.08;
  const label = quantityDef(active)?.label ?? active;
  return (
    <figure>
      <div className="mb-2 flex items-center gap-2">
        <label htmlFor="chart-q" className="text-sm font-semibold">
          Quantity
        </label>
        <select id="chart-q" className="field w-auto py-1 text-sm" value={active} onChange={(e) => setQ(e.target.value)}>
          {quantities.map((x) => (
            <option key={x} value={x}>
              {quantityDef(x)?.label ?? x}
            </option>
          ))}
        </select>
      </div>
      <Plot
        {...SIZE}
        interactive
        title={`${label} against video time, ${data.length} readings`}
        xDomain={[0, tMax]}
        yDomain={[lo, hi]}
        xTitle="Video time"
        yTitle={`${label} (${displayUnit(unit)})`}
        xTickLabel={(v) => formatTime(v).replace(/\.0$/, "")}
      >
        {(f) => (
          <>
            {data.map((d) => (
              // A point is a button: a 44-unit transparent hit circle around the visible dot, so a
              // finger finds it on the tablet (WCAG 2.5.5); the focus ring is drawn on the hit circle.
              // biome-ignore lint/a11y/useSemanticElements: an SVG point cannot be a <button>; the role, the focus and the keys make it one
              <g
                key={d.r.id}
                className="group cursor-pointer focus:outline-none"
                role="button"
                tabIndex={0}
                aria-label={`Play from ${formatTime(d.t)}: ${d.r.label || label}, ${Number(d.v.toPrecision(6))} ${displayUnit(unit)}`}
                onClick={() => onSeek(d.t)}
                onKeyDown={(e) => {
                  if (e.key === "Enter" || e.key === " ") {
                    e.preventDefault();
                    onSeek(d.t);
                  }
                }}
              >
                <title>{`${formatTime(d.t)} · ${d.r.label || label}: ${Number(d.v.toPrecision(6))} ${displayUnit(unit)}`}</title>
                <circle
                  cx={f.x(d.t)}
                  cy={f.y(d.v)}
                  r="22"
                  fill="transparent"
                  className="stroke-transparent group-focus-visible:stroke-graphite"
                  strokeWidth="2"
                />
              </g>
            ))}
            {/* The dots above every hit circle: where neighbours' circles overlap, a click on a dot
                plays that dot's moment, not the moment of a neighbour drawn later. */}
            <g>
              {data.map((d) => (
                // biome-ignore lint/a11y/noStaticElementInteractions: a pointer shortcut; the focusable button of the same point, drawn beneath, has the name and the keys
                <circle
                  key={d.r.id}
                  cx={f.x(d.t)}
                  cy={f.y(d.v)}
                  r="4.5"
                  className="cursor-pointer fill-teal stroke-card hover:stroke-graphite"
                  strokeWidth="1.5"
                  onClick={() => onSeek(d.t)}
                />
              ))}
            </g>
          </>
        )}
      </Plot>
      <figcaption className="text-xs text-graphite-soft">Click a point to play from its moment.</figcaption>
    </figure>
  );
}

/** Torque and clamp-load readings paired by stud, label and pass. */
export function pairTorqueClamp(readings: ReadingRow[]) {
  const key = (r: ReadingRow) => `${r.fastener ?? ""}|${r.label.trim().toLowerCase()}|${(r.conditions?.pass ?? "").trim().toLowerCase()}`;
  const torque = new Map<string, ReadingRow>();
  const clamp = new Map<string, ReadingRow>();
  for (const r of readings) {
    if (r.quantity === "torque") torque.set(key(r), r);
    if (r.quantity === "clamp-load") clamp.set(key(r), r);
  }
  const pairs: { key: string; torque: ReadingRow; clamp: ReadingRow }[] = [];
  for (const [k, t] of torque) {
    const c = clamp.get(k);
    if (c) pairs.push({ key: k, torque: t, clamp: c });
  }
  return pairs;
}

function NutFactorChart({ readings }: { readings: ReadingRow[] }) {
  const pairs = useMemo(() => pairTorqueClamp(readings), [readings]);
  const [thread, setThread] = useState("M12x1.5");
  let fit: NutFactorFit | null = null;
  let problem: string | null = null;
  if (pairs.length) {
    try {
      fit = fitNutFactor(
        pairs.map((p) => ({ torque: { value: p.torque.valueSi, unit: "N.m" }, preload: { value: p.clamp.valueSi, unit: "N" } })),
        thread,
      );
    } catch (err) {
      const issues = (err as { issues?: { message: string }[] }).issues;
      problem = issues?.[0]?.message ?? (err as Error).message;
    }
  }
  if (!pairs.length) return null;
  const pts = pairs.map((p) => ({ x: p.torque.valueSi, y: p.clamp.valueSi / 1000, p }));
  const xMax = Math.max(...pts.map((d) => d.x)) * 1.1;
  const yMax = Math.max(...pts.map((d) => d.y), fit ? (fit.slope_N_per_Nm * xMax) / 1000 : 0) * 1.08;
  return (
    <figure data-testid="nut-factor-chart">
      <div className="mb-2 flex flex-wrap items-center gap-2">
        <label htmlFor="chart-thread" className="text-sm font-semibold">
          Thread
        </label>
        <select id="chart-thread" className="field w-auto py-1 text-sm" value={thread} onChange={(e) => setThread(e.target.value)}>
          {THREAD_PRESETS.map((t) => (
            <option key={t.designation} value={t.designation}>
              {t.designation}
            </option>
          ))}
        </select>
        <span className="text-xs text-graphite-soft">
          {pairs.length} torque / clamp-load {pairs.length === 1 ? "pair" : "pairs"}, matched by label and pass
        </span>
      </div>
      <Plot
        {...SIZE}
        title="Clamp load against torque with the fitted nut-factor line"
        xDomain={[0, xMax]}
        yDomain={[0, yMax]}
        xTitle="Torque (N·m)"
        yTitle="Clamp load (kN)"
      >
        {(f) => (
          <>
            {fit && (
              <line
                x1={f.x(0)}
                y1={f.y(0)}
                x2={f.x(xMax)}
                y2={f.y((fit.slope_N_per_Nm * xMax) / 1000)}
                className="stroke-brass"
                strokeWidth="2"
                strokeDasharray="6 4"
              />
            )}
            {pts.map((d) => (
              <circle key={d.p.key} cx={f.x(d.x)} cy={f.y(d.y)} r="4.5" className="fill-teal stroke-card" strokeWidth="1.5">
                <title>{`${d.p.torque.label || "–"}${d.p.torque.conditions?.pass ? `, pass ${d.p.torque.conditions.pass}` : ""}: ${Number(d.x.toPrecision(5))} N·m → ${Number(d.y.toPrecision(5))} kN`}</title>
              </circle>
            ))}
          </>
        )}
      </Plot>
      {fit && (
        <figcaption className="mt-1 space-y-1 text-sm">
          <p data-testid="nut-factor-result">
            Effective nut factor <span className="font-semibold">K = {fit.k.toFixed(3)}</span>
            {fit.n > 1 && (
              <>
                {" "}
                ± {fit.kStdDev.toFixed(3)} (1 s.d., {(fit.kCoefficientOfVariation * 100).toFixed(1)} % scatter)
              </>
            )}{" "}
            · n = {fit.n} · {NUT_FACTOR_R_SQUARED_LABEL} = {fit.rSquared.toFixed(3)}
          </p>
          {fit.warnings.map((w) => (
            <p key={w} className="text-graphite-soft">
              {w}
            </p>
          ))}
          <p className="text-xs text-graphite-soft">Least-squares line through the origin, F = T / (K·d). {CALC_CAUTION}</p>
        </figcaption>
      )}
      {problem && (
        <p className="field-error" role="alert">
          Cannot fit a nut factor: {problem}
        </p>
      )}
    </figure>
  );
}

export function ReadingsChart({
  readings,
  onSeek,
  durationS,
}: {
  readings: ReadingRow[];
  onSeek: (t: number) => void;
  durationS: number | null;
}) {
  if (!readings.length) return null;
  const hasPairs = pairTorqueClamp(readings).length > 0;
  return (
    <section className="card" aria-labelledby="chart-h">
      <h2 id="chart-h" className="mb-4 text-lg">
        Readings chart
      </h2>
      <div className={`grid gap-8 ${hasPairs ? "lg:grid-cols-2" : ""}`}>
        <div>
          <h3 className="mb-2 text-base">Against video time</h3>
          <TimeChart readings={readings} onSeek={onSeek} durationS={durationS} />
        </div>
        {hasPairs && (
          <div>
            <h3 className="mb-2 text-base">Torque against clamp load</h3>
            <NutFactorChart readings={readings} />
          </div>
        )}
      </div>
    </section>
  );
}
