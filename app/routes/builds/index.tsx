import { Link } from "react-router";
import type { Route } from "./+types/index";
import { CountsLine, StatusBadge } from "~/components/builds/parts";
import { EmptyState, PageHeader } from "~/components/page";
import { fmtDay } from "~/components/test-records/parts";
import { requirePermission } from "~/lib/auth.server";
import { buildSummaries } from "~/lib/builds/builds.server";
import { can } from "~/lib/permissions";

export const meta: Route.MetaFunction = () => [{ title: "Builds · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "builds:read");
  return { builds: await buildSummaries(), canWrite: can(user.role, "builds:write") };
}

export default function Builds({ loaderData }: Route.ComponentProps) {
  const { builds, canWrite } = loaderData;
  return (
    <>
      <PageHeader
        title="Builds"
        kicker="Engine jobs"
        actions={
          canWrite && (
            <Link className="btn btn-primary no-underline" to="/builds/new">
              Open a build
            </Link>
          )
        }
      >
        Every engine job by work order: what was measured, filed and recorded for it. Those still in the shop come first.
      </PageHeader>
      {builds.length ? (
        <div className="card overflow-x-auto p-0">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-rule bg-paper-deep/60 text-xs uppercase tracking-wide text-graphite-soft">
              <tr>
                <th className="px-3 py-2">Work order</th>
                <th className="px-3 py-2">Customer</th>
                <th className="px-3 py-2">Engine</th>
                <th className="px-3 py-2">Status</th>
                <th className="px-3 py-2">Test records</th>
                <th className="px-3 py-2">Lead</th>
                <th className="px-3 py-2">Came in</th>
              </tr>
            </thead>
            <tbody>
              {builds.map((b) => (
                <tr key={b.id} className="border-b border-rule/60 last:border-0" data-testid="build-row">
                  <td className="num whitespace-nowrap px-3 py-2 font-semibold">
                    <Link to={`/builds/${b.number}`}>{b.number}</Link>
                  </td>
                  <td className="px-3 py-2">{b.customerName}</td>
                  <td className="px-3 py-2">
                    {b.engine || <span className="text-graphite-soft">not described</span>}
                    {b.engineSerial && <span className="num block text-xs text-graphite-soft">serial {b.engineSerial}</span>}
                  </td>
                  <td className="px-3 py-2">
                    <StatusBadge status={b.status} />
                  </td>
                  <td className="px-3 py-2">
                    <CountsLine counts={b.counts} />
                  </td>
                  <td className="px-3 py-2">{b.leadBuilderName ?? <span className="text-graphite-soft">—</span>}</td>
                  <td className="num whitespace-nowrap px-3 py-2">{b.receivedOn ? fmtDay(b.receivedOn) : "—"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : (
        <EmptyState title="No builds yet">
          {canWrite
            ? "Open a build when an engine comes in: its work order, the customer and the engine."
            : "Builds appear here when the shop opens them."}
        </EmptyState>
      )}
    </>
  );
}
