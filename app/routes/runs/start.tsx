import { data, Form, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/start";
import { FormError, SelectField } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { domainFailure } from "~/lib/domain-error.server";
import { optionalParam } from "~/lib/edge";
import { parseSearch, readForm } from "~/lib/edge.server";
import { parseForm } from "~/lib/forms";
import { startChoices, startRun } from "~/lib/runs/runs.server";

export const meta: Route.MetaFunction = () => [{ title: "Start a run · Benchreel" }];

const startSearch = z.object({ procedure: optionalParam(200), build: optionalParam(40) });
const startForm = z.object({
  procedure: z.string().trim().min(1, { message: "Choose the procedure to work." }).max(200),
  build: z.string().trim().min(1, { message: "Choose the build it is worked on." }).max(40),
});

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "run:work");
  const chosen = parseSearch(request, startSearch);
  return { chosen, ...(await startChoices()) };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requirePermission(request, "run:work");
  const parsed = parseForm(startForm, await readForm(request));
  if (!parsed.ok) return data({ errors: parsed.errors, values: parsed.values }, { status: 400 });
  try {
    const run = await startRun(user, parsed.data);
    return redirect(`/runs/${run.id}`);
  } catch (err) {
    return domainFailure(request, err, "", parsed.values);
  }
}

export default function StartRun({ loaderData, actionData }: Route.ComponentProps) {
  const { chosen, procedures, builds } = loaderData;
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  const busy = useNavigation().state === "submitting";
  const proc = values.procedure ?? procedures.find((p) => p.slug === chosen.procedure || p.id === chosen.procedure)?.slug ?? "";
  const build = values.build ?? builds.find((b) => b.number === chosen.build?.toUpperCase() || b.id === chosen.build)?.number ?? "";
  return (
    <>
      <PageHeader title="Start a run" kicker="Runs">
        A run walks a published procedure one step at a time on the tablet, keeping each value the moment it is typed, and files the test
        record when it is finished.
      </PageHeader>
      <Form method="post" className="card max-w-xl space-y-5" noValidate>
        <FormError message={errors.form} />
        <SelectField label="Procedure" name="procedure" defaultValue={proc} error={errors.procedure}>
          <option value="">Choose a published procedure…</option>
          {procedures.map((p) => (
            <option key={p.id} value={p.slug}>
              {p.title}
            </option>
          ))}
        </SelectField>
        <SelectField label="Build (work order)" name="build" defaultValue={build} error={errors.build}>
          <option value="">Choose the engine it is worked on…</option>
          {builds.map((b) => (
            <option key={b.id} value={b.number}>
              {b.number} — {[b.engine, b.customerName].filter(Boolean).join(", ")}
            </option>
          ))}
        </SelectField>
        <p className="text-sm text-graphite-soft">
          The run follows the revision published now. If a newer one is published while you work, the run says so and keeps the one it began
          with.
        </p>
        <button type="submit" className="btn btn-primary min-h-11" disabled={busy}>
          {busy ? "Starting…" : "Start the run"}
        </button>
      </Form>
    </>
  );
}
