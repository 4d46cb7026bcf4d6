import { z } from "zod";
import type { Route } from "./+types/captions.as-vtt";
import { requirePermission } from "~/lib/auth.server";
import { captionFile } from "~/lib/captions/captions.server";
import { idParams } from "~/lib/edge";
import { parseParams, parseSearch } from "~/lib/edge.server";

/** `?download=1` asks for the file as an attachment (the export); without it the player loads it (`v`: the watch page's version of the lines). */
const search = z.object({ download: z.enum(["1"]).optional(), v: z.string().max(60).optional() });

/** GET /api/recordings/:id/captions.vtt: the corrected captions as WebVTT, for the player's text track and the export. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const { id } = parseParams(request, idParams, params, "recording");
  const { download } = parseSearch(request, search);
  return captionFile(request, id, "vtt", download === "1");
}
