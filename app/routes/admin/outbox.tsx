import { data } from "react-router";
import type { Route } from "./+types/outbox";
import { EmptyState, PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { env } from "~/lib/env.server";
import { readFakeMailbox } from "~/lib/fake-mailbox.server";
import { recentOutbox } from "~/lib/mail.server";
import { formatDayTime } from "~/lib/dates";

export const meta: Route.MetaFunction = () => [{ title: "Outbox · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "outbox:view");
  const dir = env().MAIL_FAKE_DIR;
  // Only exists while mail goes to the local stand-in; with a real provider there is nothing to show.
  if (!dir) throw data({ message: "Mail goes to a real provider; there is no local outbox." }, { status: 404 });
  const [messages, queue] = await Promise.all([readFakeMailbox(dir), recentOutbox()]);
  return { messages: messages.slice(0, 100), queue };
}

const when = formatDayTime;

export default function Outbox({ loaderData }: Route.ComponentProps) {
  const pending = loaderData.queue.filter((q) => !q.sentAt);
  return (
    <>
      <PageHeader title="Outbox" kicker="Admin">
        Messages caught by the local mail stand-in. A real mail provider replaces it in production.
      </PageHeader>
      {pending.length > 0 && (
        <section className="card mb-6">
          <h2 className="text-lg">Waiting to be sent ({pending.length})</h2>
          <ul className="mt-2 space-y-1 text-sm">
            {pending.map((q) => (
              <li key={q.id}>
                {q.subject} → {q.to} · {q.attempts} attempt{q.attempts === 1 ? "" : "s"}
                {q.lastError ? ` · last error: ${q.lastError}` : ""}
              </li>
            ))}
          </ul>
        </section>
      )}
      {loaderData.messages.length === 0 ? (
        <EmptyState title="No messages yet">Invitations, reset links and review notices appear here once sent.</EmptyState>
      ) : (
        <ul className="space-y-4" data-testid="outbox-messages">
          {loaderData.messages.map((m) => (
            <li key={m.id} className="card" data-testid="outbox-message">
              <div className="flex flex-wrap items-baseline justify-between gap-2">
                <h2 className="text-lg">{m.subject}</h2>
                <span className="text-sm text-graphite-soft">{when(m.receivedAt)}</span>
              </div>
              <p className="text-sm text-graphite-soft">To {m.to.join(", ")}</p>
              <pre className="mt-3 whitespace-pre-wrap font-sans text-sm">{m.text}</pre>
              {m.links.length > 0 && (
                <ul className="mt-3 space-y-1 text-sm">
                  {m.links.map((l) => (
                    <li key={l}>
                      <a href={l} className="break-all">
                        {l}
                      </a>
                    </li>
                  ))}
                </ul>
              )}
            </li>
          ))}
        </ul>
      )}
    </>
  );
}
