import { z } from "zod";
import { Form, Link } from "react-router";
import type { Route } from "./+types/compare";
import "~/components/procedures/procedures.css";
import { PageHeader } from "~/components/page";
import { BeforeAfter, CompareBlocks, Del, Ins } from "~/components/procedures/CompareBlocks";
import { StateBadge } from "~/components/procedures/RevisionView";
import { requirePermission } from "~/lib/auth.server";
import { optionalSearch, positiveIntParam, searchObject } from "~/lib/edge";
import { parseParams } from "~/lib/edge.server";
import { AREA_LABELS } from "~/lib/procedures/areas";
import type { JSONNode } from "~/lib/procedures/document";
import { diffBlocks, diffSpecs, summarize, type SpecField, type SpecRow } from "~/lib/procedures/diff";
import { readerBlocks, specLimitsText } from "~/lib/procedures/reader-blocks";
import { canSeeRevision, procedureOr404, revisionOr404 } from "~/lib/procedures/routes.server";
import { available, STATE_LABELS } from "~/lib/procedures/state";
import { docTitles, type Revision } from "~/lib/procedures/lookup.server";
import { history, specsOf } from "~/lib/procedures/pages.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Compare: ${data?.title ?? ""} · Benchreel` }];

const compareSearch = z.object({ from: optionalSearch(positiveIntParam), to: optionalSearch(positiveIntParam) });

/** The two revisions' documents as a reader sees them, with procedure and recording titles resolved. */
async function readerPair(from: Revision, to: Revision) {
  const { procedures, recordings } = await docTitles(from.doc as JSONNode, to.doc as JSONNode);
  const ctx = { titleOf: (id: string) => procedures.get(id)?.title, recordingOf: (id: string) => recordings.get(id) };
  return diffBlocks(readerBlocks(from.doc as JSONNode, ctx), readerBlocks(to.doc as JSONNode, ctx));
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const procedure = await procedureOr404(request, params.slug);
  // A revision number that cannot exist (not a whole number, past PostgreSQL's integer) names
  // no revision: 404, as for the revision's own address.
  const asked = parseParams(request, compareSearch, searchObject(request.url), "revision");
  const revs = (await history(procedure.id)).filter((r) => canSeeRevision(user, r));
  const published = revs.find((r) => r.state === "published");
  const toN = asked.to ?? revs[0]?.number;
  const to = await revisionOr404(request, user, procedure, String(toN));
  // A revision is never compared with itself: by default the published one, else the one before.
  const fromDefault = published && published.number !== to.number ? published.number : revs.find((r) => r.number < to.number)?.number;
  const fromN = asked.from && asked.from !== to.number ? asked.from : fromDefault;
  const actions = available({ state: to.state, authorId: to.authorId }, user);
  const base = {
    slug: procedure.slug,
    title: procedure.title,
    revisions: revs.map((r) => ({ number: r.number, state: r.state })),
    to: { number: to.number, state: to.state, changeNote: to.changeNote },
    canPublish: actions.includes("publish"),
    canReturn: actions.includes("return"),
  };
  if (fromN == null) return { ...base, from: null, blocks: [], summary: null, specs: [], meta: [] };
  const from = await revisionOr404(request, user, procedure, String(fromN));
  const [blocks, sa, sb] = await Promise.all([readerPair(from, to), specsOf(from.id), specsOf(to.id)]);
  const specs = diffSpecs(sa as SpecRow[], sb as SpecRow[]).filter((s) => s.kind !== "unchanged");
  const meta: { field: string; before: string; after: string }[] = [];
  if (from.title !== to.title) meta.push({ field: "Title", before: from.title, after: to.title });
  if (from.summary !== to.summary) meta.push({ field: "Summary", before: from.summary, after: to.summary });
  if (from.area !== to.area) meta.push({ field: "Shop area", before: AREA_LABELS[from.area], after: AREA_LABELS[to.area] });
  if (from.tags.join(", ") !== to.tags.join(", ")) meta.push({ field: "Tags", before: from.tags.join(", "), after: to.tags.join(", ") });
  return { ...base, from: { number: from.number, state: from.state }, blocks, summary: summarize(blocks), specs, meta };
}

const FIELD_WORDS: Record<SpecField, string> = {
  label: "label",
  quantity: "quantity",
  unit: "unit",
  nominal: "nominal",
  min: "min",
  max: "max",
  note: "note",
};
const specValue = (s: SpecRow) => `${specLimitsText(s)}${s.note ? ` — ${s.note}` : ""}`;
const revisionOption = (r: { number: number; state: keyof typeof STATE_LABELS }) =>
  `Revision ${r.number} (${STATE_LABELS[r.state].toLowerCase()})`;

