import { Link } from "react-router";
import { positionText } from "~/lib/recordings/positions";
import { withEmptyPlaces } from "~/lib/test-records/verdict";
import type { SpecVerdict } from "~/lib/test-records/verdict";
import { fmtDay, ReadingVerdictTag, SpecVerdictTag } from "./parts";
import { inSpecUnitText, limitsText, typedReadingText } from "./units";

type Spec = {
  id: string;
  specKey: string;
  label: string;
  unit: string;
  min: number | null;
  max: number | null;
  nominal: number | null;
  note: string;
};
type Reading = {
  id: string;
  specId: string;
  position: number;
  valueEntered: number;
  valueDecimals: number | null;
  unitEntered: string;
  valueInSpecUnit: number;
  verdict: "within" | "below" | "above" | "unchecked";
  note: string;
  sourceReadingId: string | null;
  /** Its place, among which a place left empty is listed. */
  fastener?: number | null;
  cylinder?: number | null;
  journal?: number | null;
};

type EmptyPlace = { specId: string; field: "cylinder" | "journal" | "fastener"; n: number };

/**
 * Readings grouped by spec, each with its verdict; specs without readings say "Not measured",
 * and each place a run left empty is a row of its spec that says so.
 */
export function ReadingsTable({
  specs,
  readings,
  specVerdicts,
  currentSpecs,
  currentNumber,
  recording,
  missingPlaces = [],
}: {
  specs: Spec[];
  readings: Reading[];
  specVerdicts: { specId: string; verdict: SpecVerdict }[];
  currentSpecs?: Spec[] | null;
  currentNumber?: number | null;
  recording?: { id: string } | null;
  missingPlaces?: EmptyPlace[];
}) {
  // Its own column only when some reading was typed in another unit than its spec's: otherwise
  // it stays empty and squeezes "Where" at tablet width.
  const converted = readings.some((r) => r.unitEntered !== specs.find((s) => s.id === r.specId)?.unit);
  const valueCols = converted ? 3 : 2;
  return (
    <table className="readings-table w-full text-left text-sm" data-testid="readings-table">
      <thead className="border-y border-rule bg-paper-deep/60 text-xs uppercase tracking-wide text-graphite-soft">
        <tr>
          <th className="px-3 py-1.5">Spec</th>
          <th className="px-3 py-1.5">Limits (filed revision)</th>
          {currentSpecs && <th className="px-3 py-1.5">Limits now (rev. {currentNumber})</th>}
          <th className="px-3 py-1.5 text-right">Reading</th>
          {converted && <th className="px-3 py-1.5 text-right">In spec unit</th>}
          <th className="px-3 py-1.5">Verdict</th>
          <th className="px-3 py-1.5">Where</th>
        </tr>
      </thead>
      {specs.map((s) => {
        const rs = readings.filter((r) => r.specId === s.id).sort((a, b) => a.position - b.position);
        const sv = specVerdicts.find((v) => v.specId === s.id)?.verdict ?? "not-measured";
        const empty = rs.length ? missingPlaces.filter((p) => p.specId === s.id) : [];
        const span = Math.max(rs.length + empty.length, 1);
        const now = currentSpecs?.find((c) => c.specKey === s.specKey);
        const changed = now && (now.min !== s.min || now.max !== s.max || now.unit !== s.unit);
        const head = (
          <>
            <td className="px-3 py-1.5 align-top font-semibold" rowSpan={span}>
              {s.label}
              <div className="font-normal">
                <SpecVerdictTag verdict={sv} places={empty.length} />
              </div>
            </td>
            <td className="num whitespace-nowrap px-3 py-1.5 align-top" rowSpan={span}>
              {limitsText(s)}
            </td>
            {currentSpecs && (
              <td className={`num px-3 py-1.5 align-top ${changed ? "font-semibold text-brass" : "text-graphite-soft"}`} rowSpan={span}>
                {now ? `${limitsText(now)}${changed ? " (changed)" : ""}` : "no longer in the procedure"}
              </td>
            )}
          </>
        );
        return (
          <tbody key={s.id} className="num border-b border-rule/70" data-testid="spec-row" data-spec={s.label}>
            {withEmptyPlaces(rs, empty).map((item, i) =>
              "place" in item ? (
                <tr key={`${item.place.field}${item.place.n}`} data-testid="left-empty">
                  {i === 0 && head}
                  <td className="px-3 py-1 text-right italic text-brass" colSpan={valueCols}>
                    not measured
                  </td>
                  <td className="px-3 py-1 font-sans text-graphite-soft">
                    {positionText({ [item.place.field]: item.place.n })}, left empty on the run
                  </td>
                </tr>
              ) : (
                <tr key={item.r.id}>
                  {i === 0 && head}
                  <td className="whitespace-nowrap px-3 py-1 text-right" data-testid="reading-typed">
                    {typedReadingText(item.r)}
                  </td>
                  {converted && (
                    <td className="whitespace-nowrap px-3 py-1 text-right text-graphite-soft">
                      {item.r.unitEntered === s.unit ? "" : inSpecUnitText(item.r, s)}
                    </td>
                  )}
                  <td className="px-3 py-1">
                    <ReadingVerdictTag verdict={item.r.verdict} />
                  </td>
                  <td className="px-3 py-1 font-sans text-graphite-soft">
                    {item.r.note}
                    {item.r.sourceReadingId && recording && (
                      <>
                        {" "}
                        ·{" "}
                        <Link to={`/recordings/${recording.id}`} className="no-print">
                          from the recording
                        </Link>
                      </>
                    )}
                  </td>
                </tr>
              ),
            )}
            {rs.length ? null : (
              <tr>
                {head}
                <td className="px-3 py-1 text-right italic text-brass" colSpan={valueCols + 1}>
                  not measured
                </td>
              </tr>
            )}
          </tbody>
        );
      })}
    </table>
  );
}

export function FiledLine({ testedOn, by, createdAt }: { testedOn: string; by: string | null; createdAt: string | Date }) {
  return (
    <span className="num">
      Tested {fmtDay(testedOn)} · filed by {by ?? "a former member of staff"} on {fmtDay(createdAt)}
    </span>
  );
}
