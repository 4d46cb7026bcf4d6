import { Form, Link } from "react-router";
import type { Route } from "./+types/compare";
import "~/components/procedures/procedures.css";
import { PageHeader } from "~/components/page";
import { StateBadge } from "~/components/procedures/RevisionView";
import { specLimitsText } from "~/components/procedures/spec-format";
import { requirePermission } from "~/lib/auth.server";
import { blockTexts, walk, type JSONNode } from "~/lib/procedures/document";
import { diffBlocks, diffSpecs, summarize, type SpecRow } from "~/lib/procedures/diff";
import { canSeeRevision, procedureOr404, revisionOr404 } from "~/lib/procedures/routes.server";
import { available } from "~/lib/procedures/state";
import { history, specsOf, titlesFor } from "~/lib/procedures/workflow.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Compare: ${data?.title ?? ""} · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const procedure = await procedureOr404(request, params.slug);
  const revs = (await history(procedure.id)).filter((r) => canSeeRevision(user, r));
  const u = new URL(request.url);
  const published = revs.find((r) => r.state === "published");
  const toN = Number(u.searchParams.get("to") ?? revs[0]?.number);
  const fromDefault = published && published.number !== toN ? published.number : revs.find((r) => r.number < toN)?.number;
  const fromN = Number(u.searchParams.get("from") ?? fromDefault ?? toN);
  const [from, to] = await Promise.all([revisionOr404(request, user, procedure, String(fromN)), revisionOr404(request, user, procedure, String(toN))]);
  const ids = new Set<string>();
  for (const d of [from.doc, to.doc]) walk(d as JSONNode, (n) => n.type === "procedureLink" && ids.add(String(n.attrs?.procedureId)));
  const titles = await titlesFor([...ids]);
  const titleOf = (id: string) => titles.get(id)?.title;
  const blocks = diffBlocks(blockTexts(from.doc as JSONNode, titleOf), blockTexts(to.doc as JSONNode, titleOf));
  const [sa, sb] = await Promise.all([specsOf(from.id), specsOf(to.id)]);
  const specs = diffSpecs(sa as SpecRow[], sb as SpecRow[]);
  const meta: { field: string; before: string; after: string }[] = [];
  if (from.title !== to.title) meta.push({ field: "Title", before: from.title, after: to.title });
  if (from.summary !== to.summary) meta.push({ field: "Summary", before: from.summary, after: to.summary });
  if (from.area !== to.area) meta.push({ field: "Shop area", before: from.area, after: to.area });
  if (from.tags.join(", ") !== to.tags.join(", ")) meta.push({ field: "Tags", before: from.tags.join(", "), after: to.tags.join(", ") });
  const actions = available({ state: to.state, authorId: to.authorId }, user);
  return {
    slug: procedure.slug,
    title: procedure.title,
    revisions: revs.map((r) => ({ number: r.number, state: r.state })),
    from: { number: from.number, state: from.state },
    to: { number: to.number, state: to.state, changeNote: to.changeNote },
    blocks,
    summary: summarize(blocks),
    specs,
    meta,
    canPublish: actions.includes("publish"),
    canReturn: actions.includes("return"),
  };
}

const v = (x: number | null) => (x == null ? "—" : String(x));

