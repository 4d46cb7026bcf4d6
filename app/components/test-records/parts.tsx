import { Link } from "react-router";
import {
  READING_VERDICT_LABELS,
  recordVerdictParts,
  specVerdictText,
  type ReadingVerdict,
  type RecordVerdict,
  type SpecVerdict,
} from "~/lib/test-records/labels";
import { formatCalendarDay } from "~/lib/dates";

export const fmtDay = formatCalendarDay;

/** A number as typed in the shop: no float noise (88.00600000000001 → 88.006). */
export function fmtNum(n: number | null | undefined, digits = 6): string {
  if (n == null || !Number.isFinite(n)) return "—";
  return String(Number(n.toPrecision(digits + 4)));
}

const VERDICT_LOOK: Record<RecordVerdict, { cls: string; mark: string }> = {
  within: { cls: "border-ok/30 bg-ok-soft text-ok", mark: "✓" },
  out: { cls: "border-spec-red bg-spec-red-soft text-spec-red", mark: "✕" },
  // Not a pass and not a failure: the brass of "look here", never the green of a pass.
  incomplete: { cls: "border-brass/60 bg-brass-soft/60 text-graphite", mark: "…" },
};

/**
 * The record's verdict, saying what is missing, specs and places a run left empty counted apart
 * ("Incomplete: 1 spec and 2 places not measured"): calm for
 * within, brass for incomplete; red is kept for "Out of spec".
 */
export function VerdictBadge({
  verdict,
  notMeasured = 0,
  places = 0,
  size = "sm",
}: {
  verdict: RecordVerdict | null;
  notMeasured?: number;
  /** Places (a cylinder, a main journal, a stud) a run left empty, of specs measured elsewhere. */
  places?: number;
  size?: "sm" | "lg";
}) {
  const big = size === "lg" ? "px-3 py-1 text-base" : "px-1.5 py-0.5 text-xs";
  if (!verdict)
    return (
      <span
        className={`inline-block rounded border border-dashed border-rule font-semibold text-graphite-soft ${big}`}
        data-testid="verdict"
      >
        No readings yet
      </span>
    );
  const look = VERDICT_LOOK[verdict];
  const [head, tail] = recordVerdictParts(verdict, notMeasured, places);
  // Each part stays on one line; in a narrow column what is missing goes under the verdict.
  return (
    <span
      className={`inline-flex flex-wrap items-center gap-x-1 rounded border font-semibold ${look.cls} ${big}`}
      data-testid="verdict"
      data-verdict={verdict}
    >
      <span className="whitespace-nowrap">
        <span aria-hidden="true">{look.mark}</span> {head}
      </span>
      {tail && <span className="whitespace-nowrap">{tail}</span>}
    </span>
  );
}

/** `places`: places of the spec a run left empty; readings within beside them are within so far (brass). */
export function SpecVerdictTag({ verdict, places = 0 }: { verdict: SpecVerdict; places?: number }) {
  const cls =
    verdict === "out"
      ? "text-spec-red"
      : verdict === "not-measured" || places > 0
        ? "text-brass italic"
        : verdict === "within"
          ? "text-ok"
          : "text-graphite-soft";
  return (
    <span className={`text-sm font-semibold ${cls}`} data-testid="spec-verdict">
      {specVerdictText(verdict, places)}
    </span>
  );
}

export function ReadingVerdictTag({ verdict }: { verdict: ReadingVerdict }) {
  const cls =
    verdict === "below" || verdict === "above" ? "font-semibold text-spec-red" : verdict === "within" ? "text-ok" : "text-graphite-soft";
  return (
    <span className={`whitespace-nowrap text-sm ${cls}`} data-testid="reading-verdict">
      {READING_VERDICT_LABELS[verdict]}
    </span>
  );
}

export type RecordRow = {
  id: string;
  title: string;
  workOrder: string;
  testedOn: string;
  verdict: RecordVerdict;
  notMeasured: number;
  /** Places a run left empty in the version in force (records.server.ts listColumns). */
  placesMissing?: number;
  currentVersion: number;
  procedureTitle: string;
  slug: string;
  revisionNumber: number;
  revisionState: string;
  by: string | null;
};

/** The compact list used on a procedure page and the Shop floor. */
export function RecordMiniList({ rows, showProcedure = false }: { rows: RecordRow[]; showProcedure?: boolean }) {
  return (
    <ul className="divide-y divide-rule/70" data-testid="test-record-list">
      {rows.map((r) => (
        <li key={r.id} className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-0.5 py-1.5">
          <span className="min-w-0">
            <Link to={`/test-records/${r.id}`} className="num font-semibold">
              {r.workOrder}
            </Link>{" "}
            <span className="num text-sm text-graphite-soft">
              {fmtDay(r.testedOn)} · rev. {r.revisionNumber}
              {r.revisionState === "superseded" && " (superseded)"}
            </span>
            {showProcedure && <span className="block truncate text-sm text-graphite-soft">{r.procedureTitle}</span>}
          </span>
          <VerdictBadge verdict={r.verdict} notMeasured={r.notMeasured} places={r.placesMissing} />
        </li>
      ))}
    </ul>
  );
}

/** The procedure page's "Test records" section. */
export function ProcedureTestRecords({ rows, slug, canFile }: { rows: RecordRow[]; slug: string; canFile: boolean }) {
  const out = rows.filter((r) => r.verdict === "out").length;
  const incomplete = rows.filter((r) => r.verdict === "incomplete").length;
  return (
    <section className="card p-4" aria-labelledby="tests-h" data-testid="procedure-test-records">
      <h2 id="tests-h" className="text-base">
        Test records
      </h2>
      {rows.length ? (
        <>
          <p className="num mt-0.5 text-sm text-graphite-soft">
            {rows.length} filed{out ? `, ${out} out of spec` : ""}
            {incomplete ? `, ${incomplete} incomplete` : ""}
          </p>
          <RecordMiniList rows={rows} />
          <p className="mt-1 text-sm">
            <Link to={`/test-records?procedure=${encodeURIComponent(slug)}`}>All records for this procedure</Link>
          </p>
        </>
      ) : (
        <p className="mt-1 text-graphite-soft">No test record has been filed against this procedure yet.</p>
      )}
      {canFile && (
        <Link to={`/test-records/new?procedure=${encodeURIComponent(slug)}`} className="btn mt-2 w-full no-underline">
          File a test record
        </Link>
      )}
    </section>
  );
}

export function SafetyNote() {
  return (
    <p className="text-xs text-graphite-soft">
      Limits are the procedure revision's own. For torque, fastener and machining values the fastener maker's and the engine maker's
      published values take precedence; follow local codes and licensed practice.
    </p>
  );
}
