import type { Route } from "./+types/export";
import { requirePermission } from "~/lib/auth.server";
import { parseSearch } from "~/lib/edge.server";
import { listSearch } from "~/lib/test-records/filters";
import { spreadsheetCsv } from "~/lib/csv";
import { CSV_COLUMNS, csvRows } from "~/lib/test-records/records.server";

/** CSV of the filtered records: one row per reading in force, one per spec not measured. */
export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const rows = await csvRows(parseSearch(request, listSearch));
  const body = spreadsheetCsv([[...CSV_COLUMNS], ...rows], { bom: true });
  const day = new Date().toISOString().slice(0, 10);
  return new Response(body, {
    headers: {
      "content-type": "text/csv; charset=utf-8",
      "content-disposition": `attachment; filename="test-records-${day}.csv"`,
      "cache-control": "no-store",
    },
  });
}
