/** Preload against torque: the chosen model's line, the yield and 90 % lines, measured points and their fitted line. */
import { convert, unitLabel, type NutFactorFit, type PreloadResult, type UnitCode } from "~/lib/calc";
import { formatNumber } from "~/lib/calc-ui/units";
import { Legend, Plot, niceMax } from "./chart";

export function PreloadChart({
  result,
  yieldForce_N,
  fit,
  points,
  torqueUnit,
  forceUnit,
  modelLabel,
}: {
  result: PreloadResult;
  yieldForce_N?: number;
  fit?: NutFactorFit;
  points?: { torque_Nm: number; preload_N: number }[];
  torqueUnit: UnitCode;
  forceUnit: UnitCode;
  modelLabel: string;
}) {
  const perN = result.torque_Nm / result.preload_N; // N·m per N of the chosen model
  const tx = (Nm: number) => convert(Nm, "N.m", torqueUnit);
  const fy = (N: number) => convert(N, "N", forceUnit);
  let tMax = result.torque_Nm * 1.4;
  if (yieldForce_N) tMax = Math.max(tMax, yieldForce_N * perN * 1.1);
  for (const p of points ?? []) tMax = Math.max(tMax, p.torque_Nm * 1.1);
  let fMax = tMax / perN;
  if (yieldForce_N) fMax = Math.max(fMax, yieldForce_N * 1.08);
  for (const p of points ?? []) fMax = Math.max(fMax, p.preload_N * 1.08);
  const xMax = niceMax(tx(tMax));
  const yMax = niceMax(fy(fMax));
  const clipT = (F_N: number) => Math.min(tx(F_N * perN), xMax);
  const over90 = yieldForce_N !== undefined && result.preload_N > 0.9 * yieldForce_N;
  return (
    <figure>
      <Plot
        testId="preload-chart"
        title={`Preload against torque, ${modelLabel}`}
        xDomain={[0, xMax]}
        yDomain={[0, yMax]}
        xTitle={`Torque (${unitLabel(torqueUnit)})`}
        yTitle={`Preload (${unitLabel(forceUnit)})`}
      >
        {(f) => {
          const lineEndT = Math.min(xMax, tx(convert(yMax, forceUnit, "N") * perN));
          return (
            <>
              {yieldForce_N !== undefined && (
                <>
                  <rect
                    x={f.left}
                    width={f.right - f.left}
                    y={f.y(Math.min(yMax, fy(yieldForce_N)))}
                    height={f.y(fy(0.9 * yieldForce_N)) - f.y(Math.min(yMax, fy(yieldForce_N)))}
                    className="fill-spec-red-soft"
                    opacity={0.6}
                  />
                  <line
                    x1={f.left}
                    x2={f.right}
                    y1={f.y(fy(yieldForce_N))}
                    y2={f.y(fy(yieldForce_N))}
                    className="stroke-spec-red"
                    strokeWidth={1.5}
                  />
                  <text x={f.left + 6} y={f.y(fy(yieldForce_N)) - 5} className="fill-spec-red text-[11px] font-semibold">
                    Yield ({formatNumber(fy(yieldForce_N), forceUnit === "N" || forceUnit === "lbf" ? 0 : 1)} {unitLabel(forceUnit)})
                  </text>
                  <line
                    x1={f.left}
                    x2={f.right}
                    y1={f.y(fy(0.9 * yieldForce_N))}
                    y2={f.y(fy(0.9 * yieldForce_N))}
                    className="stroke-brass"
                    strokeWidth={1.5}
                    strokeDasharray="6 4"
                  />
                  <text x={f.left + 6} y={f.y(fy(0.9 * yieldForce_N)) + 14} className="fill-brass text-[11px] font-semibold">
                    90 % of yield
                  </text>
                </>
              )}
              <line
                x1={f.x(0)}
                y1={f.y(0)}
                x2={f.x(lineEndT)}
                y2={f.y(fy(convert(lineEndT, torqueUnit, "N.m") / perN))}
                className="stroke-graphite"
                strokeWidth={2}
              />
              {fit && fit.slope_N_per_Nm > 0 && (
                <line
                  x1={f.x(0)}
                  y1={f.y(0)}
                  x2={f.x(Math.min(xMax, tx(convert(yMax, forceUnit, "N") / fit.slope_N_per_Nm)))}
                  y2={f.y(Math.min(yMax, fy(fit.slope_N_per_Nm * convert(xMax, torqueUnit, "N.m"))))}
                  className="stroke-teal"
                  strokeWidth={1.5}
                  strokeDasharray="3 3"
                />
              )}
              {(points ?? []).map((p, i) => {
                const key = i; // the pasted points never reorder, and two may be the same: the position is the identity
                return (
                  <circle
                    key={key}
                    cx={f.x(tx(p.torque_Nm))}
                    cy={f.y(fy(p.preload_N))}
                    r={4}
                    className="fill-teal stroke-card"
                    strokeWidth={1}
                  />
                );
              })}
              {fit && (
                <text x={f.right - 8} y={f.top + 16} textAnchor="end" className="fill-teal text-[12px] font-semibold">
                  Fitted K = {formatNumber(fit.k, 3)} ± {formatNumber(fit.kStdDev, 3)} (n = {fit.n})
                </text>
              )}
              <circle
                cx={f.x(clipT(result.preload_N))}
                cy={f.y(Math.min(yMax, fy(result.preload_N)))}
                r={6}
                className={over90 ? "fill-spec-red stroke-card" : "fill-brass stroke-card"}
                strokeWidth={2}
              />
            </>
          );
        }}
      </Plot>
      <Legend
        items={[
          { label: modelLabel, swatch: <line x1="0" y1="5" x2="22" y2="5" className="stroke-graphite" strokeWidth={2} /> },
          { label: "This result", swatch: <circle cx="11" cy="5" r="4" className={over90 ? "fill-spec-red" : "fill-brass"} /> },
          ...(yieldForce_N !== undefined
            ? [
                {
                  label: "Yield of the material",
                  swatch: <line x1="0" y1="5" x2="22" y2="5" className="stroke-spec-red" strokeWidth={1.5} />,
                },
                {
                  label: "90 % of yield",
                  swatch: <line x1="0" y1="5" x2="22" y2="5" className="stroke-brass" strokeWidth={1.5} strokeDasharray="6 4" />,
                },
              ]
            : []),
          ...(points?.length
            ? [
                { label: "Measured points", swatch: <circle cx="11" cy="5" r="4" className="fill-teal" /> },
                {
                  label: "Fitted through the origin",
                  swatch: <line x1="0" y1="5" x2="22" y2="5" className="stroke-teal" strokeWidth={1.5} strokeDasharray="3 3" />,
                },
              ]
            : []),
        ]}
      />
    </figure>
  );
}
