import { data, Form, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/people";
import { readForm } from "~/lib/edge.server";
import { Field, FormError, SelectField } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { domainFailure, formValues, unknownAction } from "~/lib/domain-error.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { changeRole, invite, listPeople, openInvitations, setActive } from "~/lib/people.server";
import { ROLE_LABELS, ROLES } from "~/lib/permissions";
import { formatDay } from "~/lib/dates";

export const meta: Route.MetaFunction = () => [{ title: "People · Benchreel" }];

const roleField = z.enum(ROLES, { message: "Choose a role." });
const inviteSchema = z.object({ intent: z.literal("invite"), email: z.string().trim().email("Enter an e-mail address."), role: roleField });
const roleSchema = z.object({ intent: z.literal("role"), userId: z.string().min(1), role: roleField });
const activeSchema = z.object({ intent: z.enum(["deactivate", "reactivate"]), userId: z.string().min(1) });

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "user:manage");
  const [people, pending] = await Promise.all([listPeople(), openInvitations()]);
  return { people, pending };
}

export async function action({ request }: Route.ActionArgs) {
  const actor = await requirePermission(request, "user:manage");
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  try {
    if (intent === "invite") {
      const parsed = parseForm(inviteSchema, form);
      if (!parsed.ok) return data({ intent, errors: parsed.errors, values: parsed.values }, { status: 400 });
      await invite(actor, parsed.data.email, parsed.data.role);
      return redirectWithFlash("/admin/people", { kind: "ok", message: `Invitation sent to ${parsed.data.email}.` });
    }
    if (intent === "role") {
      const parsed = parseForm(roleSchema, form);
      if (!parsed.ok) return data({ intent, errors: parsed.errors, values: parsed.values }, { status: 400 });
      await changeRole(actor, parsed.data.userId, parsed.data.role);
      return redirectWithFlash("/admin/people", { kind: "ok", message: `Role changed to ${ROLE_LABELS[parsed.data.role]}.` });
    }
    if (intent === "deactivate" || intent === "reactivate") {
      const parsed = parseForm(activeSchema, form);
      if (!parsed.ok) return data({ intent, errors: parsed.errors, values: parsed.values }, { status: 400 });
      await setActive(actor, parsed.data.userId, intent === "reactivate");
      return redirectWithFlash("/admin/people", {
        kind: "ok",
        message: intent === "deactivate" ? "Account deactivated; its sessions have ended." : "Account reactivated.",
      });
    }
  } catch (err) {
    return domainFailure(request, err, intent, formValues(form));
  }
  return unknownAction(request, intent);
}

const fmt = formatDay;

export default function People({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const ie: Record<string, string> = actionData?.intent === "invite" ? actionData.errors : {};
  const otherError = actionData && actionData.intent !== "invite" ? Object.values(actionData.errors)[0] : undefined;
  return (
    <>
      <PageHeader title="People" kicker="Admin" />
      <FormError message={otherError} />
      <div className="mt-4 grid gap-6 lg:grid-cols-[1fr_20rem]">
        <section className="card overflow-x-auto p-0">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-rule bg-paper-deep/60 text-xs uppercase tracking-wide text-graphite-soft">
              <tr>
                <th className="px-4 py-2">Person</th>
                <th className="px-4 py-2">Role</th>
                <th className="px-4 py-2">Status</th>
                <th className="px-4 py-2">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {loaderData.people.map((p) => (
                <tr key={p.id} className="border-b border-rule/70 last:border-0" data-testid={`person-${p.email}`}>
                  <td className="px-4 py-3">
                    <div className="font-semibold">{p.name}</div>
                    <div className="text-graphite-soft">{p.email}</div>
                  </td>
                  <td className="px-4 py-3">
                    <Form method="post" className="flex items-center gap-2">
                      <input type="hidden" name="intent" value="role" />
                      <input type="hidden" name="userId" value={p.id} />
                      <label className="sr-only" htmlFor={`role-${p.id}`}>
                        Role of {p.name}
                      </label>
                      <select id={`role-${p.id}`} name="role" defaultValue={p.role} className="field w-auto py-1 text-sm">
                        {ROLES.map((r) => (
                          <option key={r} value={r}>
                            {ROLE_LABELS[r]}
                          </option>
                        ))}
                      </select>
                      <button className="btn py-1 text-xs" type="submit" disabled={busy}>
                        Set
                      </button>
                    </Form>
                  </td>
                  <td className="px-4 py-3">
                    {p.deactivatedAt ? <span className="text-spec-red">Deactivated {fmt(p.deactivatedAt)}</span> : <span>Active</span>}
                  </td>
                  <td className="px-4 py-3 text-right">
                    <Form method="post">
                      <input type="hidden" name="userId" value={p.id} />
                      {p.deactivatedAt ? (
                        <button className="btn py-1 text-xs" name="intent" value="reactivate" type="submit">
                          Reactivate
                        </button>
                      ) : (
                        <button className="btn btn-danger py-1 text-xs" name="intent" value="deactivate" type="submit">
                          Deactivate
                        </button>
                      )}
                    </Form>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
        <aside className="space-y-6">
          <Form method="post" className="card space-y-4" noValidate>
            <h2 className="text-lg">Invite someone</h2>
            <input type="hidden" name="intent" value="invite" />
            <FormError message={ie.form} />
            <Field
              label="E-mail"
              name="email"
              type="email"
              required
              defaultValue={actionData?.intent === "invite" ? actionData.values.email : ""}
              error={ie.email}
            />
            <SelectField label="Role" name="role" defaultValue="apprentice" error={ie.role}>
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {ROLE_LABELS[r]}
                </option>
              ))}
            </SelectField>
            <button className="btn btn-primary w-full" type="submit" disabled={busy}>
              Send invitation
            </button>
          </Form>
          <section className="card">
            <h2 className="text-lg">Open invitations</h2>
            {loaderData.pending.length === 0 ? (
              <p className="mt-2 text-sm text-graphite-soft">None.</p>
            ) : (
              <ul className="mt-2 space-y-2 text-sm">
                {loaderData.pending.map((i) => (
                  <li key={i.id}>
                    <div className="font-semibold">{i.email}</div>
                    <div className="text-graphite-soft">
                      {ROLE_LABELS[i.role]} · {new Date(i.expiresAt) < new Date() ? "expired" : `expires ${fmt(i.expiresAt)}`}
                    </div>
                  </li>
                ))}
              </ul>
            )}
          </section>
        </aside>
      </div>
    </>
  );
}
