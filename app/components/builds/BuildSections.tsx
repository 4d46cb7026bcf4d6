import { Link } from "react-router";
import type { BuildPage } from "~/lib/builds/page.server";
import { boreOf, sizeText, strokeOf } from "~/lib/builds/sizes";
import { formatDayTime } from "~/lib/dates";
import { fmtDay, VerdictBadge } from "~/components/test-records/parts";
import { FiledLine, ReadingsTable } from "~/components/test-records/RecordSheet";
import { limitsText, typedReadingText } from "~/components/test-records/units";

// The build page's sections, worst first; the build sheet reuses the overview.

type Build = BuildPage["build"];

function Fact({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-xs text-graphite-soft">{label}</dt>
      <dd className="num">{children}</dd>
    </div>
  );
}

export function BuildOverview({ build }: { build: Build }) {
  return (
    <section className="card" aria-label="The engine and the job">
      <dl className="grid grid-cols-2 gap-x-6 gap-y-2 text-sm md:grid-cols-4">
        <Fact label="Customer">{build.customerName}</Fact>
        <Fact label="Contact">{build.customerContact || "—"}</Fact>
        <Fact label="Lead builder">{build.leadBuilderName ?? "—"}</Fact>
        <Fact label="Serial">{build.engineSerial || "—"}</Fact>
        <Fact label="Bore">{sizeText(boreOf(build)) ?? "—"}</Fact>
        <Fact label="Stroke">{sizeText(strokeOf(build)) ?? "—"}</Fact>
        <Fact label="Cylinders · main journals">{`${build.cylinders ?? "—"} · ${build.mainJournals ?? "—"}`}</Fact>
        <Fact label="Came in">{build.receivedOn ? fmtDay(build.receivedOn) : "—"}</Fact>
        <Fact label="Promised for">{build.promisedOn ? fmtDay(build.promisedOn) : "—"}</Fact>
      </dl>
      {build.notes && <p className="mt-3 whitespace-pre-line font-serif text-sm">{build.notes}</p>}
      {build.reopenReason && (
        <p className="mt-3 rounded border border-brass/50 bg-brass-soft/40 px-3 py-2 text-sm">
          <strong>Reopened:</strong> {build.reopenReason}
        </p>
      )}
    </section>
  );
}