export default function Compare({ loaderData }: Route.ComponentProps) {
  const { slug, title, revisions, from, to, blocks, summary, specs, meta, canPublish, canReturn } = loaderData;
  return (
    <>
      <PageHeader
        title={title}
        kicker="Compare revisions"
        actions={
          <Link className="btn no-underline" to={`/procedures/${slug}/history`}>
            History
          </Link>
        }
      >
        {from && revisions.length > 1 && (
          <Form method="get" className="flex flex-wrap items-end gap-2 text-sm">
            <label>
              From{" "}
              <select name="from" defaultValue={from.number} className="field inline-block w-auto py-1">
                {revisions.map((r) => (
                  <option key={r.number} value={r.number}>
                    {revisionOption(r)}
                  </option>
                ))}
              </select>
            </label>
            <label>
              to{" "}
              <select name="to" defaultValue={to.number} className="field inline-block w-auto py-1">
                {revisions.map((r) => (
                  <option key={r.number} value={r.number}>
                    {revisionOption(r)}
                  </option>
                ))}
              </select>
            </label>
            <button className="btn py-1" type="submit">
              Compare
            </button>
          </Form>
        )}
      </PageHeader>

      {from && summary ? (
        <p className="mb-4 flex flex-wrap items-center gap-2 text-sm">
          <span className="num font-semibold">Revision {from.number}</span> <StateBadge state={from.state} />{" "}
          <span aria-hidden="true">→</span>
          <span className="sr-only">to</span> <span className="num font-semibold">Revision {to.number}</span>{" "}
          <StateBadge state={to.state} />
          <span className="num text-graphite-soft">
            · {summary.changed} changed, {summary.added} added, {summary.removed} removed · {specs.length} spec{" "}
            {specs.length === 1 ? "change" : "changes"}
          </span>
        </p>
      ) : (
        <p className="card mb-4 text-sm" data-testid="nothing-to-compare">
          Revision {to.number} is the first revision of this procedure; there is no earlier one to compare it with.{" "}
          <Link to={`/procedures/${slug}/r/${to.number}`}>Read revision {to.number} in full</Link>.
        </p>
      )}
      {to.changeNote && (
        <p className="mb-4 text-sm">
          <span className="font-semibold">Change note:</span> {to.changeNote}
        </p>
      )}

      {(canPublish || canReturn) && (
        <div className="card mb-6 flex flex-wrap items-end gap-4 p-4">
          {canPublish && (
            <Form method="post" action={`/procedures/${slug}/r/${to.number}`}>
              <input type="hidden" name="intent" value="publish" />
              <button className="btn btn-primary" type="submit">
                Publish revision {to.number}
              </button>
            </Form>
          )}
          {canReturn && (
            <Form
              method="post"
              action={`/procedures/${slug}/r/${to.number}`}
              className="flex min-w-[18rem] flex-1 flex-wrap items-end gap-2"
            >
              <input type="hidden" name="intent" value="return" />
              <label className="min-w-[14rem] flex-1">
                <span className="label">Reason for returning</span>
                <input name="reason" className="field" required placeholder="What the author should change" />
              </label>
              <button className="btn" type="submit">
                Return to Draft
              </button>
            </Form>
          )}
        </div>
      )}

      {from && meta.length > 0 && (
        <section className="card mb-6 p-4" aria-labelledby="meta-diff-h">
          <h2 id="meta-diff-h" className="text-lg">
            Page details
          </h2>
          <dl className="mt-2 space-y-1 text-sm">
            {meta.map((m) => (
              <div key={m.field}>
                <dt className="inline font-semibold">{m.field}: </dt>
                <dd className="inline">
                  <BeforeAfter before={m.before} after={m.after} />
                </dd>
              </div>
            ))}
          </dl>
        </section>
      )}

      {from && (
        <section className="card mb-6 overflow-x-auto p-0" aria-labelledby="spec-diff-h">
          <h2 id="spec-diff-h" className="px-4 pt-3 text-lg">
            Spec changes
          </h2>
          {specs.length === 0 ? (
            <p className="px-4 pb-4 pt-1 text-sm text-graphite-soft">No spec changed.</p>
          ) : (
            <table className="mt-2 w-full text-left text-sm" data-testid="spec-diff">
              <thead className="border-y border-rule bg-paper-deep/60 text-xs uppercase tracking-wide text-graphite-soft">
                <tr>
                  <th className="px-4 py-1.5">Change</th>
                  <th className="px-3 py-1.5">Spec</th>
                  <th className="px-3 py-1.5">Before</th>
                  <th className="px-3 py-1.5">After</th>
                </tr>
              </thead>
              <tbody className="num">
                {specs.map((c) => {
                  const before = c.kind === "added" ? undefined : c.before;
                  const after = c.kind === "removed" ? undefined : c.after;
                  return (
                    <tr key={(after ?? before)?.specKey} className="border-b border-rule/60 align-top last:border-0">
                      <td className="px-4 py-1.5 font-semibold">
                        {c.kind === "added"
                          ? "Added"
                          : c.kind === "removed"
                            ? "Removed"
                            : `Changed: ${c.kind === "changed" ? c.fields.map((f) => FIELD_WORDS[f]).join(", ") : ""}`}
                      </td>
                      <td className="px-3 py-1.5">{(after ?? before)?.label}</td>
                      <td className="px-3 py-1.5">{before ? <Del>{specValue(before)}</Del> : "—"}</td>
                      <td className="px-3 py-1.5">{after ? <Ins>{specValue(after)}</Ins> : "—"}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          )}
        </section>
      )}

      {from && (
        <section aria-labelledby="text-diff-h">
          <h2 id="text-diff-h" className="mb-1 text-lg">
            The page, block by block
          </h2>
          <p className="mb-3 text-sm text-graphite-soft">
            As the reader sees revision {to.number}. <Ins>Added words</Ins> are underlined, <Del>removed words</Del> struck through; each
            changed block is labelled in the margin.
          </p>
          <div className="card">
            <CompareBlocks changes={blocks} />
          </div>
        </section>
      )}
    </>
  );
}