export default function Compare({ loaderData }: Route.ComponentProps) {
  const { slug, title, revisions, from, to, blocks, summary, specs, meta, canPublish, canReturn } = loaderData;
  const specChanges = specs.filter((s) => s.kind !== "unchanged");
  return (
    <>
      <PageHeader title={title} kicker="Compare revisions" actions={<Link className="btn no-underline" to={`/procedures/${slug}/history`}>History</Link>}>
        <Form method="get" className="flex flex-wrap items-end gap-2 text-sm">
          <label>From <select name="from" defaultValue={from.number} className="field inline-block w-auto py-1">{revisions.map((r) => <option key={r.number} value={r.number}>Revision {r.number} ({r.state.replace("_", " ")})</option>)}</select></label>
          <label>to <select name="to" defaultValue={to.number} className="field inline-block w-auto py-1">{revisions.map((r) => <option key={r.number} value={r.number}>Revision {r.number} ({r.state.replace("_", " ")})</option>)}</select></label>
          <button className="btn py-1" type="submit">Compare</button>
        </Form>
      </PageHeader>

      <p className="mb-4 flex flex-wrap items-center gap-2 text-sm">
        <span className="num font-semibold">Revision {from.number}</span> <StateBadge state={from.state} /> → <span className="num font-semibold">Revision {to.number}</span> <StateBadge state={to.state} />
        <span className="text-graphite-soft num">· {summary.changed} changed, {summary.added} added, {summary.removed} removed blocks · {specChanges.length} spec changes</span>
      </p>
      {to.changeNote && <p className="mb-4 text-sm"><span className="font-semibold">Change note:</span> {to.changeNote}</p>}

      {(canPublish || canReturn) && (
        <div className="card mb-6 flex flex-wrap items-end gap-4 p-4">
          {canPublish && (
            <Form method="post" action={`/procedures/${slug}/r/${to.number}`}><input type="hidden" name="intent" value="publish" /><button className="btn btn-primary" type="submit">Publish revision {to.number}</button></Form>
          )}
          {canReturn && (
            <Form method="post" action={`/procedures/${slug}/r/${to.number}`} className="flex min-w-[18rem] flex-1 items-end gap-2">
              <input type="hidden" name="intent" value="return" />
              <label className="flex-1"><span className="label">Reason for returning</span><input name="reason" className="field" required placeholder="What the author should change" /></label>
              <button className="btn" type="submit">Return to Draft</button>
            </Form>
          )}
        </div>
      )}

      {meta.length > 0 && (
        <section className="card mb-6 p-4">
          <h2 className="text-lg">Page details</h2>
          <dl className="mt-2 space-y-1 text-sm">{meta.map((m) => <div key={m.field}><dt className="inline font-semibold">{m.field}: </dt><dd className="inline"><del className="diff-del">{m.before || "(empty)"}</del> <ins className="diff-add">{m.after || "(empty)"}</ins></dd></div>)}</dl>
        </section>
      )}

      <section className="card mb-6 overflow-x-auto p-0" aria-labelledby="spec-diff-h">
        <h2 id="spec-diff-h" className="px-4 pt-3 text-lg">Spec changes</h2>
        {specChanges.length === 0 ? (
          <p className="px-4 pb-4 pt-1 text-sm text-graphite-soft">No spec changed.</p>
        ) : (
          <table className="mt-2 w-full text-left text-sm" data-testid="spec-diff">
            <thead className="border-y border-rule bg-paper-deep/60 text-xs uppercase tracking-wide text-graphite-soft">
              <tr><th className="px-4 py-1.5">Change</th><th className="px-3 py-1.5">Spec</th><th className="px-3 py-1.5">Before</th><th className="px-3 py-1.5">After</th></tr>
            </thead>
            <tbody className="num">
              {specChanges.map((c, i) => {
                const row = (s: SpecRow | undefined) => (s ? `nominal ${v(s.nominal)} · min ${v(s.min)} · max ${v(s.max)} ${specLimitsText.unit(s.unit)}` : "—");
                const before = c.kind === "added" ? undefined : c.before;
                const after = c.kind === "removed" ? undefined : c.after;
                return (
                  <tr key={i} className="border-b border-rule/60 last:border-0">
                    <td className="px-4 py-1.5 font-semibold">{c.kind === "added" ? "Added" : c.kind === "removed" ? "Removed" : `Changed: ${c.kind === "changed" ? c.fields.join(", ") : ""}`}</td>
                    <td className="px-3 py-1.5">{(after ?? before)?.label}</td>
                    <td className="px-3 py-1.5">{before ? <span className={c.kind === "removed" || c.kind === "changed" ? "diff-del" : ""}>{row(before)}</span> : "—"}</td>
                    <td className="px-3 py-1.5">{after ? <span className={c.kind === "added" || c.kind === "changed" ? "diff-add" : ""}>{row(after)}</span> : "—"}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        )}
      </section>

      <section aria-labelledby="text-diff-h">
        <h2 id="text-diff-h" className="mb-2 text-lg">Text, block by block</h2>
        <div className="card space-y-1.5 font-serif leading-relaxed" data-testid="text-diff">
          {blocks.map((b, i) => {
            if (b.op === "same") return <p key={i} className="text-graphite-soft">{b.text}</p>;
            if (b.op === "add") return <p key={i} className="border-l-4 border-ok pl-2"><ins className="diff-add">{b.text}</ins></p>;
            if (b.op === "del") return <p key={i} className="border-l-4 border-spec-red pl-2"><del className="diff-del">{b.text}</del></p>;
            return (
              <p key={i} className="border-l-4 border-brass pl-2">
                {b.pieces.map((p, k) => (p.op === "same" ? <span key={k}>{p.text}</span> : p.op === "add" ? <ins key={k} className="diff-add">{p.text}</ins> : <del key={k} className="diff-del">{p.text}</del>))}
              </p>
            );
          })}
        </div>
      </section>
    </>
  );
}
