import { Form } from "react-router";
import { FormError } from "~/components/forms";
import { TWO_POINT_GAUGE_NOTE, type ClearanceResult, type DistortionResult } from "~/lib/calc";
import { CALC_CAUTION } from "~/lib/calc-kinds";
import { formatNumber, formatQ } from "~/lib/calc-ui/units";
import { depthEntered, type Position } from "~/lib/recordings/positions";
import { boreGroups, isBoreSpec, isClearanceSpec, isPistonSpec } from "~/lib/test-records/calcs";
import type { SpecLimits } from "~/lib/test-records/verdict";
import { fmtDay, fmtNum } from "./parts";
import { limitsText, typedReadingText } from "./units";

type Spec = { id: string; label: string; quantity: string; unit: string; min: number | null; max: number | null; nominal: number | null };
type Reading = {
  id: string;
  specId: string;
  position: number;
  valueEntered: number;
  valueDecimals: number | null;
  unitEntered: string;
  note: string;
} & Partial<Position>;
type CalcRun = { id: string; kind: string; label: string; version: number; result: unknown; by: string | null; createdAt: string | Date };

function mm(x: number | undefined) {
  return x == null || !Number.isFinite(x) ? "—" : formatQ(x, "mm", "mm", 1);
}

export function CalcResult({ kind, result }: { kind: string; result: unknown }) {
  if (kind === "distortion") {
    const r = result as DistortionResult;
    return (
      <div className="overflow-x-auto">
        <table className="num w-full text-left text-sm">
          <thead className="text-xs uppercase tracking-wide text-graphite-soft">
            <tr>
              <th className="py-1 pr-3">Depth</th>
              <th className="pr-3 text-right">Mean Ø</th>
              <th className="pr-3 text-right">Min Ø</th>
              <th className="pr-3 text-right">Max Ø</th>
              <th className="pr-3 text-right">Out-of-round</th>
              <th className="text-right">Order 2</th>
            </tr>
          </thead>
          <tbody>
            {r.levels.map((l) => (
              <tr key={l.depth_mm} className="border-t border-rule/60">
                <td className="py-1 pr-3">{fmtNum(l.depth_mm)} mm</td>
                <td className="pr-3 text-right">{mm(l.meanDiameter_mm)}</td>
                <td className="pr-3 text-right">{mm(l.minDiameter_mm)}</td>
                <td className="pr-3 text-right">{mm(l.maxDiameter_mm)}</td>
                <td className="pr-3 text-right font-semibold">{mm(l.outOfRound_mm)}</td>
                <td className="text-right">
                  {(() => {
                    const o = l.orders.find((x) => x.order === 2);
                    return o ? `${mm(o.radialAmplitude_mm)} at ${Math.round(o.phaseDeg)}°` : "—";
                  })()}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="num mt-1 text-sm">
          Taper (largest − smallest mean): <strong>{mm(r.taper_mm)}</strong> · top minus bottom: {mm(r.taperTopToBottom_mm)}
        </p>
        {r.warnings.map((w) => (
          <p key={w} className="text-sm text-brass">
            {w}
          </p>
        ))}
        <p className="mt-1 text-xs text-graphite-soft">{TWO_POINT_GAUGE_NOTE}</p>
      </div>
    );
  }
  const r = result as ClearanceResult;
  return (
    <div className="text-sm">
      <p className="num">
        Clearance <strong>{mm(r.clearance_mm)}</strong> ({formatQ(r.clearance_mm, "mm", "thou")})
        {r.perInchOfDiameter != null && <> · {formatNumber(r.perInchOfDiameter * 1000, 2)} thou per inch of bore</>}
        {r.verdict && (
          <>
            {" "}
            ·{" "}
            <span className={r.verdict === "within" ? "font-semibold text-ok" : "font-semibold text-spec-red"}>
              {r.verdict === "within"
                ? "within the clearance spec"
                : r.verdict === "below"
                  ? "below the clearance spec (tight)"
                  : "above the clearance spec (loose)"}
            </span>
          </>
        )}
      </p>
      {r.warnings.map((w) => (
        <p key={w} className="text-brass">
          {w}
        </p>
      ))}
    </div>
  );
}

const typed = typedReadingText;

/** One group's Bore distortion form: each diameter at the depth and angle of its position fields. */
function DistortionForm({
  spec,
  cylinder,
  label,
  readings,
  readingLabel,
  errors,
  values,
  open,
}: {
  spec: SpecLimits;
  cylinder: number | null;
  label: string | null;
  readings: Reading[];
  readingLabel: (r: Reading) => string;
  errors: Record<string, string>;
  values: Record<string, string>;
  open: boolean;
}) {
  const lacking = readings.some((r) => r.depthM == null || r.angleDeg == null);
  return (
    <details className="rounded-md border border-rule p-3" open={open} data-testid="distortion-run">
      <summary className="cursor-pointer font-semibold">
        Bore distortion from the {readings.length} readings of “{spec.label}”{label ? `, ${label}` : ""}
      </summary>
      <Form method="post" className="mt-2 space-y-2">
        <input type="hidden" name="intent" value="distortion" />
        <input type="hidden" name="specId" value={spec.id} />
        {label !== null && <input type="hidden" name="cylinder" value={cylinder ?? ""} />}
        <p className="text-sm text-graphite-soft">
          Each diameter at the depth below the deck and the gauge angle filed with it.
          {lacking && " Where a reading was filed without them, type them here."}
        </p>
        <table className="num text-sm">
          <thead className="text-xs uppercase text-graphite-soft">
            <tr>
              <th className="pr-3 text-left">Diameter</th>
              <th className="pr-3 text-left">Depth below deck</th>
              <th className="text-left">Angle</th>
            </tr>
          </thead>
          <tbody>
            {readings.map((r) => {
              const depth = depthEntered({ depthM: r.depthM ?? null, depthUnit: r.depthUnit ?? null });
              return (
                <tr key={r.id} data-testid="distortion-reading">
                  <td className="pr-3">{typed(r)}</td>
                  <td className="py-0.5 pr-3">
                    {depth ? (
                      <span data-testid="filed-depth">
                        {fmtNum(depth.value)} {depth.unit}
                      </span>
                    ) : (
                      <input
                        className="field w-24 py-1"
                        name={`depth.${r.id}`}
                        inputMode="decimal"
                        placeholder="mm"
                        aria-label={`Depth in mm for ${readingLabel(r)}`}
                        defaultValue={values[`depth.${r.id}`] ?? ""}
                        aria-invalid={errors[`depth.${r.id}`] ? true : undefined}
                      />
                    )}
                  </td>
                  <td className="py-0.5">
                    {r.angleDeg != null ? (
                      <span data-testid="filed-angle">{fmtNum(r.angleDeg)}°</span>
                    ) : (
                      <input
                        className="field w-24 py-1"
                        name={`angle.${r.id}`}
                        inputMode="decimal"
                        placeholder="°"
                        aria-label={`Angle for ${readingLabel(r)}`}
                        defaultValue={values[`angle.${r.id}`] ?? ""}
                        aria-invalid={errors[`angle.${r.id}`] ? true : undefined}
                      />
                    )}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
        <button className="btn" type="submit">
          Run Bore distortion
        </button>
      </Form>
    </details>
  );
}

/** A choice of one of the record's readings for piston-to-wall. */
function ReadingSelect({
  name,
  label,
  readings,
  readingLabel,
  defaultId,
  error,
}: {
  name: string;
  label: string;
  readings: Reading[];
  readingLabel: (r: Reading) => string;
  defaultId?: string;
  error?: string;
}) {
  return (
    <label className="text-sm">
      <span className="label">{label}</span>
      <select name={name} className="field" defaultValue={defaultId ?? ""} aria-invalid={error ? true : undefined}>
        <option value="">Choose…</option>
        {readings.map((r) => (
          <option key={r.id} value={r.id}>
            {readingLabel(r)}
          </option>
        ))}
      </select>
      {error && <span className="field-error block">{error}</span>}
    </label>
  );
}

/** The record's "Calculations": runs kept with it, and the forms that run one on its readings. */
export function RecordCalcs({
  specs,
  readings,
  calcs,
  currentVersion,
  canRun,
  actionData,
}: {
  specs: Spec[];
  readings: Reading[];
  calcs: CalcRun[];
  currentVersion: number;
  canRun: boolean;
  actionData?: { intent?: string; errors?: Record<string, string>; values?: Record<string, string> };
}) {
  const errors = actionData?.errors ?? {};
  const values = actionData?.values ?? {};
  const lim = specs;
  const specOf = (r: Reading) => lim.find((s) => s.id === r.specId);
  const groups = boreGroups(lim, readings);
  const lengthReadings = readings.filter((r) => specOf(r)?.quantity === "length");
  const readingLabel = (r: Reading) => `${specOf(r)?.label} #${r.position + 1}: ${typed(r)}${r.note ? ` (${r.note})` : ""}`;
  const defBore = lengthReadings.find((r) => isBoreSpec(specOf(r)!));
  const defPiston = lengthReadings.find((r) => isPistonSpec(specOf(r)!));
  const defClearance = lim.find(isClearanceSpec);
  // Piston-to-wall needs a bore and a piston diameter among the readings.
  const canPtw = Boolean(defBore && defPiston);
  const message = errors.calc ?? errors.form;

  return (
    <section id="calcs" className="card space-y-3" aria-labelledby="calcs-h">
      <h2 id="calcs-h" className="text-lg">
        Calculations
      </h2>
      {calcs.length ? (
        <ul className="space-y-3">
          {calcs.map((c) => (
            <li key={c.id} className="border-b border-rule/60 pb-3 last:border-0" data-testid="calc-run">
              <p className="font-semibold">{c.label}</p>
              <p className="num text-xs text-graphite-soft">
                {c.by ?? "Someone"} · {fmtDay(c.createdAt)} · from {c.version === 0 ? "the readings as filed" : `version ${c.version}`}
                {c.version !== currentVersion && " (readings amended since)"}
              </p>
              <CalcResult kind={c.kind} result={c.result} />
            </li>
          ))}
        </ul>
      ) : (
        <p className="text-sm text-graphite-soft">
          {groups.length > 0 || canPtw
            ? "No calculator has been run on these readings."
            : "No calculator applies to these specs: Bore distortion needs three or more bore diameters, piston-to-wall a bore and a piston reading."}
        </p>
      )}
      {canRun && (groups.length > 0 || canPtw) && (
        <div className="space-y-3 border-t border-rule pt-3">
          {actionData && message && <FormError message={message} />}
          {groups.map((g) => (
            <DistortionForm
              key={`${g.spec.id}-${g.cylinder}`}
              spec={g.spec}
              cylinder={g.cylinder}
              label={g.label}
              readings={g.readings}
              readingLabel={readingLabel}
              errors={errors}
              values={values}
              open={actionData?.intent === "distortion"}
            />
          ))}
          {canPtw && (
            <details className="rounded-md border border-rule p-3" open={actionData?.intent === "piston-to-wall"}>
              <summary className="cursor-pointer font-semibold">Piston-to-wall from a bore and a piston reading</summary>
              <Form method="post" className="mt-2 grid gap-2 sm:grid-cols-2">
                <input type="hidden" name="intent" value="piston-to-wall" />
                <ReadingSelect
                  name="boreReading"
                  label="Bore reading"
                  readings={lengthReadings}
                  readingLabel={readingLabel}
                  defaultId={defBore?.id}
                  error={errors.boreReading}
                />
                <ReadingSelect
                  name="pistonReading"
                  label="Piston reading"
                  readings={lengthReadings}
                  readingLabel={readingLabel}
                  defaultId={defPiston?.id}
                  error={errors.pistonReading}
                />
                <label className="text-sm sm:col-span-2">
                  <span className="label">Check against</span>
                  <select name="clearanceSpec" className="field" defaultValue={defClearance?.id ?? ""}>
                    <option value="">No spec</option>
                    {lim
                      .filter((s) => s.quantity === "length" && (s.min != null || s.max != null))
                      .map((s) => (
                        <option key={s.id} value={s.id}>
                          {s.label} ({limitsText(s)})
                        </option>
                      ))}
                  </select>
                </label>
                <div>
                  <button className="btn" type="submit">
                    Run Clearances
                  </button>
                </div>
              </Form>
            </details>
          )}
          <p className="text-xs text-graphite-soft">{CALC_CAUTION}</p>
        </div>
      )}
    </section>
  );
}
