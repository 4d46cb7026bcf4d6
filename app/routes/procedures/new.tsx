import { data, Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/new";
import { readForm } from "~/lib/edge.server";
import { Field, FormError, SelectField } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { starterDocument } from "~/lib/procedures/starter";
import { AREA_LABELS, AREAS } from "~/lib/procedures/areas";
import { domainFailure } from "~/lib/domain-error.server";
import { createProcedure } from "~/lib/procedures/drafts.server";
import { normalizeTags } from "~/lib/tags";

export const meta: Route.MetaFunction = () => [{ title: "New procedure · Benchreel" }];

const schema = z.object({
  title: z.string().trim().min(4, "Give the procedure a title of at least 4 characters.").max(120, "Keep the title under 120 characters."),
  area: z.enum(AREAS, { message: "Choose the shop area." }),
  summary: z.string().trim().max(300, "Keep the summary under 300 characters.").default(""),
  tags: z.string().max(400).default(""),
});

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "procedure:draft");
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requirePermission(request, "procedure:draft");
  const parsed = parseForm(schema, await readForm(request));
  if (!parsed.ok) return data({ errors: parsed.errors, values: parsed.values }, { status: 400 });
  try {
    const { procedure, revision } = await createProcedure(user, {
      ...parsed.data,
      tags: normalizeTags(parsed.data.tags),
      doc: starterDocument(),
    });
    return redirectWithFlash(`/procedures/${procedure.slug}/r/${revision.number}/edit`, {
      kind: "ok",
      message: "Draft started. It saves as you type.",
    });
  } catch (err) {
    return domainFailure(request, err, "create", parsed.values);
  }
}

export default function NewProcedure({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const e: Record<string, string> = actionData?.errors ?? {};
  const v: Record<string, string> = actionData?.values ?? {};
  return (
    <>
      <PageHeader title="Write a new procedure" kicker="Procedures" />
      <Form method="post" className="card max-w-2xl space-y-4" noValidate>
        <FormError message={e.form} />
        <Field
          label="Title"
          name="title"
          required
          defaultValue={v.title}
          error={e.title}
          hint="Say what is done, e.g. “Head stud installation and torque sequence”."
        />
        <SelectField label="Shop area" name="area" defaultValue={v.area ?? "block"} error={e.area}>
          {AREAS.map((a) => (
            <option key={a} value={a}>
              {AREA_LABELS[a]}
            </option>
          ))}
        </SelectField>
        <Field label="Summary" name="summary" defaultValue={v.summary} error={e.summary} hint="One or two sentences shown in the list." />
        <Field label="Tags" name="tags" defaultValue={v.tags} error={e.tags} hint="Comma-separated, e.g. head studs, torque, moly." />
        <div className="flex gap-2">
          <button className="btn btn-primary" type="submit" disabled={busy}>
            Start the draft
          </button>
          <Link to="/procedures" className="btn no-underline">
            Cancel
          </Link>
        </div>
      </Form>
    </>
  );
}
