/**
 * Bore distortion pictures: a polar plot per level (deviation from round, exaggerated by a
 * stated factor) and a profile of diameter against depth (taper, barrel or hourglass), each
 * with the compared state overlaid.
 */
import { convert, unitLabel, type BoreLevel, type UnitCode } from "~/lib/calc";
import { decimalsFor, formatNumber } from "~/lib/calc-ui/units";
import { depthValue, fittedDev, type DepthDisplay, type LevelDots } from "~/lib/calc-ui/distortion-view";
import { Legend, Plot, niceTicks } from "./chart";

function depthText(depth_mm: number, d: DepthDisplay): string {
  return `${depthValue(depth_mm, d)} ${unitLabel(d.unit)}`;
}

function pathFor(points: [number, number][]): string {
  return `${points.map(([x, y], i) => `${i ? "L" : "M"}${x.toFixed(2)} ${y.toFixed(2)}`).join(" ")} Z`;
}

export function BorePolar({
  level,
  dots,
  compared,
  comparedDots,
  factor,
  radius_mm,
  smallUnit,
  depth,
  mainLabel,
  compareLabel,
}: {
  depth: DepthDisplay;
  level: BoreLevel;
  dots: LevelDots["dots"];
  compared?: BoreLevel;
  comparedDots?: LevelDots["dots"];
  factor: number;
  radius_mm: number;
  smallUnit: UnitCode;
  mainLabel: string;
  compareLabel: string;
}) {
  const S = 240;
  const c = S / 2;
  const R = 78;
  const pxPerMm = (factor * R) / radius_mm;
  const at = (deg: number, dev: number): [number, number] => {
    const rho = Math.max(2, R + dev * pxPerMm);
    const t = (deg * Math.PI) / 180;
    return [c + rho * Math.sin(t), c - rho * Math.cos(t)];
  };
  const curve = (l: BoreLevel, d: LevelDots["dots"]) => {
    if (l.orders.length > 0) {
      const pts: [number, number][] = [];
      for (let a = 0; a < 360; a += 3) pts.push(at(a, fittedDev(l, a)));
      return pathFor(pts);
    }
    const sorted = [...d].sort((x, y) => x.angleDeg - y.angleDeg);
    return sorted.length > 2 ? pathFor(sorted.map((p) => at(p.angleDeg, p.dev_mm))) : "";
  };
  const ring = (dev: number) => R + dev * pxPerMm;
  const tick = maxTick(level, compared);
  return (
    <figure className="rounded-md border border-rule bg-card p-2" data-testid="bore-polar">
      <svg
        viewBox={`0 0 ${S} ${S + 26}`}
        className="h-auto w-full"
        role="img"
        aria-label={`Shape of the bore at ${depthText(level.depth_mm, depth)} deep, deviations × ${factor}`}
      >
        <circle cx={c} cy={c} r={R} className="fill-none stroke-graphite-soft" strokeWidth={0.8} strokeDasharray="2 3" />
        {tick > 0 &&
          [-tick, tick].map((t) => <circle key={t} cx={c} cy={c} r={ring(t)} className="fill-none stroke-rule" strokeWidth={0.8} />)}
        {[0, 90, 180, 270].map((a) => {
          const [x2, y2] = [c + (R + 24) * Math.sin((a * Math.PI) / 180), c - (R + 24) * Math.cos((a * Math.PI) / 180)];
          return (
            <g key={a}>
              <line
                x1={c}
                y1={c}
                x2={c + (R + 12) * Math.sin((a * Math.PI) / 180)}
                y2={c - (R + 12) * Math.cos((a * Math.PI) / 180)}
                className="stroke-rule"
                strokeWidth={0.6}
              />
              <text x={x2} y={y2 + 4} textAnchor="middle" className="fill-graphite-soft text-[10px]">
                {a}°
              </text>
            </g>
          );
        })}
        {compared && comparedDots && (
          <path d={curve(compared, comparedDots)} className="fill-none stroke-teal" strokeWidth={1.5} strokeDasharray="5 3" />
        )}
        <path d={curve(level, dots)} className="fill-brass-soft/40 stroke-graphite" strokeWidth={1.8} />
        {dots.map((p, i) => {
          const [x, y] = at(p.angleDeg, p.dev_mm);
          // biome-ignore lint/suspicious/noArrayIndexKey: the dots never reorder, and two readings may share an angle
          return <circle key={i} cx={x} cy={y} r={2.6} className="fill-brass" />;
        })}
        <text x={6} y={14} className="fill-graphite text-[11px] font-semibold">
          {depthText(level.depth_mm, depth)} deep
        </text>
        <text x={S - 6} y={14} textAnchor="end" className="fill-brass text-[10px] font-semibold" data-testid="exaggeration">
          deviation × {new Intl.NumberFormat("en-US").format(factor)}
        </text>
        <text x={c} y={S + 6} textAnchor="middle" className="fill-graphite-soft text-[10px]">
          Out-of-round {formatNumber(convert(level.outOfRound_mm, "mm", smallUnit), smallUnit === "um" ? 1 : 3)} {unitLabel(smallUnit)}
          {compared
            ? ` (${compareLabel}: ${formatNumber(convert(compared.outOfRound_mm, "mm", smallUnit), smallUnit === "um" ? 1 : 3)})`
            : ""}
        </text>
        {tick > 0 && (
          <text x={c} y={S + 20} textAnchor="middle" className="fill-graphite-soft text-[9px]">
            thin rings: ±{formatNumber(convert(tick, "mm", smallUnit), smallUnit === "um" ? 0 : 2)} {unitLabel(smallUnit)} on the radius
          </text>
        )}
      </svg>
      <span className="sr-only">{mainLabel}</span>
    </figure>
  );
}

