import type { Route } from "./+types/readings-csv";
import { requirePermission } from "~/lib/auth.server";
import { buildOr404 } from "~/lib/builds/builds.server";
import { BUILD_CSV_COLUMNS, buildCsvRows } from "~/lib/builds/export";
import { buildPage } from "~/lib/builds/page.server";
import { spreadsheetCsv } from "~/lib/csv";
import { notFound } from "~/lib/edge.server";

/** GET /builds/:number/readings.csv: every reading of the build's test records, with where it was taken. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "builds:read");
  const b = await buildOr404(request, params);
  const page = await buildPage(b.number);
  if (!page) notFound(request, "build");
  const body = spreadsheetCsv([[...BUILD_CSV_COLUMNS], ...buildCsvRows(page)], { bom: true });
  return new Response(body, {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="readings-${b.number}.csv"`,
      "cache-control": "no-store",
    },
  });
}
