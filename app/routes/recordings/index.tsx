import { Form, Link, useSubmit } from "react-router";
import type { Route } from "./+types/index";
import { EmptyState, PageHeader } from "~/components/page";
import { Poster } from "~/components/recordings/Poster";
import { StateBadge } from "~/components/recordings/StateBadge";
import { requirePermission } from "~/lib/auth.server";
import { librarySearch } from "~/lib/edge";
import { parseSearch } from "~/lib/edge.server";
import { can } from "~/lib/permissions";
import { libraryFacets, listRecordings } from "~/lib/recordings/library.server";
import { formatDuration } from "~/lib/time-format";
import { formatDay } from "~/lib/dates";

export const meta: Route.MetaFunction = () => [{ title: "Recordings · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const s = parseSearch(request, librarySearch);
  const filter = { tag: s.tag ?? null, uploader: s.uploader ?? null, sort: s.sort ?? "newest" };
  const [rows, facets] = await Promise.all([listRecordings(filter), libraryFacets()]);
  return { rows, facets, filter, canUpload: can(user.role, "recording:upload") };
}

const fmtDate = formatDay;

export default function Library({ loaderData }: Route.ComponentProps) {
  const { rows, facets, filter, canUpload } = loaderData;
  const submit = useSubmit();
  const filtered = Boolean(filter.tag || filter.uploader);
  return (
    <>
      <PageHeader
        title="Recordings"
        actions={
          canUpload ? (
            <Link to="/recordings/upload" className="btn btn-primary no-underline">
              Upload videos
            </Link>
          ) : undefined
        }
      >
        Bench tests and procedure videos, with the marks and readings taken from them.
      </PageHeader>

      <Form
        method="get"
        className="mb-5 flex flex-wrap items-end gap-3"
        onChange={(e) => submit(e.currentTarget)}
        aria-label="Filter recordings"
      >
        <div>
          <label className="label" htmlFor="f-tag">
            Tag
          </label>
          <select id="f-tag" name="tag" defaultValue={filter.tag ?? ""} className="field w-auto min-w-40 py-1.5 text-sm">
            <option value="">All tags</option>
            {facets.tags.map((t) => (
              <option key={t.tag} value={t.tag}>
                {t.tag} ({t.n})
              </option>
            ))}
          </select>
        </div>
        <div>
          <label className="label" htmlFor="f-uploader">
            Uploaded by
          </label>
          <select id="f-uploader" name="uploader" defaultValue={filter.uploader ?? ""} className="field w-auto min-w-44 py-1.5 text-sm">
            <option value="">Anyone</option>
            {facets.uploaders.map((u) => (
              <option key={u.id} value={u.id}>
                {u.name}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label className="label" htmlFor="f-sort">
            Order
          </label>
          <select id="f-sort" name="sort" defaultValue={filter.sort} className="field w-auto py-1.5 text-sm">
            <option value="newest">Newest first</option>
            <option value="oldest">Oldest first</option>
          </select>
        </div>
        <noscript>
          <button className="btn" type="submit">
            Apply
          </button>
        </noscript>
        {filtered && (
          <Link to="/recordings" className="pb-2 text-sm">
            Clear filters
          </Link>
        )}
      </Form>

      {rows.length === 0 ? (
        filtered ? (
          <EmptyState title="No recording matches these filters">
            <Link to="/recordings">Show all recordings</Link>
          </EmptyState>
        ) : (
          <EmptyState title="No recordings yet">
            {canUpload ? (
              <>
                Film a bench test or a procedure on the phone, then <Link to="/recordings/upload">upload it</Link> to mark its moments and
                type in the readings.
              </>
            ) : (
              "When a builder or QC uploads a video, it appears here."
            )}
          </EmptyState>
        )
      ) : (
        <ul className="grid gap-5 sm:grid-cols-2 lg:grid-cols-3" data-testid="recording-list">
          {rows.map((r) => (
            <li key={r.id} className="card flex flex-col gap-3 p-3" data-testid="recording-card">
              <Link to={`/recordings/${r.id}`} className="relative block no-underline">
                <Poster id={r.id} hasPoster={r.hasPoster} title={r.title} />
                {r.durationS != null && (
                  <span className="num absolute bottom-2 right-2 rounded bg-graphite/85 px-1.5 py-0.5 text-xs text-paper">
                    {formatDuration(r.durationS)}
                  </span>
                )}
              </Link>
              <div className="min-w-0 px-1">
                <div className="flex items-start justify-between gap-2">
                  <h2 className="text-lg leading-snug">
                    <Link to={`/recordings/${r.id}`} className="text-graphite no-underline hover:underline">
                      {r.title}
                    </Link>
                  </h2>
                  {r.state !== "ready" && <StateBadge state={r.state} progress={r.progress} />}
                </div>
                <p className="mt-1 text-sm text-graphite-soft">
                  {r.uploaderName ?? "Former staff"} · {fmtDate(r.createdAt)}
                </p>
                <p className="num mt-1 text-sm text-graphite-soft">
                  {r.markCount} {r.markCount === 1 ? "mark" : "marks"} · {r.readingCount} {r.readingCount === 1 ? "reading" : "readings"}
                </p>
                {r.tags.length > 0 && (
                  <ul className="mt-2 flex flex-wrap gap-1.5">
                    {r.tags.map((t) => (
                      <li key={t}>
                        <Link
                          to={`/recordings?tag=${encodeURIComponent(t)}`}
                          className="rounded-full bg-teal-soft px-2 py-0.5 text-xs font-semibold text-teal no-underline"
                        >
                          {t}
                        </Link>
                      </li>
                    ))}
                  </ul>
                )}
              </div>
            </li>
          ))}
        </ul>
      )}
    </>
  );
}
