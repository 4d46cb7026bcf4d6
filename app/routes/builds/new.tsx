import { data, useNavigation } from "react-router";
import type { Route } from "./+types/new";
import { BuildForm } from "~/components/builds/BuildForm";
import { PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { newBuildSchema } from "~/lib/builds/form";
import { createBuild, leadBuilderOptions } from "~/lib/builds/write.server";
import { domainFailure } from "~/lib/domain-error.server";
import { readForm } from "~/lib/edge.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";

export const meta: Route.MetaFunction = () => [{ title: "Open a build · Benchreel" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "builds:write");
  return { leads: await leadBuilderOptions(), me: user.id, today: new Date().toISOString().slice(0, 10) };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requirePermission(request, "builds:write");
  const parsed = parseForm(newBuildSchema, await readForm(request));
  if (!parsed.ok) return data({ errors: parsed.errors, values: parsed.values }, { status: 400 });
  try {
    const b = await createBuild(user, parsed.data);
    return redirectWithFlash(`/builds/${b.number}`, { kind: "ok", message: `Build ${b.number} opened.` });
  } catch (err) {
    return domainFailure(request, err, "", parsed.values);
  }
}

export default function NewBuild({ loaderData, actionData }: Route.ComponentProps) {
  const { leads, me, today } = loaderData;
  const busy = useNavigation().state === "submitting";
  const values = actionData?.values ?? { receivedOn: today, leadBuilderId: leads.some((l) => l.id === me) ? me : "" };
  return (
    <>
      <PageHeader title="Open a build" kicker="Builds">
        One engine job: its work order, the customer and the engine. Test records, recordings and marks are attached to it as the work goes
        on.
      </PageHeader>
      <BuildForm
        values={values}
        errors={actionData?.errors ?? {}}
        leads={leads}
        withNumber
        busy={busy}
        submitLabel="Open the build"
        cancelTo="/builds"
      />
    </>
  );
}
