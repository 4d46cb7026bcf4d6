/** Small hand-drawn SVG chart parts: linear scales, "nice" ticks, a framed plot with axes. */
import type { ReactNode } from "react";
import { formatNumber } from "~/lib/calc-ui/units";

/** Ticks at 1, 2 or 5 × 10^n covering [lo, hi]. */
export function niceTicks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? raw;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

/** The upper end of the axis: the next "nice" value above `max`. */
export function niceMax(max: number): number {
  if (!(max > 0)) return 1;
  const ticks = niceTicks(0, max * 1.02, 5);
  const step = ticks.length > 1 ? ticks[1] - ticks[0] : max;
  return Math.ceil((max * 1.02) / step) * step;
}

export function tickLabel(v: number, step: number): string {
  const decimals = Math.max(0, Math.min(6, -Math.floor(Math.log10(step) + 1e-9)));
  return formatNumber(v, decimals);
}

export interface Frame {
  x: (v: number) => number;
  y: (v: number) => number;
  left: number;
  right: number;
  top: number;
  bottom: number;
}

/** A plot area with grid, ticks and axis titles; children draw inside with the frame's scales. */
export function Plot({
  width = 640,
  height = 340,
  xDomain,
  yDomain,
  xTitle,
  yTitle,
  title,
  children,
  margin = { l: 64, r: 16, t: 16, b: 48 },
  testId,
  yDown = false,
  xTickLabel = tickLabel,
  className = "h-auto w-full",
  interactive = false,
}: {
  width?: number;
  height?: number;
  xDomain: [number, number];
  yDomain: [number, number];
  xTitle: string;
  yTitle: string;
  title: string;
  children: (f: Frame) => ReactNode;
  margin?: { l: number; r: number; t: number; b: number };
  testId?: string;
  /** Values grow downwards (depth below the deck). */
  yDown?: boolean;
  /** The text of an x tick (a video time reads as 1:05, not 65). */
  xTickLabel?: (v: number, step: number) => string;
  className?: string;
  /** Its marks take focus and clicks: a named group, since an image's inside is hidden from assistive technology. */
  interactive?: boolean;
}) {
  const f: Frame = {
    left: margin.l,
    right: width - margin.r,
    top: margin.t,
    bottom: height - margin.b,
    x: (v) => margin.l + ((v - xDomain[0]) / (xDomain[1] - xDomain[0] || 1)) * (width - margin.l - margin.r),
    y: (v) =>
      yDown
        ? margin.t + ((v - yDomain[0]) / (yDomain[1] - yDomain[0] || 1)) * (height - margin.t - margin.b)
        : height - margin.b - ((v - yDomain[0]) / (yDomain[1] - yDomain[0] || 1)) * (height - margin.t - margin.b),
  };
  const xt = niceTicks(xDomain[0], xDomain[1], 6);
  const yt = niceTicks(yDomain[0], yDomain[1], 5);
  const xs = xt.length > 1 ? xt[1] - xt[0] : 1;
  const ys = yt.length > 1 ? yt[1] - yt[0] : 1;
  return (
    <svg
      viewBox={`0 0 ${width} ${height}`}
      className={className}
      role={interactive ? "group" : "img"}
      aria-label={title}
      data-testid={testId}
    >
      <title>{title}</title>
      <rect x={f.left} y={f.top} width={f.right - f.left} height={f.bottom - f.top} className="fill-card stroke-rule" />
      {xt.map((v) => (
        <g key={`x${v}`}>
          <line x1={f.x(v)} x2={f.x(v)} y1={f.top} y2={f.bottom} className="stroke-rule" strokeWidth={0.6} />
          <text x={f.x(v)} y={f.bottom + 16} textAnchor="middle" className="fill-graphite-soft text-[11px]">
            {xTickLabel(v, xs)}
          </text>
        </g>
      ))}
      {yt.map((v) => (
        <g key={`y${v}`}>
          <line x1={f.left} x2={f.right} y1={f.y(v)} y2={f.y(v)} className="stroke-rule" strokeWidth={0.6} />
          <text x={f.left - 6} y={f.y(v) + 4} textAnchor="end" className="fill-graphite-soft text-[11px]">
            {tickLabel(v, ys)}
          </text>
        </g>
      ))}
      <text x={(f.left + f.right) / 2} y={height - 8} textAnchor="middle" className="fill-graphite text-[12px] font-semibold">
        {xTitle}
      </text>
      <text
        x={14}
        y={(f.top + f.bottom) / 2}
        textAnchor="middle"
        transform={`rotate(-90 14 ${(f.top + f.bottom) / 2})`}
        className="fill-graphite text-[12px] font-semibold"
      >
        {yTitle}
      </text>
      {children(f)}
    </svg>
  );
}

/** A legend row below a chart. */
export function Legend({ items }: { items: { label: string; swatch: ReactNode }[] }) {
  return (
    <ul className="mt-2 flex flex-wrap gap-x-5 gap-y-1 text-xs text-graphite-soft">
      {items.map((i) => (
        <li key={i.label} className="flex items-center gap-1.5">
          <svg width="22" height="10" aria-hidden>
            {i.swatch}
          </svg>
          {i.label}
        </li>
      ))}
    </ul>
  );
}
