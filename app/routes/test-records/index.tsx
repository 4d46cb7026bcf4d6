import type { Route } from "./+types/index";
import { EmptyState, PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";

export const meta: Route.MetaFunction = () => [{ title: "Test records · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  return null;
}

export default function Page() {
  return (
    <>
      <PageHeader title="Test records" />
      <EmptyState title="Nothing here yet">QC test records filed against procedure revisions will be listed here. The test records section is not built yet.</EmptyState>
    </>
  );
}
