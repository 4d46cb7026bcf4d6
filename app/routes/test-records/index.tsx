import { Form, Link } from "react-router";
import type { Route } from "./+types/index";
import { EmptyState, PageHeader } from "~/components/page";
import { fmtDay, VerdictBadge } from "~/components/test-records/parts";
import { requirePermission } from "~/lib/auth.server";
import { parseSearch } from "~/lib/edge.server";
import { listSearch } from "~/lib/test-records/filters";
import { can } from "~/lib/permissions";
import { listTestRecords, publishedProcedureOptions } from "~/lib/test-records/records.server";

export const meta: Route.MetaFunction = () => [{ title: "Test records · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const filters = parseSearch(request, listSearch);
  const [rows, procedures] = await Promise.all([listTestRecords(filters), publishedProcedureOptions()]);
  return { rows, procedures, filters, query: new URL(request.url).search, canCreate: can(user.role, "testrecord:create") };
}

export default function TestRecords({ loaderData }: Route.ComponentProps) {
  const { rows, procedures, filters, query, canCreate } = loaderData;
  const filtered = Boolean(filters.procedure || filters.verdict || filters.workOrder || filters.from || filters.to);
  const out = rows.filter((r) => r.verdict === "out").length;
  const incomplete = rows.filter((r) => r.verdict === "incomplete").length;
  return (
    <>
      <PageHeader
        title="Test records"
        kicker="QC"
        actions={
          <>
            <a className="btn no-underline" href={`/test-records/export.csv${query}`} download>
              Export CSV
            </a>
            {canCreate && (
              <Link className="btn btn-primary no-underline" to="/test-records/new">
                File a test record
              </Link>
            )}
          </>
        }
      >
        QC results filed against the procedure revision in force, with their readings and verdicts.
      </PageHeader>

      <Form
        method="get"
        className="card mb-5 grid gap-3 p-4 sm:grid-cols-2 lg:grid-cols-[1.4fr_0.9fr_1fr_0.8fr_0.8fr_auto]"
        aria-label="Filter test records"
      >
        <label className="text-sm">
          <span className="label">Procedure</span>
          <select name="procedure" className="field" defaultValue={filters.procedure ?? ""}>
            <option value="">All procedures</option>
            {procedures.map((p) => (
              <option key={p.id} value={p.slug}>
                {p.title}
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm">
          <span className="label">Verdict</span>
          <select name="verdict" className="field" defaultValue={filters.verdict ?? ""}>
            <option value="">Any</option>
            <option value="within">Within spec</option>
            <option value="out">Out of spec</option>
            <option value="incomplete">Incomplete</option>
          </select>
        </label>
        <label className="text-sm">
          <span className="label">Work order</span>
          <input name="workOrder" className="field num" placeholder="LEW-24-01" defaultValue={filters.workOrder ?? ""} />
        </label>
        <label className="text-sm">
          <span className="label">Tested from</span>
          <input type="date" name="from" className="field" defaultValue={filters.from ?? ""} />
        </label>
        <label className="text-sm">
          <span className="label">to</span>
          <input type="date" name="to" className="field" defaultValue={filters.to ?? ""} />
        </label>
        <div className="flex items-end gap-2">
          <button className="btn" type="submit">
            Filter
          </button>
          {filtered && (
            <Link to="/test-records" className="whitespace-nowrap pb-2 text-sm">
              Clear
            </Link>
          )}
        </div>
      </Form>

      {rows.length ? (
        <>
          <p className="num mb-2 text-sm text-graphite-soft" data-testid="result-count">
            {rows.length} record{rows.length === 1 ? "" : "s"}
            {out ? `, ${out} out of spec` : ""}
            {incomplete ? `, ${incomplete} incomplete` : ""}
            {rows.length === 200 ? " (the 200 most recent; narrow the filters for older ones)" : ""}
          </p>
          <div className="card overflow-x-auto p-0">
            <table className="w-full text-left text-sm" data-testid="records-table">
              <thead className="border-b border-rule bg-paper-deep/60 text-xs uppercase tracking-wide text-graphite-soft">
                <tr>
                  <th className="px-4 py-2">Tested</th>
                  <th className="px-3 py-2">Work order</th>
                  <th className="px-3 py-2">Record</th>
                  <th className="px-3 py-2">Procedure</th>
                  <th className="px-3 py-2">Verdict</th>
                  <th className="px-4 py-2 max-md:hidden">Inspector</th>
                </tr>
              </thead>
              <tbody className="num">
                {rows.map((r) => (
                  <tr key={r.id} className="border-b border-rule/60 last:border-0">
                    <td className="whitespace-nowrap px-4 py-2">{fmtDay(r.testedOn)}</td>
                    <td className="whitespace-nowrap px-3 py-2 font-semibold">{r.workOrder}</td>
                    <td className="px-3 py-2 font-sans">
                      <Link to={`/test-records/${r.id}`}>{r.title}</Link>
                      {r.currentVersion > 0 && <span className="ml-1 text-xs text-graphite-soft">amended</span>}
                    </td>
                    <td className="px-3 py-2 font-sans">
                      {r.procedureTitle}{" "}
                      <span className="num whitespace-nowrap text-graphite-soft">
                        rev. {r.revisionNumber}
                        {r.revisionState === "superseded" ? " (superseded)" : ""}
                      </span>
                    </td>
                    <td className="px-3 py-2">
                      <VerdictBadge verdict={r.verdict} notMeasured={r.notMeasured} places={r.placesMissing} />
                    </td>
                    <td className="px-4 py-2 font-sans text-graphite-soft max-md:hidden">{r.by ?? "—"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </>
      ) : filtered ? (
        <EmptyState title="No test record matches these filters">Widen the dates or clear a filter.</EmptyState>
      ) : (
        <EmptyState title="No test records yet">
          {canCreate ? (
            <>
              File the first one from a procedure's page, or <Link to="/test-records/new">here</Link>.
            </>
          ) : (
            "QC files test records against published procedures; they will be listed here."
          )}
        </EmptyState>
      )}
    </>
  );
}
