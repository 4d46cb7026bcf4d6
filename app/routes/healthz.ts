import { health } from "~/lib/health.server";

// Public on purpose (for the shop's monitoring); it reveals only up/down and queue sizes.
export async function loader() {
  const report = await health();
  return Response.json(report, { status: report.status === "ok" ? 200 : 503, headers: { "Cache-Control": "no-store" } });
}
