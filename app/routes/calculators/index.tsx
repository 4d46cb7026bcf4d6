import type { Route } from "./+types/index";
import { EmptyState, PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";

export const meta: Route.MetaFunction = () => [{ title: "Calculators · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "calc:use");
  return null;
}

export default function Calculators() {
  return (
    <>
      <PageHeader title="Calculators" />
      <EmptyState title="Nothing here yet">Preload, Bore distortion and Clearances will live here.</EmptyState>
    </>
  );
}
