import type { Route } from "./+types/calc.preload";
import { calculatePreload } from "~/lib/calc";
import { calcApi, calcApiGet } from "~/lib/calc-ui/api.server";

/** POST /api/calc/preload: the input JSON of calculatePreload in, its result out (see docs/calculations.md). */
export async function action({ request }: Route.ActionArgs) {
  return calcApi(request, calculatePreload);
}

export async function loader({ request }: Route.LoaderArgs) {
  return calcApiGet(request);
}
