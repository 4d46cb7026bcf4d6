import { data, Form, Link, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/signin";
import { readForm } from "~/lib/edge.server";
import { AuthCard } from "~/components/AuthCard";
import { Field, FormError } from "~/components/forms";
import { getUser, signIn } from "~/lib/auth.server";
import { parseForm } from "~/lib/forms";
import { safeReturnPath } from "~/lib/return-path";
import { passwordRefusalMessage, withRetryAfter } from "~/lib/throttle.server";
import { FlashBanner } from "~/components/AppHeader";
import { useRootData } from "~/root";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Benchreel" }];
export const headers: Route.HeadersFunction = withRetryAfter;

const schema = z.object({
  email: z.string().trim().min(1, "Enter your e-mail address.").email("That is not an e-mail address."),
  password: z.string().min(1, "Enter your password."),
  next: z.string().optional(),
});

/** Only a path on this site is followed after sign-in (app/lib/return-path.ts). */
function safeNext(request: Request, next: string | null | undefined): string {
  return safeReturnPath(next, new URL(request.url).origin);
}

export async function loader({ request }: Route.LoaderArgs) {
  // Public page; a signed-in person goes straight on.
  const next = safeNext(request, new URL(request.url).searchParams.get("next"));
  if (await getUser(request)) throw redirect(next);
  return { next };
}

export async function action({ request }: Route.ActionArgs) {
  const parsed = parseForm(schema, await readForm(request));
  if (!parsed.ok) return data({ errors: parsed.errors, values: parsed.values }, { status: 400 });
  const result = await signIn(request, parsed.data.email, parsed.data.password);
  if (result.ok) throw redirect(safeNext(request, parsed.data.next), { headers: { "Set-Cookie": result.cookie } });
  const values = { email: parsed.data.email };
  if (result.reason === "throttled") {
    const headers = { "Retry-After": String(result.refusal.retryAfterSec) };
    return data({ errors: { form: passwordRefusalMessage(result.refusal) }, values }, { status: 429, headers });
  }
  if (result.reason === "deactivated") {
    return data({ errors: { form: "This account has been deactivated. Ask the shop's admin." }, values }, { status: 403 });
  }
  return data({ errors: { form: "That e-mail and password do not match an account." }, values }, { status: 401 });
}

export default function SignIn({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string> = actionData?.errors ?? {};
  const busy = useNavigation().state === "submitting";
  const root = useRootData();
  return (
    <AuthCard title="Sign in" footer={<Link to="/reset">Forgot your password?</Link>}>
      <FlashBanner flash={root?.flash ?? null} />
      <Form method="post" className="space-y-4" noValidate>
        <FormError message={errors.form} />
        <input type="hidden" name="next" value={loaderData.next} />
        <Field
          label="E-mail"
          name="email"
          type="email"
          autoComplete="username"
          required
          defaultValue={actionData?.values?.email}
          error={errors.email}
          autoFocus
        />
        <Field label="Password" name="password" type="password" autoComplete="current-password" required error={errors.password} />
        <button type="submit" className="btn btn-primary w-full" disabled={busy}>
          {busy ? "Signing in…" : "Sign in"}
        </button>
      </Form>
    </AuthCard>
  );
}
