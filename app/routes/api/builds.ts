import type { Route } from "./+types/builds";
import { requirePermission } from "~/lib/auth.server";
import { buildOr404 } from "~/lib/builds/builds.server";
import { buildJson } from "~/lib/builds/export";
import { buildPage } from "~/lib/builds/page.server";
import { notFound } from "~/lib/edge.server";

/** GET /api/builds/:number: the build, its test records and readings (docs/api-builds.md). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "builds:read");
  const b = await buildOr404(request, params);
  const page = await buildPage(b.number);
  if (!page) notFound(request, "build");
  return Response.json(buildJson(page), { headers: { "Cache-Control": "no-store" } });
}
