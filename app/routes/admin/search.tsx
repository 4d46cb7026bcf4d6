import { data, Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/search";
import { readForm } from "~/lib/edge.server";
import { FormError } from "~/components/forms";
import { EmptyState, PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { formatDayTime } from "~/lib/dates";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { searchBacklog } from "~/lib/search/indexer.server";
import { listSetAside, retrySetAside } from "~/lib/search/set-aside.server";

export const meta: Route.MetaFunction = () => [{ title: "Search index · Benchreel" }];

const retrySchema = z.union([
  z.object({ intent: z.literal("retry"), kind: z.string().min(1).max(40), entityId: z.string().min(1).max(200) }),
  z.object({ intent: z.literal("retry-all") }),
]);

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "search:repair");
  const [backlog, setAside] = await Promise.all([searchBacklog(), listSetAside()]);
  return { backlog, setAside };
}

export async function action({ request }: Route.ActionArgs) {
  await requirePermission(request, "search:repair");
  const form = await readForm(request);
  const parsed = parseForm(retrySchema, form);
  if (!parsed.ok) return data({ errors: parsed.errors }, { status: 400 });
  const queued = await retrySetAside(
    parsed.data.intent === "retry-all" ? "all" : { kind: parsed.data.kind, entityId: parsed.data.entityId },
  );
  if (!queued) return data({ errors: { form: "That record is no longer set aside." } as Record<string, string> }, { status: 404 });
  return redirectWithFlash("/admin/search", {
    kind: "ok",
    message: queued === 1 ? "Queued for indexing again." : `${queued} records queued for indexing again.`,
  });
}

export default function SearchIndexAdmin({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const { backlog, setAside } = loaderData;
  return (
    <>
      <PageHeader title="Search index" kicker="Admin">
        Changes wait in the outbox until the search service has them. A record whose search entry cannot be built is set aside here with the
        reason, so that it holds back no one else&apos;s changes; it is tried again when it changes, or when you ask.
      </PageHeader>
      <FormError message={actionData ? Object.values(actionData.errors)[0] : undefined} />
      <section className="card mb-6" data-testid="search-backlog">
        <h2 className="text-lg">Waiting</h2>
        <p className="mt-1 text-sm">
          {backlog.pending === 0
            ? "Nothing is waiting: every change is searchable."
            : `${backlog.pending} change${backlog.pending === 1 ? "" : "s"} waiting`}
          {backlog.failing > 0 && `, ${backlog.failing} after a failed try`}
          {backlog.pending > 0 && "."}
        </p>
        {backlog.failing > 0 && backlog.lastError && <p className="mt-1 text-sm text-graphite-soft">Last error: {backlog.lastError}</p>}
      </section>
      {setAside.length === 0 ? (
        <EmptyState title="No records set aside">Every record could be indexed.</EmptyState>
      ) : (
        <section className="card p-0" data-testid="search-set-aside">
          <div className="flex flex-wrap items-center justify-between gap-2 border-b border-rule px-4 py-3">
            <h2 className="text-lg">Set aside ({setAside.length})</h2>
            <Form method="post">
              <button className="btn py-1 text-xs" name="intent" value="retry-all" type="submit" disabled={busy}>
                Try all again
              </button>
            </Form>
          </div>
          <ul>
            {setAside.map((r) => (
              <li
                key={`${r.kind}:${r.entityId}`}
                className="border-b border-rule/70 px-4 py-3 last:border-0"
                data-testid={`set-aside-${r.kind}-${r.entityId}`}
              >
                <div className="flex flex-wrap items-baseline justify-between gap-2">
                  <div className="font-semibold">{r.url ? <Link to={r.url}>{r.label}</Link> : r.label}</div>
                  <Form method="post">
                    <input type="hidden" name="kind" value={r.kind} />
                    <input type="hidden" name="entityId" value={r.entityId} />
                    <button className="btn py-1 text-xs" name="intent" value="retry" type="submit" disabled={busy || r.retryQueued}>
                      {r.retryQueued ? "Queued" : "Try again"}
                    </button>
                  </Form>
                </div>
                <p className="mt-1 text-sm">
                  <span className="text-graphite-soft">Why: </span>
                  <span data-testid="set-aside-reason">{r.reason}</span>
                </p>
                <p className="mt-1 text-xs text-graphite-soft">
                  Since {formatDayTime(r.firstAt)} · {r.attempts} failed {r.attempts === 1 ? "try" : "tries"}, the last{" "}
                  {formatDayTime(r.lastAt)}
                </p>
              </li>
            ))}
          </ul>
        </section>
      )}
    </>
  );
}
