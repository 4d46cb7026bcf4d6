import { data } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/run";
import { RunScreen } from "~/components/runs/RunScreen";
import { requirePermission } from "~/lib/auth.server";
import { domainFailure, formValues, unknownAction } from "~/lib/domain-error.server";
import { idParams } from "~/lib/edge";
import { notFound, parseParams, readForm } from "~/lib/edge.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { can } from "~/lib/permissions";
import { finishFormSchema } from "~/lib/runs/entries";
import { abandonRun, finishRun, getRun, runExists } from "~/lib/runs/runs.server";
import { flashKindOf, recordVerdictText } from "~/lib/test-records/labels";

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data ? `${data.view.procedure.title} on ${data.view.build.number} · Run · Benchreel` : "Run · Benchreel" },
];

const abandonForm = z.object({
  intent: z.literal("abandon"),
  reason: z.string().trim().min(3, { message: "Say why the run is stopped (a few words)." }).max(1000),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const { id } = parseParams(request, idParams, params, "run");
  const view = await getRun(id);
  if (!view) notFound(request, "run");
  return { view, canWork: can(user.role, "run:work") };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "run:work");
  const { id } = parseParams(request, idParams, params, "run");
  if (!(await runExists(id))) notFound(request, "run");
  const form = await readForm(request);
  const intent = form.get("intent");
  try {
    if (intent === "finish") {
      const parsed = parseForm(finishFormSchema, form);
      if (!parsed.ok) return data({ intent, errors: parsed.errors, values: parsed.values }, { status: 400 });
      const filed = await finishRun(user, id, parsed.data);
      return redirectWithFlash(`/test-records/${filed.id}`, {
        kind: flashKindOf(filed.verdict),
        message: `Run finished and its test record filed: ${recordVerdictText(filed.verdict, filed.notMeasured, filed.placesMissing)}.`,
      });
    }
    if (intent === "abandon") {
      const parsed = parseForm(abandonForm, form);
      if (!parsed.ok) return data({ intent, errors: parsed.errors, values: parsed.values }, { status: 400 });
      await abandonRun(user, id, parsed.data.reason);
      return redirectWithFlash(`/runs/${id}`, { kind: "caution", message: "The run was stopped; nothing was filed." });
    }
  } catch (err) {
    return domainFailure(request, err, String(intent ?? ""), formValues(form));
  }
  return unknownAction(request, intent);
}

export default function Run({ loaderData, actionData }: Route.ComponentProps) {
  return <RunScreen view={loaderData.view} canWork={loaderData.canWork} actionData={actionData} />;
}
