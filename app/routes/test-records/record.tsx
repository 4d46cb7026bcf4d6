import { data, Form, Link } from "react-router";
import type { Route } from "./+types/record";
import { parseParams, parseSearch, readForm } from "~/lib/edge.server";
import { idParams, versionSearch } from "~/lib/edge";
import { FormError } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { fmtDay, fmtNum, SafetyNote, VerdictBadge } from "~/components/test-records/parts";
import { limitsText, unitText } from "~/components/test-records/units";
import { FiledLine, ReadingsTable } from "~/components/test-records/RecordSheet";
import { TWO_POINT_GAUGE_NOTE, type ClearanceResult, type DistortionResult } from "~/lib/calc";
import { assertCan, requirePermission } from "~/lib/auth.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { can } from "~/lib/permissions";
import { groupOfNote, isBoreSpec, isClearanceSpec, isPistonSpec, positionFromNote, runDistortion, runPistonToWall } from "~/lib/test-records/calcs";
import { limitsOf } from "~/lib/test-records/limits";
import { formatNumber, formatQ } from "~/lib/calc-ui/units";
import { getTestRecord, saveCalcRun } from "~/lib/test-records/records.server";
import { RECORD_VERDICT_LABELS } from "~/lib/test-records/labels";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.record.workOrder ?? "Test record"} · Test records · Benchreel` }];

async function recordOr404(id: string, version?: number) {
  const r = await getTestRecord(id, { version });
  if (!r) throw data({ message: "No such test record." }, { status: 404 });
  return r;
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const { id } = parseParams(request, idParams, params, "test record");
  const view = await recordOr404(id, parseSearch(request, versionSearch).v);
  return { ...view, flags: { canAmend: can(user.role, "testrecord:amend"), canCalc: can(user.role, "testrecord:create") } };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "testrecord:create");
  const view = await recordOr404(parseParams(request, idParams, params, "test record").id);
  const form = await readForm(request);
  const intent = form.get("intent");
  const specs = view.specs.map(limitsOf);
  const current = view.readings.map((r) => ({ id: r.id, specId: r.specId, valueEntered: r.valueEntered, unitEntered: r.unitEntered, note: r.note }));
  if (intent === "distortion") {
    const spec = specs.find((s) => s.id === form.get("specId") && isBoreSpec(s));
    if (!spec) return data({ intent, errors: { calc: "Choose a bore spec with readings." } }, { status: 400 });
    const group = form.has("group") ? String(form.get("group")) : null;
    const rs = current.filter((r) => r.specId === spec.id && (group === null || groupOfNote(r.note) === group));
    if (rs.length < 3) return data({ intent, errors: { calc: "Bore distortion needs at least three diameters." } }, { status: 400 });
    const positions = new Map<string, { depthMm: number; angleDeg: number }>();
    const errors: Record<string, string> = {};
    for (const r of rs) {
      const depth = Number(String(form.get(`depth.${r.id}`) ?? "").replace(",", "."));
      const angle = Number(String(form.get(`angle.${r.id}`) ?? "").replace(",", "."));
      if (String(form.get(`depth.${r.id}`) ?? "").trim() === "" || !Number.isFinite(depth) || depth < 0 || depth > 2000) errors[`depth.${r.id}`] = "Depth below the deck, in mm.";
      if (String(form.get(`angle.${r.id}`) ?? "").trim() === "" || !Number.isFinite(angle) || Math.abs(angle) > 720) errors[`angle.${r.id}`] = "Angle in degrees.";
      positions.set(r.id, { depthMm: depth, angleDeg: angle });
    }
    if (Object.keys(errors).length) return data({ intent, errors: { ...errors, calc: "Give every reading its depth and angle." }, values: Object.fromEntries([...form.entries()].map(([k, v]) => [k, String(v)])) }, { status: 400 });
    const nominal = view.specs.find((s) => s.id === spec.id)?.nominal;
    const out = runDistortion(rs, positions, nominal != null ? { value: nominal, unit: spec.unit } : null);
    if (!out.ok) return data({ intent, errors: out.errors, values: Object.fromEntries([...form.entries()].map(([k, v]) => [k, String(v)])) }, { status: 400 });
    await saveCalcRun(user, view.record.id, { version: view.record.currentVersion, kind: "distortion", label: `Bore distortion: ${spec.label}${group ? ` (${group})` : ""}`, input: out.input, result: out.result });
    return redirectWithFlash(`/test-records/${view.record.id}#calcs`, { kind: "ok", message: "Bore distortion computed and kept with the record." });
  }
  if (intent === "piston-to-wall") {
    const bore = current.find((r) => r.id === form.get("boreReading"));
    const piston = current.find((r) => r.id === form.get("pistonReading"));
    const errors: Record<string, string> = {};
    if (!bore) errors.boreReading = "Choose the bore reading.";
    if (!piston) errors.pistonReading = "Choose the piston reading.";
    if (bore && piston && bore.id === piston.id) errors.pistonReading = "Choose two different readings.";
    if (Object.keys(errors).length) return data({ intent, errors: { ...errors, calc: "Choose a bore and a piston reading." } }, { status: 400 });
    const specId = String(form.get("clearanceSpec") ?? "");
    const spec = specId ? (specs.find((s) => s.id === specId) ?? null) : null;
    const out = runPistonToWall(bore!, piston!, spec);
    if (!out.ok) return data({ intent, errors: out.errors }, { status: 400 });
    await saveCalcRun(user, view.record.id, { version: view.record.currentVersion, kind: "piston-to-wall", label: `Piston-to-wall${spec ? ` against ${spec.label}` : ""}`, input: out.input, result: out.result });
    return redirectWithFlash(`/test-records/${view.record.id}#calcs`, { kind: "ok", message: "Piston-to-wall computed and kept with the record." });
  }
  assertCan(request, user, "testrecord:create");
  return data({ intent: "unknown", errors: { calc: "Unknown action." } }, { status: 400 });
}

