import type { Route } from "./+types/calc.clearance";
import { calculateClearance } from "~/lib/calc";
import { calcApi, calcApiGet } from "~/lib/calc-ui/api.server";

/** POST /api/calc/clearance: the input JSON of calculateClearance in, its result out (see docs/calculations.md). */
export async function action({ request }: Route.ActionArgs) {
  return calcApi(request, calculateClearance);
}

export async function loader({ request }: Route.LoaderArgs) {
  return calcApiGet(request);
}