function maxTick(level: BoreLevel, compared?: BoreLevel): number {
  const m = Math.max(level.outOfRound_mm, compared?.outOfRound_mm ?? 0) / 2;
  if (!(m > 0)) return 0;
  const t = niceTicks(0, m, 2);
  return t[1] ?? m;
}

export function BoreProfile({
  levels,
  compared,
  reference_mm,
  smallUnit,
  lengthUnit,
  depth,
  mainLabel,
  compareLabel,
  shape,
}: {
  levels: BoreLevel[];
  compared?: BoreLevel[];
  reference_mm: number;
  smallUnit: UnitCode;
  /** The unit sizes are shown in (the reference bore in the axis title). */
  lengthUnit: UnitCode;
  depth: DepthDisplay;
  mainLabel: string;
  compareLabel: string;
  shape: string;
}) {
  const dx = (mm: number) => convert(mm - reference_mm, "mm", smallUnit);
  const all = [...levels, ...(compared ?? [])];
  let lo = Math.min(...all.map((l) => dx(l.minDiameter_mm)), 0);
  let hi = Math.max(...all.map((l) => dx(l.maxDiameter_mm)), 0);
  const pad = (hi - lo) * 0.12 || 1;
  lo -= pad;
  hi += pad;
  // Depths are plotted in the unit they were typed in, so the axis reads as the inputs do.
  const dIn = (mm: number) => convert(mm, "mm", depth.unit);
  const dMax = Math.max(...all.map((l) => dIn(l.depth_mm)));
  const depthTop = 0;
  const depthBottom = dMax * 1.08 || 1;
  const H = 300;
  return (
    <figure data-testid="bore-profile">
      <Plot
        title={`Diameter against depth: ${shape}`}
        height={H}
        xDomain={[lo, hi]}
        yDomain={[depthTop, depthBottom]}
        yDown
        xTitle={`Diameter minus ${formatNumber(convert(reference_mm, "mm", lengthUnit), decimalsFor(lengthUnit))} ${unitLabel(lengthUnit)} (${unitLabel(smallUnit)})`}
        yTitle={`Depth below the deck (${unitLabel(depth.unit)})`}
      >
        {(f) => {
          const y = (depth_mm: number) => f.y(dIn(depth_mm));
          const band = (ls: BoreLevel[]) =>
            [
              ...ls.map((l) => `${f.x(dx(l.minDiameter_mm))},${y(l.depth_mm)}`),
              ...[...ls].reverse().map((l) => `${f.x(dx(l.maxDiameter_mm))},${y(l.depth_mm)}`),
            ].join(" ");
          const mean = (ls: BoreLevel[]) => ls.map((l) => `${f.x(dx(l.meanDiameter_mm))},${y(l.depth_mm)}`).join(" ");
          return (
            <>
              <line x1={f.x(0)} x2={f.x(0)} y1={f.top} y2={f.bottom} className="stroke-graphite-soft" strokeDasharray="2 3" />
              {compared && compared.length > 0 && (
                <>
                  <polygon points={band(compared)} className="fill-teal-soft/30 stroke-teal" strokeWidth={1} strokeDasharray="4 3" />
                  <polyline points={mean(compared)} className="fill-none stroke-teal" strokeWidth={1.8} strokeDasharray="6 3" />
                </>
              )}
              <polygon points={band(levels)} className="fill-brass-soft/50 stroke-brass" strokeWidth={1} />
              <polyline points={mean(levels)} className="fill-none stroke-graphite" strokeWidth={2} />
              {levels.map((l) => (
                <circle key={l.depth_mm} cx={f.x(dx(l.meanDiameter_mm))} cy={y(l.depth_mm)} r={3.5} className="fill-graphite" />
              ))}
              <text x={f.right - 6} y={f.top + 16} textAnchor="end" className="fill-graphite text-[12px] font-semibold">
                {shape}
              </text>
            </>
          );
        }}
      </Plot>
      <Legend
        items={[
          {
            label: `${mainLabel}: mean diameter`,
            swatch: <line x1="0" y1="5" x2="22" y2="5" className="stroke-graphite" strokeWidth={2} />,
          },
          {
            label: `${mainLabel}: min to max`,
            swatch: <rect x="0" y="1" width="22" height="8" className="fill-brass-soft stroke-brass" />,
          },
          ...(compared?.length
            ? [
                {
                  label: `${compareLabel}: mean`,
                  swatch: <line x1="0" y1="5" x2="22" y2="5" className="stroke-teal" strokeWidth={1.8} strokeDasharray="6 3" />,
                },
                {
                  label: `${compareLabel}: min to max`,
                  swatch: <rect x="0" y="1" width="22" height="8" className="fill-teal-soft stroke-teal" />,
                },
              ]
            : []),
          { label: "Reference bore", swatch: <line x1="0" y1="5" x2="22" y2="5" className="stroke-graphite-soft" strokeDasharray="2 3" /> },
        ]}
      />
    </figure>
  );
}
