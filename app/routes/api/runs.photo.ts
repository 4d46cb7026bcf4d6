import { z } from "zod";
import type { Route } from "./+types/runs.photo";
import { requirePermission } from "~/lib/auth.server";
import { uuid } from "~/lib/edge";
import { notFound, parseParams } from "~/lib/edge.server";
import { photoResponse } from "~/lib/runs/photos.server";

const photoParams = z.object({ id: uuid, photoId: uuid });

/** GET a run's photo (everyone who may read the shop's records may see it). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const p = parseParams(request, photoParams, params, "photo");
  return (await photoResponse(request, p.id, p.photoId)) ?? notFound(request, "photo");
}
