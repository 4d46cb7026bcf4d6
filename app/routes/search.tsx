import type { Route } from "./+types/search";
import { EmptyState, PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";

export const meta: Route.MetaFunction = () => [{ title: "Search · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "search:use");
  return { q: new URL(request.url).searchParams.get("q") ?? "" };
}

export default function Search({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <PageHeader title="Search" />
      <EmptyState title="Nothing here yet">
        Full-text search over procedures, marks, readings and recordings is not built yet{loaderData.q ? ` (you asked for “${loaderData.q}”)` : ""}.
      </EmptyState>
    </>
  );
}
