// Review that says who and what (issue 14 §5): the history and the page name the editor who
// published and the one who returned a revision, with the reason; a returned draft waits on its
// author's Shop floor (and nobody else's); a procedure never published offers no comparison.
import { randomUUID } from "node:crypto";
import { readFileSync } from "node:fs";
import { eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditLog, procedureRevisionReturns, procedureRevisions, procedures } from "~/db/schema";
import { db } from "~/lib/db.server";
import { createUser, http, type TestUser } from "../support/app";

const tag = randomUUID().slice(0, 6);
const title = `Main cap bolt torque ${tag}`;
const reason = `Give the washer lube in the spec note ${tag}`;
const reason2 = `Say which thread gets the lube ${tag}`;
let author: TestUser, otherBuilder: TestUser, returner: TestUser, publisher: TestUser;
let slug = "";

/** The words of a page as a reader sees them: tags and React's text separators gone, spaces collapsed. */
async function words(path: string, user: TestUser): Promise<string> {
  const res = await http(path, { cookie: user.cookie });
  expect(res.status, path).toBe(200);
  const html = await res.text();
  const body = html.slice(html.indexOf("<body"));
  return body
    .replace(/<script[\s\S]*?<\/script>/g, "")
    .replace(/<!-- -->/g, "")
    .replace(/<[^>]+>/g, " ")
    .replace(/&amp;/g, "&")
    .replace(/&#x27;/g, "'")
    .replace(/&quot;/g, '"')
    .replace(/\s+/g, " ");
}

const act = (user: TestUser, n: number, form: Record<string, string>) => http(`/procedures/${slug}/r/${n}`, { cookie: user.cookie, form });

beforeAll(async () => {
  [author, otherBuilder, returner, publisher] = await Promise.all([
    createUser("builder"),
    createUser("builder"),
    createUser("editor"),
    createUser("editor"),
  ]);
  const r = await http("/procedures/new", {
    cookie: author.cookie,
    form: { title, area: "fasteners", summary: "Two passes.", tags: "torque" },
  });
  expect(r.status).toBe(302);
  slug = r.headers.get("location")!.split("/")[2];
  const [p] = await db().select().from(procedures).where(eq(procedures.slug, slug));
  const [rev] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.procedureId, p.id));
  const doc = { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "Torque the main caps in two passes." }] }] };
  const s = await http(`/api/procedures/revisions/${rev.id}`, {
    cookie: author.cookie,
    json: { baseVersion: rev.version, title, summary: "Two passes.", area: "fasteners", tags: ["torque"], doc },
  });
  expect(s.status).toBe(200);
});

