import type { Route } from "./+types/calc.distortion";
import { calculateDistortion } from "~/lib/calc";
import { calcApi, calcApiGet } from "~/lib/calc-ui/api.server";

/** POST /api/calc/distortion: the input JSON of calculateDistortion in, its result out (see docs/calculations.md). */
export async function action({ request }: Route.ActionArgs) {
  return calcApi(request, calculateDistortion);
}

export async function loader({ request }: Route.LoaderArgs) {
  return calcApiGet(request);
}
