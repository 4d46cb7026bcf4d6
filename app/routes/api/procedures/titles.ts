import type { Route } from "./+types/titles";
import { requirePermission } from "~/lib/auth.server";
import { isUuid } from "~/lib/edge";
import { AREA_LABELS } from "~/lib/procedures/areas";
import { searchTitles } from "~/lib/procedures/lookup.server";

/** Title search for the editor's procedure-link picker. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const u = new URL(request.url);
  const q = (u.searchParams.get("q") ?? "").slice(0, 100);
  const except = u.searchParams.get("except") ?? undefined;
  const rows = await searchTitles(user, q, isUuid(except) ? except : undefined);
  return Response.json({ results: rows.map((r) => ({ ...r, areaLabel: AREA_LABELS[r.area] })) });
}
