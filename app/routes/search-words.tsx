import { data, Form, Link, useNavigation, type ShouldRevalidateFunction } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/search-words";
import { readForm } from "~/lib/edge.server";
import { Field, FormError } from "~/components/forms";
import { PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { domainFailure, formValues, unknownAction } from "~/lib/domain-error.server";
import { formatDay } from "~/lib/dates";
import { redirectWithFlash } from "~/lib/flash.server";
import { parseForm } from "~/lib/forms";
import { groupProblem, MAX_WORDS, parseWordList } from "~/lib/search/synonyms";
import { addWordGroup, removeWordGroup, updateWordGroup, wordGroups, wordsPending } from "~/lib/search/words.server";

export const meta: Route.MetaFunction = () => [{ title: "Search words · Benchreel" }];

// After any change, refused ones included (a conflict answers 409), show the list as it is now.
export const shouldRevalidate: ShouldRevalidateFunction = ({ formMethod, defaultShouldRevalidate }) =>
  formMethod && formMethod.toUpperCase() !== "GET" ? true : defaultShouldRevalidate;

const wordsField = z
  .string()
  .trim()
  .min(1, "Type the words or phrases that mean the same, separated by commas.")
  .max(600, "Keep the group under 600 characters.");
const addSchema = z.object({ intent: z.literal("add"), words: wordsField });
const changeSchema = z.object({
  intent: z.literal("change"),
  id: z.string().uuid(),
  loadedAt: z.coerce.number().int().min(0).max(8.64e15),
  words: wordsField,
});
const removeSchema = z.object({ intent: z.literal("remove"), id: z.string().uuid() });

type Failure = { intent: string; errors: Record<string, string>; values: Record<string, string> };

export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "search:words:edit");
  const [groups, status] = await Promise.all([wordGroups(), wordsPending()]);
  return { groups: groups.map((g) => ({ ...g, loadedAt: g.updatedAt.getTime() })), status };
}

export async function action({ request }: Route.ActionArgs) {
  const actor = await requirePermission(request, "search:words:edit");
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const fail = (f: Failure) => data(f, { status: 400 });
  try {
    if (intent === "add") {
      const parsed = parseForm(addSchema, form);
      if (!parsed.ok) return fail({ intent, errors: parsed.errors, values: parsed.values });
      const words = parseWordList(parsed.data.words);
      const problem = groupProblem(words, []);
      if (problem) return fail({ intent, errors: { words: problem }, values: parsed.values });
      await addWordGroup(actor, words);
      return redirectWithFlash("/search/words", { kind: "ok", message: `Added: ${words.join(", ")}.` });
    }
    if (intent === "change") {
      const parsed = parseForm(changeSchema, form);
      if (!parsed.ok) return fail({ intent, errors: parsed.errors, values: parsed.values });
      const words = parseWordList(parsed.data.words);
      const problem = groupProblem(words, []);
      if (problem) return fail({ intent, errors: { words: problem }, values: parsed.values });
      await updateWordGroup(actor, parsed.data.id, words, parsed.data.loadedAt);
      return redirectWithFlash("/search/words", { kind: "ok", message: `Saved: ${words.join(", ")}.` });
    }
    if (intent === "remove") {
      const parsed = parseForm(removeSchema, form);
      if (!parsed.ok) return fail({ intent, errors: { form: "Choose a group to remove." }, values: parsed.values });
      const removed = await removeWordGroup(actor, parsed.data.id);
      return redirectWithFlash(
        "/search/words",
        removed ? { kind: "ok", message: "Group removed." } : { kind: "ok", message: "That group was already gone." },
      );
    }
  } catch (err) {
    return domainFailure(request, err, intent, formValues(form));
  }
  return unknownAction(request, intent);
}