describe("review that says who and what", () => {
  it("a never-published procedure offers no comparison, and its compare page says there is nothing to compare", async () => {
    const page = await words(`/procedures/${slug}/r/1`, author);
    expect(page).toContain("History");
    expect(page).not.toContain("Compare with");
    expect(await words(`/procedures/${slug}/compare?to=1`, author)).toContain("there is no earlier one to compare it with");
    // Asking for revision 1 against itself is never a comparison either.
    const self = await words(`/procedures/${slug}/compare?from=1&to=1`, author);
    expect(self).toContain("there is no earlier one to compare it with");
    expect(self).not.toContain("The page, block by block");
  });

  it("a returned draft names the editor and the reason on the page and in the history, and waits on its author's Shop floor only", async () => {
    expect((await act(author, 1, { intent: "submit", changeNote: "First version" })).status).toBe(302);
    expect((await act(returner, 1, { intent: "return", reason })).status).toBe(302);

    const history = await words(`/procedures/${slug}/history`, author);
    expect(history).toMatch(new RegExp(`Returned to Draft by ${returner.name} on [^:]+: ${reason}`));
    const page = await words(`/procedures/${slug}/r/1`, author);
    expect(page).toMatch(new RegExp(`Returned to Draft by ${returner.name} on [^:]+: ${reason}`));
    const editing = await words(`/procedures/${slug}/r/1/edit`, author);
    expect(editing).toMatch(new RegExp(`Returned to Draft by ${returner.name} on [^:]+: ${reason}`));

    const floor = await http("/", { cookie: author.cookie }).then((r) => r.text());
    expect(floor).toContain(`href="/procedures/${slug}/r/1/edit"`);
    const floorWords = await words("/", author);
    expect(floorWords).toContain("Returned to you");
    expect(floorWords).toMatch(new RegExp(`${title} · revision 1 Returned by ${returner.name} on [^:]+: ${reason}`));
    for (const someoneElse of [otherBuilder, returner, publisher]) {
      const other = await words("/", someoneElse);
      expect(other).not.toContain(title);
      expect(other).not.toContain(reason);
    }
  });

  it("a draft returned, submitted again and returned again keeps both returns with their reasons, in order; the Shop floor shows the latest", async () => {
    expect((await act(author, 1, { intent: "submit", changeNote: "Washer lube named" })).status).toBe(302);
    expect(await words("/", author)).not.toContain(reason); // submitted again: no longer waiting on the author
    expect((await act(returner, 1, { intent: "return", reason: reason2 })).status).toBe(302);

    const both = new RegExp(
      `Returned to Draft by ${returner.name} on [^:]+: ${reason} \\(changed and submitted again\\) Returned to Draft by ${returner.name} on [^:]+: ${reason2}`,
    );
    expect(await words(`/procedures/${slug}/history`, author)).toMatch(both);
    expect(await words(`/procedures/${slug}/r/1`, author)).toMatch(both);
    expect(await words(`/procedures/${slug}/r/1/edit`, author)).toMatch(both);
    expect(await words(`/procedures/${slug}/print?rev=1`, author)).toMatch(both);

    const floor = await words("/", author);
    expect(floor).toMatch(new RegExp(`${title} · revision 1 Returned by ${returner.name} on [^:]+: ${reason2}`));
    expect(floor).not.toContain(reason);
  });

  it("a published revision names its publisher on the read page, the printed sheet and in the history; the earlier return stays in the history", async () => {
    expect((await act(author, 1, { intent: "submit", changeNote: "Thread named" })).status).toBe(302);
    expect(await words("/", author)).not.toContain(reason2); // submitted again: no longer waiting on the author
    expect((await act(publisher, 1, { intent: "publish" })).status).toBe(302);

    const read = await words(`/procedures/${slug}`, otherBuilder);
    expect(read).toContain(`Written by ${author.name}`);
    expect(read).toMatch(new RegExp(`Published \\d{1,2} \\w+ \\d{4} by ${publisher.name}`));
    const print = await words(`/procedures/${slug}/print`, otherBuilder);
    expect(print).toMatch(new RegExp(`Revision 1 · Published \\d{1,2} \\w+ \\d{4} by ${publisher.name} · written by ${author.name}`));
    const history = await words(`/procedures/${slug}/history`, otherBuilder);
    expect(history).toMatch(new RegExp(`Published \\d{1,2} \\w+ \\d{4} by ${publisher.name}`));
    expect(history).toMatch(
      new RegExp(`Returned to Draft by ${returner.name} on [^:]+: ${reason} .*Returned to Draft by ${returner.name} on [^:]+: ${reason2}`),
    );
    const [rev] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.title, title));
    expect(rev).toMatchObject({ publishedBy: publisher.id });
    const returns = await db()
      .select()
      .from(procedureRevisionReturns)
      .where(eq(procedureRevisionReturns.revisionId, rev.id))
      .orderBy(procedureRevisionReturns.returnedAt);
    expect(returns.map((r) => [r.returnedBy, r.reason])).toEqual([
      [returner.id, reason],
      [returner.id, reason2],
    ]);
    // The published revision 1 has nothing before it: no comparison offered.
    expect(await words(`/procedures/${slug}/r/1`, otherBuilder)).not.toContain("Compare with");
  });

  it("the migrations fill in the publisher of older revisions, and every return with its reason, from the audit log", async () => {
    const [p] = await db().select().from(procedures).where(eq(procedures.slug, slug));
    const now = Date.now();
    const [old] = await db()
      .insert(procedureRevisions)
      .values({
        procedureId: p.id,
        number: 90,
        state: "superseded",
        title,
        area: "fasteners",
        doc: { type: "doc", content: [] },
        publishedAt: new Date(now),
        supersededAt: new Date(now),
        reviewedBy: returner.id,
      })
      .returning();
    await db()
      .insert(auditLog)
      .values([
        {
          actorId: returner.id,
          action: "return",
          entity: "procedure_revision",
          entityId: old.id,
          detail: { reason: "older" },
          at: new Date(now - 3000),
        },
        {
          actorId: publisher.id,
          action: "return",
          entity: "procedure_revision",
          entityId: old.id,
          detail: { reason: "oldest but one" },
          at: new Date(now - 2000),
        },
        { actorId: publisher.id, action: "publish", entity: "procedure_revision", entityId: old.id, detail: {}, at: new Date(now - 1000) },
      ]);
    const statements = (file: string) =>
      readFileSync(new URL(`../../drizzle/${file}`, import.meta.url), "utf8").split("--> statement-breakpoint");
    // 0020's publisher backfill (its returner columns are gone since 0025).
    const publisherFill = statements("0020_revision_publisher_returner.sql").filter((s) =>
      /^\s*(--[^\n]*\n\s*)*UPDATE "procedure_revisions" (r )?SET "published_by"/.test(s),
    );
    expect(publisherFill.length).toBe(2);
    for (const statement of publisherFill) await db().execute(sql.raw(statement));
    // 0025's move of the returns the audit log holds (the other statements read columns it drops).
    const returnsFill = statements("0025_revision_returns.sql").filter((s) => s.includes('FROM "audit_log"'));
    expect(returnsFill.length).toBe(1);
    await db().execute(sql.raw(returnsFill[0]));
    await db().execute(sql.raw(returnsFill[0])); // a second run adds nothing
    const [after] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, old.id));
    expect(after).toMatchObject({ publishedBy: publisher.id });
    const returns = await db()
      .select()
      .from(procedureRevisionReturns)
      .where(eq(procedureRevisionReturns.revisionId, old.id))
      .orderBy(procedureRevisionReturns.returnedAt);
    expect(returns.map((r) => [r.returnedBy, r.reason, r.returnedAt.getTime()])).toEqual([
      [returner.id, "older", now - 3000],
      [publisher.id, "oldest but one", now - 2000],
    ]);
    const history = await words(`/procedures/${slug}/history`, otherBuilder);
    expect(history).toMatch(
      new RegExp(
        `Revision 90 .*Returned to Draft by ${returner.name} on [^:]+: older .*Returned to Draft by ${publisher.name} on [^:]+: oldest but one`,
      ),
    );
  });
});
