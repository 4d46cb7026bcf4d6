import type { Route } from "./+types/index";
import { EmptyState, PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";

export const meta: Route.MetaFunction = () => [{ title: "Recordings · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  return null;
}

export default function Page() {
  return (
    <>
      <PageHeader title="Recordings" />
      <EmptyState title="Nothing here yet">Bench-test and procedure videos, with their marks and readings, will be listed here. The recordings section is not built yet.</EmptyState>
    </>
  );
}
