import { data, Form, Link } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/reset-request";
import { readForm } from "~/lib/edge.server";
import { AuthCard } from "~/components/AuthCard";
import { Field, FormError } from "~/components/forms";
import { parseForm } from "~/lib/forms";
import { clientAddress } from "~/lib/client-address.server";
import { requestPasswordReset } from "~/lib/people.server";
import { resetRefusalMessage, withRetryAfter } from "~/lib/throttle.server";

export const meta: Route.MetaFunction = () => [{ title: "Reset password · Benchreel" }];
export const headers: Route.HeadersFunction = withRetryAfter;

const schema = z.object({ email: z.string().trim().email("Enter the e-mail address of your account.") });

export async function loader() {
  // Public: anyone may ask for a reset link.
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const parsed = parseForm(schema, await readForm(request));
  if (!parsed.ok) return data({ errors: parsed.errors, values: parsed.values, sent: false }, { status: 400 });
  const refused = await requestPasswordReset(parsed.data.email, clientAddress(request));
  if (refused) {
    const headers = { "Retry-After": String(refused.retryAfterSec) };
    return data(
      { errors: { form: resetRefusalMessage(refused) } as Record<string, string>, values: parsed.values, sent: false },
      { status: 429, headers },
    );
  }
  return { errors: {} as Record<string, string>, values: parsed.values, sent: true };
}

export default function ResetRequest({ actionData }: Route.ComponentProps) {
  if (actionData?.sent) {
    return (
      <AuthCard title="Check your e-mail" footer={<Link to="/signin">Back to sign-in</Link>}>
        <p>
          If an account uses <strong>{actionData.values.email}</strong>, a link to choose a new password is on its way. It works once, for
          one hour.
        </p>
      </AuthCard>
    );
  }
  const errors: Record<string, string> = actionData?.errors ?? {};
  return (
    <AuthCard title="Reset your password" footer={<Link to="/signin">Back to sign-in</Link>}>
      <Form method="post" className="space-y-4" noValidate>
        <FormError message={errors.form} />
        <Field
          label="E-mail"
          name="email"
          type="email"
          autoComplete="username"
          required
          defaultValue={actionData?.values?.email}
          error={errors.email}
        />
        <button className="btn btn-primary w-full" type="submit">
          Send me a link
        </button>
      </Form>
    </AuthCard>
  );
}
