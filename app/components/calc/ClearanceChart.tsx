/** Cold and hot clearance (or recommended and measured gap) on one scale, against the spec band. */
import { convert, unitLabel, type UnitCode } from "~/lib/calc";
import type { Marker } from "~/lib/calc-ui/clearance-view";
import { formatNumber, decimalsFor } from "~/lib/calc-ui/units";
import { niceTicks, tickLabel } from "./chart";

export function ClearanceChart({
  markers,
  band,
  bandLabel,
  unit,
}: {
  markers: Marker[];
  band?: { min_mm?: number; max_mm?: number };
  bandLabel: string;
  unit: UnitCode;
}) {
  const W = 640;
  const H = 64 + markers.length * 34;
  const L = 24;
  const R = W - 24;
  const v = (mm: number) => convert(mm, "mm", unit);
  const xs = [
    0,
    ...markers.map((m) => v(m.value_mm)),
    ...(band?.min_mm !== undefined ? [v(band.min_mm)] : []),
    ...(band?.max_mm !== undefined ? [v(band.max_mm)] : []),
  ];
  let lo = Math.min(...xs);
  let hi = Math.max(...xs);
  const pad = (hi - lo) * 0.12 || 1;
  lo = lo < 0 ? lo - pad : 0;
  hi += pad;
  const x = (val: number) => L + ((val - lo) / (hi - lo)) * (R - L);
  const ticks = niceTicks(lo, hi, 6);
  const step = ticks.length > 1 ? ticks[1] - ticks[0] : 1;
  const axisY = H - 30;
  const bMin = band?.min_mm !== undefined ? x(v(band.min_mm)) : L;
  const bMax = band?.max_mm !== undefined ? x(v(band.max_mm)) : R;
  return (
    <figure data-testid="clearance-chart">
      <svg viewBox={`0 0 ${W} ${H}`} className="h-auto w-full" role="img" aria-label={`Clearances against ${bandLabel}`}>
        <title>{`Clearances against ${bandLabel}`}</title>
        {band && (
          <>
            <rect x={bMin} y={14} width={Math.max(1, bMax - bMin)} height={axisY - 14} className="fill-ok-soft" />
            {band.min_mm !== undefined && <line x1={bMin} x2={bMin} y1={14} y2={axisY} className="stroke-ok" strokeWidth={1.2} />}
            {band.max_mm !== undefined && <line x1={bMax} x2={bMax} y1={14} y2={axisY} className="stroke-ok" strokeWidth={1.2} />}
            <text x={(bMin + bMax) / 2} y={11} textAnchor="middle" className="fill-ok text-[11px] font-semibold">
              {bandLabel}
            </text>
          </>
        )}
        {lo < 0 && <line x1={x(0)} x2={x(0)} y1={14} y2={axisY} className="stroke-spec-red" strokeDasharray="3 3" />}
        <line x1={L} x2={R} y1={axisY} y2={axisY} className="stroke-graphite-soft" />
        {ticks.map((t) => (
          <g key={t}>
            <line x1={x(t)} x2={x(t)} y1={axisY} y2={axisY + 5} className="stroke-graphite-soft" />
            <text x={x(t)} y={axisY + 17} textAnchor="middle" className="fill-graphite-soft text-[11px]">
              {tickLabel(t, step)}
            </text>
          </g>
        ))}
        <text x={R} y={H - 2} textAnchor="end" className="fill-graphite text-[11px] font-semibold">
          {unitLabel(unit)}
        </text>
        {markers.map((m, i) => {
          const y = 36 + i * 34;
          const cx = x(v(m.value_mm));
          const cls = m.tone === "bad" ? "fill-spec-red" : m.tone === "hot" ? "fill-brass" : "fill-graphite";
          const anchor = cx > (L + R) / 2 ? "end" : "start";
          return (
            <g key={m.label}>
              <line
                x1={x(Math.max(0, lo))}
                x2={cx}
                y1={y}
                y2={y}
                className={m.tone === "bad" ? "stroke-spec-red" : "stroke-graphite-soft"}
                strokeWidth={1}
                strokeDasharray="2 2"
              />
              <circle cx={cx} cy={y} r={6} className={`${cls} stroke-card`} strokeWidth={2} />
              <text
                x={anchor === "end" ? cx - 10 : cx + 10}
                y={y + 4}
                textAnchor={anchor}
                className={`text-[12px] font-semibold ${m.tone === "bad" ? "fill-spec-red" : "fill-graphite"}`}
              >
                {m.label} {formatNumber(v(m.value_mm), decimalsFor(unit))} {unitLabel(unit)}
              </text>
            </g>
          );
        })}
      </svg>
    </figure>
  );
}