export default function SearchWords({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const failed = actionData as Failure | undefined;
  const addErrors = failed?.intent === "add" ? failed.errors : {};
  const { groups, status } = loaderData;
  return (
    <>
      <PageHeader title="Search words" kicker="Search">
        Words and phrases that mean the same on this floor. Searching for any word of a group also finds the others, in the header box and
        on the <Link to="/search">search page</Link>.
      </PageHeader>
      {status.pending && (
        <p role="status" className="mb-4 rounded-md border border-brass/50 bg-brass-soft px-4 py-3 text-sm">
          {status.lastError
            ? "Saved, not yet in use: the search service is not answering. The words are applied as soon as it is back."
            : "Saved; search starts using the change within a few seconds."}
        </p>
      )}
      {failed && failed.intent !== "add" && failed.intent !== "change" && <FormError message={Object.values(failed.errors)[0]} />}
      <div className="grid gap-6 lg:grid-cols-[1fr_20rem]">
        <aside className="lg:order-2">
          <Form method="post" className="card space-y-4" noValidate>
            <h2 className="text-lg">Add a group</h2>
            <input type="hidden" name="intent" value="add" />
            <FormError message={addErrors.form} />
            <Field
              label="Words that mean the same"
              name="words"
              defaultValue={failed?.intent === "add" ? failed.values.words : ""}
              error={addErrors.words}
              hint="Separate with commas, e.g. tdc, top dead centre"
            />
            <button className="btn btn-primary w-full" type="submit" disabled={busy}>
              Add the group
            </button>
          </Form>
          <p className="mt-3 text-sm text-graphite-soft">
            Each word belongs to one group. Phrases are matched as a whole; letter case does not matter.
          </p>
        </aside>
        <section aria-labelledby="groups-title" className="card p-0 lg:order-1">
          <h2 id="groups-title" className="border-b border-rule px-4 py-3 text-lg">
            {groups.length} {groups.length === 1 ? "group" : "groups"}
          </h2>
          {groups.length === 0 ? (
            <p className="px-4 py-6 text-sm text-graphite-soft">No groups yet. Add the first one beside this list.</p>
          ) : (
            <ul>
              {groups.map((g) => {
                const mine = failed?.intent === "change" && failed.values.id === g.id ? failed : undefined;
                // The list is loaded again after every post: when the group's time is no longer
                // the one the refused save was made against, someone changed it meanwhile, and
                // the form shows it as it is now and carries its new time (saving again replaces it).
                const changedMeanwhile = mine !== undefined && mine.values.loadedAt !== String(g.loadedAt);
                return (
                  <li key={g.id} className="border-b border-rule/70 px-4 py-3 last:border-0" data-testid="word-group">
                    <div className="flex flex-wrap items-start justify-between gap-3">
                      <ul className="flex min-w-0 flex-wrap gap-1.5" aria-label="Words in this group">
                        {g.words.map((w) => (
                          <li key={w} className="rounded border border-rule bg-paper-deep/60 px-2 py-0.5 text-sm">
                            {w}
                          </li>
                        ))}
                      </ul>
                      <Form
                        method="post"
                        onSubmit={(e) => {
                          if (!confirm(`Remove the group “${g.words.join(", ")}”?`)) e.preventDefault();
                        }}
                      >
                        <input type="hidden" name="id" value={g.id} />
                        <button className="btn btn-danger py-1 text-xs" name="intent" value="remove" type="submit" disabled={busy}>
                          Remove<span className="sr-only"> the group {g.words.join(", ")}</span>
                        </button>
                      </Form>
                    </div>
                    <p className="mt-1 text-xs text-graphite-soft">
                      {g.updatedBy
                        ? `Changed by ${g.updatedBy}, ${formatDay(g.updatedAt)}`
                        : g.updatedAt.getTime() === g.createdAt.getTime()
                          ? "Came with Benchreel"
                          : `Changed ${formatDay(g.updatedAt)}`}
                    </p>
                    <details className="mt-2" open={Boolean(mine)}>
                      <summary className="cursor-pointer text-sm text-teal">Change these words</summary>
                      <Form method="post" className="mt-2 space-y-2" noValidate>
                        <input type="hidden" name="intent" value="change" />
                        <input type="hidden" name="id" value={g.id} />
                        <input type="hidden" name="loadedAt" value={g.loadedAt} />
                        {changedMeanwhile && (
                          <p className="text-sm">
                            Now reads: <strong>{g.words.join(", ")}</strong>
                          </p>
                        )}
                        <FormError message={mine?.errors.form} />
                        <Field
                          label="Words that mean the same"
                          id={`words-${g.id}`}
                          name="words"
                          defaultValue={mine ? mine.values.words : g.words.join(", ")}
                          error={mine?.errors.words}
                          hint={`Separate with commas; ${MAX_WORDS} at most.`}
                        />
                        <button className="btn py-1 text-sm" type="submit" disabled={busy}>
                          Save the group
                        </button>
                      </Form>
                    </details>
                  </li>
                );
              })}
            </ul>
          )}
        </section>
      </div>
    </>
  );
}