export function OutOfSpecList({ items }: { items: BuildPage["outOfSpec"] }) {
  return (
    <section
      className={`card ${items.length ? "border-spec-red" : ""}`}
      aria-labelledby="out-h"
      data-testid="out-of-spec"
      data-count={items.length}
    >
      <h2 id="out-h" className={`text-lg ${items.length ? "text-spec-red" : ""}`}>
        {items.length ? `Out of spec (${items.length})` : "Out of spec"}
      </h2>
      {items.length ? (
        <div className="mt-2 overflow-x-auto">
          <table className="num w-full text-left text-sm">
            <thead className="text-xs uppercase tracking-wide text-graphite-soft">
              <tr>
                <th className="py-1 pr-3">Spec</th>
                <th className="pr-3">Where</th>
                <th className="pr-3 text-right">Reading</th>
                <th className="pr-3">Limits</th>
                <th>Test record</th>
              </tr>
            </thead>
            <tbody>
              {items.map((o) => (
                <tr key={o.reading.id} className="border-t border-rule/60">
                  <td className="py-1 pr-3 font-sans font-semibold">{o.spec.label}</td>
                  <td className="whitespace-nowrap pr-3 font-sans">{o.where || "—"}</td>
                  <td className="whitespace-nowrap pr-3 text-right font-semibold text-spec-red">
                    {typedReadingText(o.reading)} ({o.reading.verdict === "below" ? "below" : "above"})
                  </td>
                  <td className="whitespace-nowrap pr-3">{limitsText(o.spec)}</td>
                  <td className="font-sans">
                    <Link to={`/test-records/${o.recordId}`}>{o.recordTitle}</Link>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : (
        <p className="mt-1 text-sm text-graphite-soft">No reading of this build is out of spec.</p>
      )}
    </section>
  );
}

/** Every test record, grouped by procedure, with the revision it was pinned to and every reading beside its spec. */
export function RecordsByProcedure({ records }: { records: BuildPage["records"] }) {
  const procedures = [...new Map(records.map((v) => [v.procedure.id, v.procedure])).values()];
  return (
    <section className="space-y-3" aria-labelledby="records-h">
      <h2 id="records-h" className="text-xl">
        Test records
      </h2>
      {!records.length && <p className="card text-sm text-graphite-soft">No test record is filed for this build yet.</p>}
      {procedures.map((p) => (
        <div key={p.id} className="space-y-3">
          <h3 className="text-lg">
            <Link to={`/procedures/${p.slug}`}>{p.title}</Link>
          </h3>
          {records
            .filter((v) => v.procedure.id === p.id)
            .map((v) => (
              <article key={v.record.id} className="card p-0" data-testid="build-record">
                <header className="flex flex-wrap items-start justify-between gap-2 px-4 pt-3">
                  <div>
                    <p className="font-semibold">
                      <Link to={`/test-records/${v.record.id}`}>{v.record.title}</Link>{" "}
                      <span className="num text-sm font-normal text-graphite-soft">revision {v.revision.number}</span>
                    </p>
                    <p className="text-xs text-graphite-soft">
                      <FiledLine testedOn={v.record.testedOn} by={v.filedBy} createdAt={v.record.createdAt} />
                    </p>
                  </div>
                  <VerdictBadge
                    verdict={v.evaluation.verdict}
                    notMeasured={v.evaluation.notMeasured.length}
                    places={v.evaluation.missingPlaces.length}
                  />
                </header>
                <div className="mt-2 overflow-x-auto">
                  <ReadingsTable
                    specs={v.specs}
                    readings={v.readings}
                    specVerdicts={v.evaluation.specs}
                    recording={v.recording}
                    missingPlaces={v.evaluation.missingPlaces}
                  />
                </div>
              </article>
            ))}
        </div>
      ))}
    </section>
  );
}

export function BuildTimeline({ entries }: { entries: BuildPage["timeline"] }) {
  return (
    <section className="card" id="timeline" aria-labelledby="timeline-h">
      <h2 id="timeline-h" className="text-lg">
        Timeline
      </h2>
      <ol className="mt-2 space-y-1.5 text-sm">
        {entries.map((e, i) => (
          // Entries come from several tables; their order in the list is their identity here.
          // biome-ignore lint/suspicious/noArrayIndexKey: see above.
          <li key={i} className="grid gap-x-3 sm:grid-cols-[11rem_1fr]" data-testid="timeline-entry">
            <span className="num text-graphite-soft">{formatDayTime(e.at)}</span>
            <span>
              <strong className="font-semibold">{e.who ?? "Benchreel"}</strong> · {e.href ? <Link to={e.href}>{e.what}</Link> : e.what}
            </span>
          </li>
        ))}
      </ol>
    </section>
  );
}

/**
 * Each torque reading through the Preload calculator its procedure puts beside the spec: one
 * table per calculator, a row per fastener, the columns the calculator's own result rows.
 */
export function ClampLoads({ calcs }: { calcs: BuildPage["calcs"] }) {
  const loads = calcs.filter((c) => c.kind === "preload");
  if (!loads.length) return null;
  const refused = loads.filter((c) => !c.ok);
  const groups = new Map<string, Extract<BuildPage["calcs"][number], { kind: "preload"; ok: true }>[]>();
  for (const c of loads) if (c.ok && c.kind === "preload") groups.set(c.calculator, [...(groups.get(c.calculator) ?? []), c]);
  return (
    <div className="border-b border-rule/60 pb-3" data-testid="clamp-loads">
      <h3 className="font-semibold">Clamp loads from the torques read</h3>
      {[...groups].map(([title, rows]) => {
        // The torque is what was read, so it comes first; the calculator's figures follow it.
        const columns = rows[0].rows.map((r) => r.label).sort((a, b) => Number(b === "Torque") - Number(a === "Torque"));
        return (
          <div key={title} className="mt-2 overflow-x-auto">
            <p className="text-sm text-graphite-soft">
              {title}, with the procedure's own preset · <Link to={`/test-records/${rows[0].recordId}`}>from its test record</Link>
            </p>
            <table className="num mt-1 w-full text-left text-sm">
              <thead className="text-xs uppercase tracking-wide text-graphite-soft">
                <tr>
                  <th className="py-1 pr-3">Where</th>
                  {columns.map((c) => (
                    <th key={c} className="pr-3 text-right">
                      {c}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {rows.map((c) => (
                  <tr key={c.label} className="border-t border-rule/60" data-testid="clamp-load">
                    <td className="py-1 pr-3">{c.where || "—"}</td>
                    {columns.map((col) => {
                      const cell = c.rows.find((r) => r.label === col);
                      return (
                        <td key={col} className={`pr-3 text-right ${cell?.tone === "bad" ? "font-semibold text-spec-red" : ""}`}>
                          {cell?.value ?? "—"}
                        </td>
                      );
                    })}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        );
      })}
      <p className="mt-1 text-xs text-graphite-soft">
        Worked from each torque as read, with the nut factor the procedure assumes: another lubricant or a dirty thread gives a different
        clamp load at the same torque.
      </p>
      {refused.map((c) => (
        <p key={c.label} className="text-sm text-brass">
          {c.label}: {c.ok ? "" : c.reason}
        </p>
      ))}
    </div>
  );
}
