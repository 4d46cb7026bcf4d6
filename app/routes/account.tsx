import { data, Form } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/account";
import { readForm } from "~/lib/edge.server";
import { Field, FormError, SelectField } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { getSession, requirePermission } from "~/lib/auth.server";
import { clientAddress } from "~/lib/client-address.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { newPasswordSchema } from "~/lib/password";
import { changePassword, updateProfile } from "~/lib/people.server";
import { ROLE_LABELS } from "~/lib/permissions";
import { withRetryAfter } from "~/lib/throttle.server";

export const meta: Route.MetaFunction = () => [{ title: "Your account · Benchreel" }];
export const headers: Route.HeadersFunction = withRetryAfter;

const profileSchema = z.object({
  intent: z.literal("profile"),
  name: z.string().trim().min(2, "Enter your name.").max(80, "Keep the name under 80 characters."),
  unitSystem: z.enum(["metric", "inch"], { message: "Choose metric or inch." }),
});
const passwordSchema = z
  .object({
    intent: z.literal("password"),
    current: z.string().min(1, "Enter your current password."),
    password: newPasswordSchema,
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { message: "The two passwords differ.", path: ["confirm"] });

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "account:edit-own");
  return { user };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requirePermission(request, "account:edit-own");
  const form = await readForm(request);
  if (form.get("intent") === "password") {
    const parsed = parseForm(passwordSchema, form);
    if (!parsed.ok) return data({ intent: "password", errors: parsed.errors }, { status: 400 });
    const session = await getSession(request);
    const change = await changePassword(user, session!.session.id, clientAddress(request), parsed.data.current, parsed.data.password);
    if (!change.ok) {
      const headers = change.retryAfterSec ? { "Retry-After": String(change.retryAfterSec) } : undefined;
      return data(
        { intent: "password", errors: { current: change.message } as Record<string, string> },
        { status: change.status, headers },
      );
    }
    return redirectWithFlash("/account", { kind: "ok", message: "Password changed. Your other sessions are signed out." });
  }
  const parsed = parseForm(profileSchema, form);
  if (!parsed.ok) return data({ intent: "profile", errors: parsed.errors }, { status: 400 });
  await updateProfile(user.id, parsed.data.name, parsed.data.unitSystem);
  return redirectWithFlash("/account", { kind: "ok", message: "Saved." });
}

export default function Account({ loaderData, actionData }: Route.ComponentProps) {
  const { user } = loaderData;
  const pe: Record<string, string> = actionData?.intent === "profile" ? actionData.errors : {};
  const pw: Record<string, string> = actionData?.intent === "password" ? actionData.errors : {};
  return (
    <>
      <PageHeader title="Your account" kicker={ROLE_LABELS[user.role]}>
        {user.email}
      </PageHeader>
      <div className="grid gap-6 md:grid-cols-2">
        <Form method="post" className="card space-y-4">
          <h2 className="text-lg">Profile and units</h2>
          <input type="hidden" name="intent" value="profile" />
          <Field label="Name" name="name" defaultValue={user.name} error={pe.name} required />
          <SelectField label="Preferred units" name="unitSystem" defaultValue={user.unitSystem} error={pe.unitSystem}>
            <option value="metric">Metric (mm, N·m, kN, °C)</option>
            <option value="inch">Inch (in, ft·lbf, lbf, °F)</option>
          </SelectField>
          <p className="text-sm text-graphite-soft">Calculators and readings open in these units; you can still switch any field.</p>
          <button className="btn btn-primary" type="submit">
            Save
          </button>
        </Form>
        <Form method="post" className="card space-y-4">
          <h2 className="text-lg">Password</h2>
          <input type="hidden" name="intent" value="password" />
          <FormError message={pw.form} />
          <Field label="Current password" name="current" type="password" autoComplete="current-password" error={pw.current} />
          <Field
            label="New password"
            name="password"
            type="password"
            autoComplete="new-password"
            error={pw.password}
            hint="At least 10 characters."
          />
          <Field label="New password again" name="confirm" type="password" autoComplete="new-password" error={pw.confirm} />
          <button className="btn" type="submit">
            Change password
          </button>
        </Form>
      </div>
    </>
  );
}
