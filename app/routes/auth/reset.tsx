import { data, Form, Link } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/reset";
import { readForm } from "~/lib/edge.server";
import { AuthCard } from "~/components/AuthCard";
import { Field, FormError } from "~/components/forms";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { newPasswordSchema } from "~/lib/password";
import { domainFailure } from "~/lib/domain-error.server";
import { findReset, resetPassword } from "~/lib/people.server";
import { tokenState } from "~/lib/tokens.server";

export const meta: Route.MetaFunction = () => [{ title: "Choose a new password · Benchreel" }];

const schema = z
  .object({ password: newPasswordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: "The two passwords differ.", path: ["confirm"] });

export async function loader({ params }: Route.LoaderArgs) {
  // Public: the token itself is the permission.
  const row = await findReset(params.token);
  return { state: row ? tokenState(row) : ("unknown" as const) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const parsed = parseForm(schema, await readForm(request));
  if (!parsed.ok) return data({ errors: parsed.errors }, { status: 400 });
  try {
    await resetPassword(params.token, parsed.data.password);
  } catch (err) {
    return domainFailure(request, err);
  }
  return redirectWithFlash("/signin", { kind: "ok", message: "Password changed. Sign in with the new one." });
}

export default function Reset({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string> = actionData?.errors ?? {};
  if (loaderData.state !== "valid") {
    const why = {
      used: "This reset link has already been used.",
      expired: "This reset link has expired.",
      unknown: "This reset link is not valid.",
    }[loaderData.state];
    return (
      <AuthCard title="Reset link" footer={<Link to="/reset">Ask for a new link</Link>}>
        <p>{why}</p>
      </AuthCard>
    );
  }
  return (
    <AuthCard title="Choose a new password">
      <Form method="post" className="space-y-4" noValidate>
        <FormError message={errors.form} />
        <Field
          label="New password"
          name="password"
          type="password"
          autoComplete="new-password"
          required
          error={errors.password}
          hint="At least 10 characters."
        />
        <Field label="New password again" name="confirm" type="password" autoComplete="new-password" required error={errors.confirm} />
        <button className="btn btn-primary w-full" type="submit">
          Save the new password
        </button>
      </Form>
    </AuthCard>
  );
}