function mm(x: number | undefined) {
  return x == null || !Number.isFinite(x) ? "—" : formatQ(x, "mm", "mm", 1);
}

function CalcResult({ kind, result }: { kind: string; result: unknown }) {
  if (kind === "distortion") {
    const r = result as DistortionResult;
    return (
      <div className="overflow-x-auto">
        <table className="num w-full text-left text-sm">
          <thead className="text-xs uppercase tracking-wide text-graphite-soft">
            <tr><th className="py-1 pr-3">Depth</th><th className="pr-3 text-right">Mean Ø</th><th className="pr-3 text-right">Min Ø</th><th className="pr-3 text-right">Max Ø</th><th className="pr-3 text-right">Out-of-round</th><th className="text-right">Order 2</th></tr>
          </thead>
          <tbody>
            {r.levels.map((l) => (
              <tr key={l.depth_mm} className="border-t border-rule/60">
                <td className="py-1 pr-3">{fmtNum(l.depth_mm)} mm</td>
                <td className="pr-3 text-right">{mm(l.meanDiameter_mm)}</td>
                <td className="pr-3 text-right">{mm(l.minDiameter_mm)}</td>
                <td className="pr-3 text-right">{mm(l.maxDiameter_mm)}</td>
                <td className="pr-3 text-right font-semibold">{mm(l.outOfRound_mm)}</td>
                <td className="text-right">{(() => { const o = l.orders.find((x) => x.order === 2); return o ? `${mm(o.radialAmplitude_mm)} at ${Math.round(o.phaseDeg)}°` : "—"; })()}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="num mt-1 text-sm">Taper (largest − smallest mean): <strong>{mm(r.taper_mm)}</strong> · top minus bottom: {mm(r.taperTopToBottom_mm)}</p>
        {r.warnings.map((w) => <p key={w} className="text-sm text-brass">{w}</p>)}
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
          <> · <span className={r.verdict === "within" ? "font-semibold text-ok" : "font-semibold text-spec-red"}>{r.verdict === "within" ? "within the clearance spec" : r.verdict === "below" ? "below the clearance spec (tight)" : "above the clearance spec (loose)"}</span></>
        )}
      </p>
      {r.warnings.map((w) => <p key={w} className="text-brass">{w}</p>)}
    </div>
  );
}

export default function TestRecordPage({ loaderData, actionData }: Route.ComponentProps) {
  const { record, procedure, revision, current, specs, readings, evaluation, amendments, calcs, recording, version, flags, filedBy } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values = ((actionData && "values" in actionData ? actionData.values : undefined) ?? {}) as Record<string, string>;
  const historical = version !== record.currentVersion;
  const lim = specs.map((s) => ({ ...s, ...limitsOf(s) }));
  const boreSpecs = lim.filter((s) => isBoreSpec(s) && readings.filter((r) => r.specId === s.id).length >= 3);
  const lengthReadings = readings.filter((r) => lim.find((s) => s.id === r.specId)?.quantity === "length");
  const label = (r: (typeof readings)[number]) => `${lim.find((s) => s.id === r.specId)?.label} #${r.position + 1}: ${fmtNum(r.valueEntered)} ${unitText(r.unitEntered)}${r.note ? ` (${r.note})` : ""}`;
  const defBore = lengthReadings.find((r) => isBoreSpec(lim.find((s) => s.id === r.specId)!));
  const defPiston = lengthReadings.find((r) => isPistonSpec(lim.find((s) => s.id === r.specId)!));
  const defClearance = lim.find(isClearanceSpec);
  // Piston-to-wall needs a bore and a piston diameter among the readings.
  const canPtw = Boolean(defBore && defPiston);

  return (
    <>
      <PageHeader
        title={record.title}
        kicker={`Test record · ${record.workOrder}`}
        actions={
          <>
            <Link className="btn no-underline" to={`/test-records/${record.id}/print${historical ? `?v=${version}` : ""}`}>Record sheet</Link>
            {flags.canAmend && !historical && <Link className="btn no-underline" to={`/test-records/${record.id}/amend`}>Amend</Link>}
          </>
        }
      >
        <FiledLine testedOn={record.testedOn} by={filedBy} createdAt={record.createdAt} />
      </PageHeader>

      {historical && (
        <p className="mb-4 rounded-md border border-brass/50 bg-brass-soft/50 px-4 py-2 text-sm" data-testid="historical-note">
          You are looking at {version === 0 ? "the record as originally filed" : `version ${version} (after amendment ${version})`}. <Link to={`/test-records/${record.id}`}>See the record in force</Link>.
        </p>
      )}

      <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_18rem]">
        <div className="min-w-0 space-y-5">
          <section className="card flex flex-wrap items-center justify-between gap-3" aria-label="Verdict">
            <div>
              <VerdictBadge verdict={evaluation.verdict} notMeasured={evaluation.notMeasured.length} size="lg" />
              <p className="mt-1 text-sm text-graphite-soft">
                {evaluation.notMeasured.length
                  ? `Not measured: ${evaluation.notMeasured.map((id) => specs.find((s) => s.id === id)?.label).join(", ")}.`
                  : "Every spec of the revision was measured."}
              </p>
            </div>
            <dl className="num grid grid-cols-[auto_1fr] gap-x-3 text-sm">
              <dt className="text-graphite-soft">Work order</dt><dd className="font-semibold">{record.workOrder}</dd>
              <dt className="text-graphite-soft">Engine serial</dt><dd>{record.engineSerial || "—"}</dd>
              <dt className="text-graphite-soft">Test date</dt><dd>{fmtDay(record.testedOn)}</dd>
            </dl>
          </section>

          {current && (
            <p className="rounded-md border border-brass/50 bg-brass-soft/40 px-4 py-2 text-sm" data-testid="superseded-note">
              Filed against revision {revision.number}, which has since been superseded by revision {current.number}. The verdict stays the one against revision {revision.number}'s limits; the table shows both.
            </p>
          )}

          <section className="card overflow-x-auto p-0" aria-labelledby="readings-h">
            <h2 id="readings-h" className="px-4 pt-3 text-lg">Readings</h2>
            <div className="mt-2">
              <ReadingsTable specs={specs} readings={readings} specVerdicts={evaluation.specs} currentSpecs={current?.specs ?? null} currentNumber={current?.number} recording={recording} />
            </div>
          </section>

          {record.notes && (
            <section className="card" aria-labelledby="notes-h">
              <h2 id="notes-h" className="text-lg">Notes</h2>
              <p className="mt-1 whitespace-pre-line font-serif">{record.notes}</p>
            </section>
          )}

          <section id="calcs" className="card space-y-3" aria-labelledby="calcs-h">
            <h2 id="calcs-h" className="text-lg">Calculations</h2>
            {calcs.length ? (
              <ul className="space-y-3">
                {calcs.map((c) => (
                  <li key={c.id} className="border-b border-rule/60 pb-3 last:border-0" data-testid="calc-run">
                    <p className="font-semibold">{c.label}</p>
                    <p className="num text-xs text-graphite-soft">
                      {c.by ?? "Someone"} · {fmtDay(c.createdAt)} · from {c.version === 0 ? "the readings as filed" : `version ${c.version}`}
                      {c.version !== record.currentVersion && " (readings amended since)"}
                    </p>
                    <CalcResult kind={c.kind} result={c.result} />
                  </li>
                ))}
              </ul>
            ) : (
              <p className="text-sm text-graphite-soft">
                {boreSpecs.length > 0 || canPtw
                  ? "No calculator has been run on these readings."
                  : "No calculator applies to these specs: Bore distortion needs three or more bore diameters, piston-to-wall a bore and a piston reading."}
              </p>
            )}
            {flags.canCalc && !historical && (boreSpecs.length > 0 || canPtw) && (
              <div className="space-y-3 border-t border-rule pt-3">
                {actionData && errors.calc && <FormError message={errors.calc} />}
                {boreSpecs.flatMap((s) => {
                  const all = readings.filter((r) => r.specId === s.id);
                  const groups = [...new Set(all.map((r) => groupOfNote(r.note)))];
                  return groups.map((g) => ({ s, g: groups.length > 1 ? g : null, rs: groups.length > 1 ? all.filter((r) => groupOfNote(r.note) === g) : all }));
                }).filter((x) => x.rs.length >= 3).map(({ s, g, rs }) => {
                  return (
                    <details key={`${s.id}-${g}`} className="rounded-md border border-rule p-3" open={actionData?.intent === "distortion"}>
                      <summary className="cursor-pointer font-semibold">Bore distortion from the {rs.length} readings of “{s.label}”{g ? `, ${g}` : ""}</summary>
                      <Form method="post" className="mt-2 space-y-2">
                        <input type="hidden" name="intent" value="distortion" />
                        <input type="hidden" name="specId" value={s.id} />
                        {g !== null && <input type="hidden" name="group" value={g} />}
                        <p className="text-sm text-graphite-soft">Depth below the deck and gauge angle for each diameter (taken from the reading's note where it says, e.g., “20 mm, 90°”).</p>
                        <table className="num text-sm">
                          <thead className="text-xs uppercase text-graphite-soft"><tr><th className="pr-3 text-left">Diameter</th><th className="pr-3 text-left">Depth (mm)</th><th className="text-left">Angle (°)</th></tr></thead>
                          <tbody>
                            {rs.map((r) => {
                              const p = positionFromNote(r.note);
                              return (
                                <tr key={r.id}>
                                  <td className="pr-3">{fmtNum(r.valueEntered)} {unitText(r.unitEntered)}</td>
                                  <td className="pr-3 py-0.5"><input className="field w-24 py-1" name={`depth.${r.id}`} inputMode="decimal" aria-label={`Depth for ${label(r)}`} defaultValue={values[`depth.${r.id}`] ?? (p.depthMm ?? "")} aria-invalid={errors[`depth.${r.id}`] ? true : undefined} /></td>
                                  <td className="py-0.5"><input className="field w-24 py-1" name={`angle.${r.id}`} inputMode="decimal" aria-label={`Angle for ${label(r)}`} defaultValue={values[`angle.${r.id}`] ?? (p.angleDeg ?? "")} aria-invalid={errors[`angle.${r.id}`] ? true : undefined} /></td>
                                </tr>
                              );
                            })}
                          </tbody>
                        </table>
                        <button className="btn" type="submit">Run Bore distortion</button>
                      </Form>
                    </details>
                  );
                })}
                {canPtw && (
                  <details className="rounded-md border border-rule p-3" open={actionData?.intent === "piston-to-wall"}>
                    <summary className="cursor-pointer font-semibold">Piston-to-wall from a bore and a piston reading</summary>
                    <Form method="post" className="mt-2 grid gap-2 sm:grid-cols-2">
                      <input type="hidden" name="intent" value="piston-to-wall" />
                      <label className="text-sm">
                        <span className="label">Bore reading</span>
                        <select name="boreReading" className="field" defaultValue={defBore?.id ?? ""} aria-invalid={errors.boreReading ? true : undefined}>
                          <option value="">Choose…</option>
                          {lengthReadings.map((r) => <option key={r.id} value={r.id}>{label(r)}</option>)}
                        </select>
                        {errors.boreReading && <span className="field-error block">{errors.boreReading}</span>}
                      </label>
                      <label className="text-sm">
                        <span className="label">Piston reading</span>
                        <select name="pistonReading" className="field" defaultValue={defPiston?.id ?? ""} aria-invalid={errors.pistonReading ? true : undefined}>
                          <option value="">Choose…</option>
                          {lengthReadings.map((r) => <option key={r.id} value={r.id}>{label(r)}</option>)}
                        </select>
                        {errors.pistonReading && <span className="field-error block">{errors.pistonReading}</span>}
                      </label>
                      <label className="text-sm sm:col-span-2">
                        <span className="label">Check against</span>
                        <select name="clearanceSpec" className="field" defaultValue={defClearance?.id ?? ""}>
                          <option value="">No spec</option>
                          {lim.filter((s) => s.quantity === "length" && (s.min != null || s.max != null)).map((s) => <option key={s.id} value={s.id}>{s.label} ({limitsText(s)})</option>)}
                        </select>
                      </label>
                      <div><button className="btn" type="submit">Run Clearances</button></div>
                    </Form>
                  </details>
                )}
                <p className="text-xs text-graphite-soft">Estimates for planning and checking. The fastener maker's and the engine maker's published values take precedence; follow local codes and licensed practice.</p>
              </div>
            )}
          </section>
        </div>

        <aside className="space-y-4 text-sm">
          <section className="card p-4" aria-labelledby="proc-h">
            <h2 id="proc-h" className="text-base">Procedure</h2>
            <p className="mt-1"><Link to={`/procedures/${procedure.slug}`}>{procedure.title}</Link></p>
            <p className="num mt-0.5 text-graphite-soft">
              Filed against <Link to={`/procedures/${procedure.slug}/r/${revision.number}`}>revision {revision.number}</Link>
              {revision.state === "superseded" ? " (superseded)" : revision.state === "published" ? " (published)" : ""}
            </p>
          </section>
          {recording && (
            <section className="card p-4" aria-labelledby="rec-h">
              <h2 id="rec-h" className="text-base">Recording</h2>
              <p className="mt-1">
                <Link to={`/recordings/${recording.id}${record.recordingStartS != null ? `?t=${Math.floor(record.recordingStartS)}` : ""}`}>{recording.title}</Link>
              </p>
              {record.recordingStartS != null && <p className="num text-graphite-soft">from {fmtNum(record.recordingStartS)} s{record.recordingEndS != null && <> to {fmtNum(record.recordingEndS)} s</>}</p>}
            </section>
          )}
          <section className="card p-4" aria-labelledby="hist-h" data-testid="amendments">
            <h2 id="hist-h" className="text-base">History</h2>
            <ol className="mt-1 space-y-3">
              <li>
                <p className="num"><strong>Filed</strong> {fmtDay(record.createdAt)} by {filedBy ?? "—"}</p>
                {amendments.length > 0 && version !== 0 && <Link to={`/test-records/${record.id}?v=0`}>See the original</Link>}
              </li>
              {amendments.map((a) => (
                <li key={a.id} className="border-t border-rule/60 pt-2" data-testid="amendment">
                  <p className="num"><strong>Amendment {a.version}</strong> · {fmtDay(a.createdAt)} by {a.by ?? "—"}</p>
                  <p className="font-serif italic">“{a.reason}”</p>
                  <ul className="mt-1 space-y-0.5">
                    {a.changes.map((c) => (
                      <li key={c.key} className="num"><span className="font-semibold">{c.label}:</span> <del className="text-graphite-soft">{c.before || "—"}</del> → {c.after || "—"}</li>
                    ))}
                  </ul>
                  {a.verdictBefore !== a.verdictAfter && <p className="mt-0.5">Verdict {RECORD_VERDICT_LABELS[a.verdictBefore]} → {RECORD_VERDICT_LABELS[a.verdictAfter]}</p>}
                  {version !== a.version && <Link to={`/test-records/${record.id}?v=${a.version}`}>See this version</Link>}
                </li>
              ))}
            </ol>
          </section>
          <SafetyNote />
        </aside>
      </div>
    </>
  );
}
