import { data, useNavigation } from "react-router";
import type { Route } from "./+types/edit";
import { BuildForm } from "~/components/builds/BuildForm";
import { PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { buildOr404 } from "~/lib/builds/builds.server";
import { buildFields } from "~/lib/builds/form";
import { boreOf, sizeFieldText, strokeOf } from "~/lib/builds/sizes";
import { leadBuilderOptions, updateBuild } from "~/lib/builds/write.server";
import { domainFailure } from "~/lib/domain-error.server";
import { readForm } from "~/lib/edge.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Change ${data?.number ?? "build"} · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "builds:write");
  const b = await buildOr404(request, params);
  const bore = boreOf(b);
  const stroke = strokeOf(b);
  return {
    number: b.number,
    leads: await leadBuilderOptions(),
    values: {
      customerName: b.customerName,
      customerContact: b.customerContact,
      engine: b.engine,
      engineSerial: b.engineSerial,
      sizeUnit: b.boreUnit ?? b.strokeUnit ?? "mm",
      bore: sizeFieldText(bore),
      stroke: sizeFieldText(stroke),
      cylinders: b.cylinders == null ? "" : String(b.cylinders),
      mainJournals: b.mainJournals == null ? "" : String(b.mainJournals),
      notes: b.notes,
      leadBuilderId: b.leadBuilderId ?? "",
      receivedOn: b.receivedOn ?? "",
      promisedOn: b.promisedOn ?? "",
    } as Record<string, string>,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "builds:write");
  const b = await buildOr404(request, params);
  const parsed = parseForm(buildFields, await readForm(request));
  if (!parsed.ok) return data({ errors: parsed.errors, values: parsed.values }, { status: 400 });
  try {
    const changed = await updateBuild(user, b.id, parsed.data);
    return redirectWithFlash(`/builds/${b.number}`, {
      kind: "ok",
      message: changed ? `Build ${b.number} changed.` : "Nothing was changed.",
    });
  } catch (err) {
    return domainFailure(request, err, "", parsed.values);
  }
}

export default function EditBuild({ loaderData, actionData }: Route.ComponentProps) {
  const { number, leads, values } = loaderData;
  const busy = useNavigation().state === "submitting";
  return (
    <>
      <PageHeader title={`Change ${number}`} kicker="Builds">
        The work order number stays; everything else can be corrected. The change is kept on the build's timeline.
      </PageHeader>
      <BuildForm
        values={actionData?.values ?? values}
        errors={actionData?.errors ?? {}}
        leads={leads}
        withNumber={false}
        busy={busy}
        submitLabel="Save the build"
        cancelTo={`/builds/${number}`}
      />
    </>
  );
}
