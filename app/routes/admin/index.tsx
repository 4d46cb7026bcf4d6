import { Link } from "react-router";
import type { Route } from "./+types/index";
import { PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { clientEnv } from "~/lib/env.server";

export const meta: Route.MetaFunction = () => [{ title: "Admin · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "user:manage");
  return { mailFake: clientEnv().mailFake };
}

export default function AdminHome({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <PageHeader title="Admin" />
      <div className="grid gap-4 sm:grid-cols-2">
        <Link to="/admin/people" className="card block text-graphite no-underline hover:border-brass">
          <h2 className="text-lg">People</h2>
          <p className="mt-1 text-sm text-graphite-soft">Invite staff, change roles, deactivate accounts.</p>
        </Link>
        <Link to="/admin/search" className="card block text-graphite no-underline hover:border-brass">
          <h2 className="text-lg">Search index</h2>
          <p className="mt-1 text-sm text-graphite-soft">
            Changes waiting to be searchable, and records set aside because they could not be indexed.
          </p>
        </Link>
        {loaderData.mailFake && (
          <Link to="/admin/outbox" className="card block text-graphite no-underline hover:border-brass">
            <h2 className="text-lg">Outbox</h2>
            <p className="mt-1 text-sm text-graphite-soft">Messages caught by the local mail stand-in, with their links.</p>
          </Link>
        )}
      </div>
    </>
  );
}
