import { data, Form, Link } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/invite";
import { readForm } from "~/lib/edge.server";
import { AuthCard } from "~/components/AuthCard";
import { Field, FormError } from "~/components/forms";
import { startSession } from "~/lib/auth.server";
import { parseForm } from "~/lib/forms";
import { newPasswordSchema } from "~/lib/password";
import { domainFailure } from "~/lib/domain-error.server";
import { acceptInvitation, findInvitation, invitationState } from "~/lib/people.server";
import { ROLE_LABELS } from "~/lib/permissions";
import { redirectWithFlash } from "~/lib/flash.server";

export const meta: Route.MetaFunction = () => [{ title: "Accept invitation · Benchreel" }];

const schema = z
  .object({
    name: z.string().trim().min(2, "Enter the name your colleagues know you by.").max(80, "Keep the name under 80 characters."),
    password: newPasswordSchema,
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { message: "The two passwords differ.", path: ["confirm"] });

export async function loader({ params }: Route.LoaderArgs) {
  // Public: the token itself is the permission.
  const inv = await findInvitation(params.token);
  const state = invitationState(inv);
  return { state, email: state === "valid" ? inv!.email : null, role: state === "valid" ? ROLE_LABELS[inv!.role] : null };
}

export async function action({ request, params }: Route.ActionArgs) {
  const parsed = parseForm(schema, await readForm(request));
  if (!parsed.ok) return data({ errors: parsed.errors, values: parsed.values }, { status: 400 });
  try {
    const userId = await acceptInvitation(params.token, parsed.data.name, parsed.data.password);
    const cookie = await startSession(request, userId);
    return redirectWithFlash(
      "/",
      { kind: "ok", message: `Welcome to Benchreel, ${parsed.data.name}.` },
      { headers: { "Set-Cookie": cookie } },
    );
  } catch (err) {
    return domainFailure(request, err, "", parsed.values);
  }
}

export default function Invite({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string> = actionData?.errors ?? {};
  if (loaderData.state !== "valid") {
    const why = {
      used: "This invitation has already been used.",
      expired: "This invitation has expired.",
      unknown: "This invitation link is not valid.",
    }[loaderData.state];
    return (
      <AuthCard title="Invitation">
        <p>{why}</p>
        <p className="mt-3 text-sm text-graphite-soft">
          Ask the shop's admin for a new invitation, or <Link to="/signin">sign in</Link> if you already have an account.
        </p>
      </AuthCard>
    );
  }
  return (
    <AuthCard title="Join Benchreel">
      <p className="mb-4 text-sm text-graphite-soft">
        Invitation for <strong className="text-graphite">{loaderData.email}</strong> as {loaderData.role}.
      </p>
      <Form method="post" className="space-y-4" noValidate>
        <FormError message={errors.form} />
        <Field label="Your name" name="name" autoComplete="name" required defaultValue={actionData?.values?.name} error={errors.name} />
        <Field
          label="Password"
          name="password"
          type="password"
          autoComplete="new-password"
          required
          error={errors.password}
          hint="At least 10 characters."
        />
        <Field label="Password again" name="confirm" type="password" autoComplete="new-password" required error={errors.confirm} />
        <button className="btn btn-primary w-full" type="submit">
          Create my account
        </button>
      </Form>
    </AuthCard>
  );
}
