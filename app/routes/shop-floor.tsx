import { Link } from "react-router";
import type { Route } from "./+types/shop-floor";
import { PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { can, ROLE_LABELS } from "~/lib/permissions";
import { awaitingReview } from "~/lib/procedures/pages.server";
import { returnedDraftsOf } from "~/lib/procedures/review.server";
import { fmtDate } from "~/components/procedures/RevisionView";
import { RecordMiniList } from "~/components/test-records/parts";
import { recentTestRecords } from "~/lib/test-records/records.server";
import { OpenRuns } from "~/components/runs/RunList";
import { listOpenRuns } from "~/lib/runs/runs.server";
import { BuildsInProgress } from "~/components/builds/BuildsInProgress";
import { buildSummaries } from "~/lib/builds/builds.server";
import { IN_PROGRESS } from "~/lib/builds/status";

export const meta: Route.MetaFunction = () => [{ title: "Shop floor · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const [review, returned, testRecords, builds] = await Promise.all([
    can(user.role, "procedure:review") ? awaitingReview() : null,
    // Only an author's own drafts come back to them; a role that cannot write has none.
    can(user.role, "procedure:draft") ? returnedDraftsOf(user.id) : [],
    recentTestRecords(),
    can(user.role, "builds:read") ? buildSummaries({ status: IN_PROGRESS, limit: 12, outOfSpecFirst: true }) : [],
  ]);
  const openRuns = await listOpenRuns();
  return { user, review, returned, testRecords, builds, openRuns };
}

type Tile = { to: string; title: string; body: string; show: boolean };

export default function ShopFloor({ loaderData }: Route.ComponentProps) {
  const { user, review, returned } = loaderData;
  const first = user.name.split(" ")[0];
  const tiles: Tile[] = [
    {
      to: "/builds",
      title: "Builds",
      body: "Every engine job by work order: its records, readings and sheet.",
      show: can(user.role, "builds:read"),
    },
    { to: "/procedures", title: "Procedures", body: "How each job is done and why, with its specs.", show: true },
    { to: "/recordings", title: "Recordings", body: "Bench-test and procedure videos with marks and readings.", show: true },
    { to: "/test-records", title: "Test records", body: "QC results filed against the procedure in force.", show: true },
    { to: "/calculators", title: "Calculators", body: "Preload, Bore distortion, Clearances.", show: can(user.role, "calc:use") },
    { to: "/admin/people", title: "People", body: "Invite staff, set roles, deactivate accounts.", show: can(user.role, "user:manage") },
  ];
  return (
    <>
      <PageHeader title={`Good to see you, ${first}`} kicker="Shop floor">
        Signed in as {ROLE_LABELS[user.role]}.
      </PageHeader>
      {returned.length > 0 && (
        <section aria-labelledby="returned-h" className="card mb-6 border-l-4 border-l-brass" data-testid="returned-drafts">
          <h2 id="returned-h" className="text-lg">
            Returned to you
          </h2>
          <p className="text-sm text-graphite-soft">An editor sent these drafts back with a reason. Change them and submit again.</p>
          <ul className="mt-2 divide-y divide-rule/70 text-sm">
            {returned.map((r) => (
              <li key={`${r.slug}-${r.number}`} className="flex flex-wrap items-start justify-between gap-x-4 gap-y-2 py-3">
                <div className="min-w-0 flex-1">
                  <p className="font-semibold">
                    {r.title} <span className="num font-normal text-graphite-soft">· revision {r.number}</span>
                  </p>
                  <p className="mt-0.5">
                    <span className="text-graphite-soft">
                      Returned by {r.returnedBy ?? "former staff"}
                      {r.returnedAt ? ` on ${fmtDate(r.returnedAt)}` : ""}:
                    </span>{" "}
                    {r.reason}
                  </p>
                </div>
                <Link
                  className="btn btn-primary py-1.5 no-underline"
                  to={`/procedures/${r.slug}/r/${r.number}/edit`}
                  aria-label={`Continue editing ${r.title}`}
                >
                  Continue editing
                </Link>
              </li>
            ))}
          </ul>
        </section>
      )}
      {review && (
        <section aria-labelledby="awaiting-review-h" className="card mb-6" data-testid="awaiting-review">
          <h2 id="awaiting-review-h" className="text-lg">
            Awaiting review
          </h2>
          {review.length === 0 ? (
            <p className="mt-1 text-sm text-graphite-soft">No procedure revision is waiting for review.</p>
          ) : (
            <ul className="mt-2 divide-y divide-rule/70 text-sm">
              {review.map((r) => (
                <li key={`${r.slug}-${r.number}`} className="flex flex-wrap items-baseline justify-between gap-2 py-2">
                  <Link
                    to={r.everPublished ? `/procedures/${r.slug}/compare?to=${r.number}` : `/procedures/${r.slug}/r/${r.number}`}
                    className="font-semibold"
                  >
                    {r.title} <span className="num font-normal text-graphite-soft">· revision {r.number}</span>
                  </Link>
                  <span className="text-graphite-soft">
                    {r.author ?? "former staff"}
                    {r.changeNote ? ` — ${r.changeNote}` : ""}
                  </span>
                </li>
              ))}
            </ul>
          )}
        </section>
      )}
      {loaderData.builds.length > 0 && <BuildsInProgress rows={loaderData.builds} openRuns={loaderData.openRuns} />}
      {loaderData.openRuns.length > 0 && <OpenRuns rows={loaderData.openRuns} />}
      {loaderData.testRecords.length > 0 && (
        <section aria-labelledby="recent-tests-h" className="card mb-6" data-testid="recent-test-records">
          <h2 id="recent-tests-h" className="text-lg">
            Recent test records
          </h2>
          <p className="text-sm text-graphite-soft">
            Out of spec first, then incomplete, then the latest. <Link to="/test-records">All test records</Link>
          </p>
          <RecordMiniList rows={loaderData.testRecords} showProcedure />
        </section>
      )}
      <section aria-label="Sections" className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        {tiles
          .filter((t) => t.show)
          .map((t) => (
            <Link key={t.to} to={t.to} className="card block text-graphite no-underline transition hover:border-brass">
              <h2 className="text-lg">{t.title}</h2>
              <p className="mt-1 text-sm text-graphite-soft">{t.body}</p>
            </Link>
          ))}
      </section>
    </>
  );
}
