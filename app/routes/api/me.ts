import type { Route } from "./+types/me";
import { requirePermission } from "~/lib/auth.server";

/** The signed-in person, for client code and API users. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  return Response.json({ user });
}
