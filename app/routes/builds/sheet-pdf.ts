import type { Route } from "./+types/sheet-pdf";
import { buildSheetPdf } from "~/components/builds/sheet-pdf.server";
import { requirePermission } from "~/lib/auth.server";
import { buildOr404 } from "~/lib/builds/builds.server";
import { sheetFileName } from "~/lib/builds/mail.server";
import { buildPage } from "~/lib/builds/page.server";
import { sheetSearch } from "~/lib/builds/sheet";
import { sheetPhotos } from "~/lib/runs/photos.server";
import { notFound, parseSearch } from "~/lib/edge.server";

/** GET /builds/:number/sheet.pdf[?paper=letter]: the build sheet as a PDF, A4 unless asked. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "builds:read");
  const b = await buildOr404(request, params);
  const { paper } = parseSearch(request, sheetSearch);
  const page = await buildPage(b.number);
  if (!page) notFound(request, "build");
  const pdf = await buildSheetPdf(page, paper ?? "a4", await sheetPhotos(page.build.id));
  return new Response(new Uint8Array(pdf), {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Disposition": `attachment; filename="${sheetFileName(b.number)}"`,
      "Cache-Control": "no-store",
    },
  });
}
