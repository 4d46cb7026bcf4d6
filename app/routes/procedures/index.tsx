import type { Route } from "./+types/index";
import { EmptyState, PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";

export const meta: Route.MetaFunction = () => [{ title: "Procedures · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  return null;
}

export default function Page() {
  return (
    <>
      <PageHeader title="Procedures" />
      <EmptyState title="Nothing here yet">Procedures are written, reviewed and published here. The procedures section is not built yet.</EmptyState>
    </>
  );
}
