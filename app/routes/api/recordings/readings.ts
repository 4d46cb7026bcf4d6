import type { Route } from "./+types/readings";
import { requirePermission } from "~/lib/auth.server";
import { domainFailure } from "~/lib/domain-error.server";
import { spreadsheetCsv } from "~/lib/csv";
import { methodNotAllowed, parseParams, readJsonObject } from "~/lib/edge.server";
import { idParams } from "~/lib/edge";
import { createReadings, listReadings, recordingOr404 } from "~/lib/recordings/notes.server";
import { depthEntered } from "~/lib/recordings/positions";
import { quantityDef } from "~/lib/recordings/quantities";

/**
 * GET lists a recording's readings (JSON, or CSV with ?format=csv); POST adds one reading or
 * `{ readings: [...] }` at once.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  parseParams(request, idParams, params, "recording");
  const rec = await recordingOr404(request, params.id);
  const rows = await listReadings(params.id);
  if (new URL(request.url).searchParams.get("format") !== "csv") return Response.json({ readings: rows });
  const csv = spreadsheetCsv(
    rows.map((r) => ({
      time_s: r.t ?? "",
      quantity: quantityDef(r.quantity)?.label ?? r.quantity,
      label: r.label,
      fastener: r.fastener ?? "",
      cylinder: r.cylinder ?? "",
      journal: r.journal ?? "",
      depth: depthEntered(r)?.value ?? "",
      depth_unit: depthEntered(r)?.unit ?? "",
      angle_deg: r.angleDeg ?? "",
      value: r.valueEntered,
      unit: r.unitEntered,
      value_si: r.valueSi,
      lube: r.conditions?.lube ?? "",
      tool: r.conditions?.tool ?? "",
      pass: r.conditions?.pass ?? "",
      note: r.conditions?.note ?? "",
      entered_by: r.authorName ?? "",
      entered_at: new Date(r.createdAt).toISOString(),
    })),
    {
      header: true,
      columns: [
        "time_s",
        "quantity",
        "label",
        "fastener",
        "cylinder",
        "journal",
        "depth",
        "depth_unit",
        "angle_deg",
        "value",
        "unit",
        "value_si",
        "lube",
        "tool",
        "pass",
        "note",
        "entered_by",
        "entered_at",
      ],
    },
  );
  const name = `${
    rec.title
      .replace(/[^A-Za-z0-9 _-]+/g, "")
      .trim()
      .replace(/\s+/g, "-")
      .slice(0, 60) || "recording"
  }-readings.csv`;
  return new Response(csv, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="${name}"`,
      "Cache-Control": "private, no-store",
    },
  });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "reading:create");
  parseParams(request, idParams, params, "recording");
  if (request.method !== "POST") return methodNotAllowed("GET, POST");
  const body = await readJsonObject(request);
  try {
    return await createReadings(request, user, params.id, body);
  } catch (err) {
    return domainFailure(request, err);
  }
}
