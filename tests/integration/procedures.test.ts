// The procedure workflow through its routes, with each role: create, autosave, conflict,
// submit / return / publish with mails, watch, restore, rename redirect, sanitizing on save.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import {
  marks,
  procedureConflictCopies,
  procedureLinks,
  procedureRevisionReturns,
  procedureRevisions,
  procedures,
  procedureSpecs,
  recordings,
} from "~/db/schema";
import { createProcedure } from "~/lib/procedures/drafts.server";
import { publishRevision, submitRevision } from "~/lib/procedures/transitions.server";
import { db } from "~/lib/db.server";
import { createUser, http, mailTo, type TestUser } from "../support/app";

const tag = randomUUID().slice(0, 6);
let builder: TestUser, editor: TestUser, apprentice: TestUser, qc: TestUser, watcher: TestUser;
let slug = "";
let revisionId = "";
let otherId = "";

const linkNode = () => ({
  type: "paragraph",
  content: [
    { type: "text", text: "Hone first: " },
    { type: "procedureLink", attrs: { procedureId: otherId } },
  ],
});
const doc = (extra: unknown[] = []) => ({
  type: "doc",
  content: [
    { type: "heading", attrs: { level: 2 }, content: [{ type: "text", text: "Steps" }] },
    { type: "paragraph", content: [{ type: "text", text: "Torque the studs in three passes." }] },
    {
      type: "spec",
      attrs: { id: "s_torque", label: "Final torque", quantity: "torque", unit: "N.m", nominal: 110, min: 105, max: 115, note: "moly" },
    },
    {
      type: "calculator",
      attrs: {
        kind: "preload",
        title: "",
        preset: { thread: "M12x1.5", torque: { value: 110, unit: "N.m" }, method: { kind: "nut-factor", k: 0.15 } },
      },
    },
    ...extra,
  ],
});

async function json(res: Response) {
  // biome-ignore lint/suspicious/noExplicitAny: the answers of several routes, read member by member
  return (await res.json()) as Record<string, any>;
}

async function save(user: TestUser, id: string, baseVersion: number, body: unknown, title = `Head stud torque ${tag}`) {
  return http(`/api/procedures/revisions/${id}`, {
    cookie: user.cookie,
    json: { baseVersion, title, summary: "Three passes.", area: "fasteners", tags: ["torque", tag], doc: body },
  });
}

beforeAll(async () => {
  [builder, editor, apprentice, qc, watcher] = await Promise.all([
    createUser("builder"),
    createUser("editor"),
    createUser("apprentice"),
    createUser("qc"),
    createUser("apprentice"),
  ]);
  // A second procedure to link to.
  const r = await http("/procedures/new", {
    cookie: editor.cookie,
    form: { title: `Torque plate honing ${tag}`, area: "block", summary: "", tags: "" },
  });
  expect(r.status).toBe(302);
  const [p] = await db()
    .select()
    .from(procedures)
    .where(eq(procedures.title, `Torque plate honing ${tag}`));
  otherId = p.id;
});

describe("procedures workflow", () => {
  it("refuses drafting to an apprentice and QC, and validates the new-procedure form", async () => {
    expect((await http("/procedures/new", { cookie: apprentice.cookie, form: { title: "Nope nope", area: "block" } })).status).toBe(403);
    expect((await http("/procedures/new", { cookie: qc.cookie, form: { title: "Nope nope", area: "block" } })).status).toBe(403);
    const bad = await http("/procedures/new", { cookie: builder.cookie, form: { title: "x", area: "attic" } });
    expect(bad.status).toBe(400);
    const text = await bad.text();
    expect(text).toContain("at least 4 characters");
  });

  it("lets a builder create a draft and autosave it, extracting specs and links", async () => {
    const r = await http("/procedures/new", {
      cookie: builder.cookie,
      form: { title: `Head stud torque ${tag}`, area: "fasteners", summary: "Three passes.", tags: "torque" },
    });
    expect(r.status).toBe(302);
    const loc = r.headers.get("location")!;
    expect(loc).toMatch(/\/procedures\/head-stud-torque-[a-z0-9-]+\/r\/1\/edit$/);
    slug = loc.split("/")[2];
    const [p] = await db().select().from(procedures).where(eq(procedures.slug, slug));
    const [rev] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.procedureId, p.id));
    revisionId = rev.id;
    const s = await save(builder, revisionId, rev.version, doc([linkNode()]));
    expect(s.status).toBe(200);
    const body = await json(s);
    expect(body.version).toBe(rev.version + 1);
    const specs = await db().select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, revisionId));
    expect(specs).toHaveLength(1);
    expect(specs[0]).toMatchObject({ label: "Final torque", unit: "N.m", nominal: 110, min: 105, max: 115, siUnit: "N.m", minSi: 105 });
    const links = await db().select().from(procedureLinks).where(eq(procedureLinks.revisionId, revisionId));
    expect(links.map((l) => l.toProcedureId)).toEqual([otherId]);
    // The spec row keeps its id across saves (test records will point at it).
    const again = await save(builder, revisionId, body.version, doc([linkNode()]));
    expect(again.status).toBe(200);
    const specs2 = await db().select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, revisionId));
    expect(specs2[0].id).toBe(specs[0].id);
  });

  it("refuses a stale save with a conflict and keeps the loser's text", async () => {
    const [rev] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId));
    const mine = await save(
      builder,
      revisionId,
      rev.version,
      doc([{ type: "paragraph", content: [{ type: "text", text: "Builder's newer words." }] }]),
    );
    expect(mine.status).toBe(200);
    const theirs = await save(
      editor,
      revisionId,
      rev.version,
      doc([{ type: "paragraph", content: [{ type: "text", text: "Editor's stale words." }] }]),
    );
    expect(theirs.status).toBe(409);
    const c = await json(theirs);
    expect(c.error).toBe("conflict");
    expect(c.message).toMatch(/saved this draft while you were editing/);
    expect(JSON.stringify(c.current.doc)).toContain("Builder's newer words.");
    const [copy] = await db().select().from(procedureConflictCopies).where(eq(procedureConflictCopies.id, c.copyId));
    expect(JSON.stringify(copy.doc)).toContain("Editor's stale words.");
    const [now] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId));
    expect(JSON.stringify(now.doc)).toContain("Builder's newer words.");
  });

  it("refuses unsafe documents and strips unsafe links on save", async () => {
    const [rev] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId));
    const raw = await save(builder, revisionId, rev.version, {
      type: "doc",
      content: [{ type: "rawHtml", attrs: { html: "<script>alert(1)</script>" } }],
    });
    expect(raw.status).toBe(422);
    expect((await json(raw)).issues[0].message).toMatch(/unknown block type/);
    const js = await save(
      builder,
      revisionId,
      rev.version,
      doc([
        linkNode(),
        {
          type: "paragraph",
          content: [{ type: "text", text: "click", marks: [{ type: "link", attrs: { href: "javascript:alert(1)" } }] }],
        },
      ]),
    );
    expect(js.status).toBe(200);
    expect((await json(js)).warnings[0].message).toMatch(/link removed/);
    const page = await (await http(`/procedures/${slug}/r/1`, { cookie: builder.cookie })).text();
    expect(page).not.toContain("javascript:alert");
  });

  it("keeps drafts from apprentices, and from builders who did not write them", async () => {
    expect((await http(`/procedures/${slug}/r/1`, { cookie: apprentice.cookie })).status).toBe(403);
    const other = await createUser("builder");
    expect((await http(`/procedures/${slug}/r/1`, { cookie: other.cookie })).status).toBe(403);
    const [rev] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId));
    expect((await save(other, revisionId, rev.version, doc())).status).toBe(403);
  });

  it("needs a change note to submit; submitting e-mails the editors", async () => {
    const none = await http(`/procedures/${slug}/r/1`, { cookie: builder.cookie, form: { intent: "submit", changeNote: "" } });
    expect(none.status).toBe(409);
    expect(await none.text()).toContain("Write a change note");
    const ok = await http(`/procedures/${slug}/r/1`, {
      cookie: builder.cookie,
      form: { intent: "submit", changeNote: "First version of the stud procedure" },
    });
    expect(ok.status).toBe(302);
    const mail = await mailTo(editor.email, `Review requested: Head stud torque ${tag}`);
    expect(mail.text).toContain("First version of the stud procedure");
    expect(mail.text).toContain(`/procedures/${slug}/compare?to=1`);
    // In review: no more autosaves.
    const [rev] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId));
    expect(rev.state).toBe("in_review");
    const late = await save(builder, revisionId, rev.version, doc());
    expect(late.status).toBe(409);
    expect((await json(late)).reason).toMatch(/in review/);
  });

  it("lets neither a builder nor an apprentice publish; the editor returns with a reason", async () => {
    expect((await http(`/procedures/${slug}/r/1`, { cookie: builder.cookie, form: { intent: "publish" } })).status).toBe(403);
    expect((await http(`/procedures/${slug}/r/1`, { cookie: apprentice.cookie, form: { intent: "publish" } })).status).toBe(403);
    const noReason = await http(`/procedures/${slug}/r/1`, { cookie: editor.cookie, form: { intent: "return", reason: "" } });
    expect(noReason.status).toBe(409);
    const ret = await http(`/procedures/${slug}/r/1`, {
      cookie: editor.cookie,
      form: { intent: "return", reason: "Add the washer lube to the spec note" },
    });
    expect(ret.status).toBe(302);
    const mail = await mailTo(builder.email, "Returned to draft");
    expect(mail.text).toContain("Add the washer lube to the spec note");
    const [rev] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId));
    expect(rev.state).toBe("draft");
    const returns = await db().select().from(procedureRevisionReturns).where(eq(procedureRevisionReturns.revisionId, revisionId));
    expect(returns.map((r) => [r.returnedBy, r.reason])).toEqual([[editor.id, "Add the washer lube to the spec note"]]);
  });

  it("publishes after resubmission and e-mails the author and watchers", async () => {
    // The apprentice watches the (not yet published) procedure via the read page action once published; the watcher row can exist before.
    const [p] = await db().select().from(procedures).where(eq(procedures.slug, slug));
    const { procedureWatchers } = await import("~/db/schema");
    await db().insert(procedureWatchers).values({ procedureId: p.id, userId: watcher.id });
    expect(
      (await http(`/procedures/${slug}/r/1`, { cookie: builder.cookie, form: { intent: "submit", changeNote: "Washer lube added" } }))
        .status,
    ).toBe(302);
    const pub = await http(`/procedures/${slug}/r/1`, { cookie: editor.cookie, form: { intent: "publish" } });
    expect(pub.status).toBe(302);
    expect(pub.headers.get("location")).toBe(`/procedures/${slug}`);
    await mailTo(builder.email, `Published: Head stud torque ${tag}`);
    const w = await mailTo(watcher.email, `Published: Head stud torque ${tag}`);
    expect(w.text).toContain("You are watching this procedure.");
    const page = await http(`/procedures/${slug}`, { cookie: apprentice.cookie });
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toContain("Torque the studs in three passes.");
    expect(html).toContain("Final torque");
    expect(html).toContain(`Torque plate honing ${tag}`); // the link shows the current title
    expect(html).toContain("61.11 kN"); // the calculator block's preset result, rendered on the server
  });

  it("lets anyone watch and unwatch from the page", async () => {
    const r = await http(`/procedures/${slug}`, { cookie: apprentice.cookie, form: { intent: "watch" } });
    expect(r.status).toBe(302);
    expect(await (await http(`/procedures/${slug}`, { cookie: apprentice.cookie })).text()).toContain("Watching");
    expect((await http(`/procedures/${slug}`, { cookie: apprentice.cookie, form: { intent: "unwatch" } })).status).toBe(302);
  });

  it("starts a new draft, publishes a rename, and keeps the old URL redirecting; the old revision is superseded", async () => {
    const nd = await http(`/procedures/${slug}`, { cookie: builder.cookie, form: { intent: "new-draft" } });
    expect(nd.status).toBe(302);
    expect(nd.headers.get("location")).toBe(`/procedures/${slug}/r/2/edit`);
    const [p] = await db().select().from(procedures).where(eq(procedures.slug, slug));
    const [r2] = await db()
      .select()
      .from(procedureRevisions)
      .where(eq(procedureRevisions.procedureId, p.id))
      .orderBy(procedureRevisions.number)
      .offset(1);
    const newTitle = `Head stud installation ${tag}`;
    const changed = doc();
    (changed.content[2] as { attrs: Record<string, unknown> }).attrs.max = 118;
    expect((await save(builder, r2.id, r2.version, changed, newTitle)).status).toBe(200);
    expect(
      (await http(`/procedures/${slug}/r/2`, { cookie: builder.cookie, form: { intent: "submit", changeNote: "Rename; widen the max" } }))
        .status,
    ).toBe(302);
    const cmp = await (await http(`/procedures/${slug}/compare?from=1&to=2`, { cookie: editor.cookie })).text();
    expect(cmp).toContain("Changed: max");
    expect((await http(`/procedures/${slug}/r/2`, { cookie: editor.cookie, form: { intent: "publish" } })).status).toBe(302);
    const [after] = await db().select().from(procedures).where(eq(procedures.id, p.id));
    expect(after.slug).not.toBe(slug);
    const old = await http(`/procedures/${slug}/history`, { cookie: apprentice.cookie });
    expect(old.status).toBe(301);
    expect(old.headers.get("location")).toBe(`/procedures/${after.slug}/history`);
    const [r1] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, revisionId));
    expect(r1.state).toBe("superseded");
    slug = after.slug;
  });

  it("restores an old revision as a new draft, and refuses a second open draft", async () => {
    const r = await http(`/procedures/${slug}/r/1`, { cookie: builder.cookie, form: { intent: "restore" } });
    expect(r.status).toBe(302);
    expect(r.headers.get("location")).toBe(`/procedures/${slug}/r/3/edit`);
    const again = await http(`/procedures/${slug}/r/2`, { cookie: builder.cookie, form: { intent: "restore" } });
    expect(again.status).toBe(409);
    expect(await again.text()).toContain("Revision 3 is already open");
    const hist = await (await http(`/procedures/${slug}/history`, { cookie: builder.cookie })).text();
    expect(hist).toContain("Superseded");
    expect(hist).toContain("Published");
    expect(hist).toContain("Rename; widen the max");
  });

  it("shows the review queue on the shop floor to editors only", async () => {
    expect(
      (
        await http(`/procedures/${slug}/r/3`, {
          cookie: builder.cookie,
          form: { intent: "submit", changeNote: "Back to the first wording" },
        })
      ).status,
    ).toBe(302);
    const floor = await (await http("/", { cookie: editor.cookie })).text();
    expect(floor).toContain("Awaiting review");
    expect(floor).toContain(`Head stud torque ${tag}`); // revision 3 restored revision 1, title included
    const floorApprentice = await (await http("/", { cookie: apprentice.cookie })).text();
    expect(floorApprentice).not.toContain("Awaiting review");
  });
});

describe("incomplete blocks in a draft (issue 14)", () => {
  let draftSlug = "";
  let draftId = "";
  const unfinished = {
    type: "doc",
    content: [
      { type: "paragraph", content: [{ type: "text", text: "Words typed before the blocks." }] },
      { type: "spec", attrs: { id: "s_half", label: "", quantity: "torque", unit: "N.m", nominal: null, min: null, max: null, note: "" } },
      { type: "videoMoment", attrs: { recordingId: null, start: 0, end: null, caption: "Washer seating" } },
    ],
  };

  beforeAll(async () => {
    const r = await http("/procedures/new", {
      cookie: builder.cookie,
      form: { title: `Half-written studs ${tag}`, area: "fasteners", summary: "", tags: "" },
    });
    expect(r.status).toBe(302);
    draftSlug = r.headers.get("location")!.split("/")[2];
    const [p] = await db().select().from(procedures).where(eq(procedures.slug, draftSlug));
    [{ id: draftId }] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.procedureId, p.id));
  });

  it("saves a draft whose Spec has no label and whose Video moment has no recording, and says in plain words what each lacks", async () => {
    const [rev] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, draftId));
    const res = await save(builder, draftId, rev.version, unfinished, `Half-written studs ${tag}`);
    expect(res.status).toBe(200);
    const body = await json(res);
    expect(body.incomplete).toEqual([
      {
        path: [1],
        type: "spec",
        name: "Spec 1",
        problems: [
          { field: "label", message: "Give the spec a label" },
          { field: "nominal", message: "Give a nominal value or a limit" },
        ],
      },
      {
        path: [2],
        type: "videoMoment",
        name: "Video moment 1: Washer seating",
        problems: [{ field: "recording", message: "Choose a recording" }],
      },
    ]);
    expect(JSON.stringify(body)).not.toMatch(/doc\.content|attrs\./);
    const [now] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, draftId));
    expect(JSON.stringify(now.doc)).toContain("Words typed before the blocks.");
    expect(now.doc).toMatchObject({
      content: [{}, { attrs: { label: "", nominal: null } }, { attrs: { recordingId: null, caption: "Washer seating" } }],
    });
    // Half a spec is no row for test records or search to use.
    expect(await db().select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, draftId))).toHaveLength(0);
    // The preview of the draft still opens.
    expect((await http(`/procedures/${draftSlug}/r/1`, { cookie: builder.cookie })).status).toBe(200);
  });

  it("refuses to submit it for review with the list of what is missing by block, then accepts it once complete", async () => {
    const refused = await http(`/procedures/${draftSlug}/r/1`, {
      cookie: builder.cookie,
      form: { intent: "submit", changeNote: "First version" },
    });
    expect(refused.status).toBe(422);
    const text = await refused.text();
    expect(text).toContain(
      "Not ready for review. Finish these 2 blocks first: Spec 1: Give the spec a label; Give a nominal value or a limit. Video moment 1: Washer seating: Choose a recording.",
    );
    const [still] = await db().select().from(procedureRevisions).where(eq(procedureRevisions.id, draftId));
    expect(still.state).toBe("draft");
    const done = structuredClone(unfinished);
    Object.assign(done.content[1].attrs!, { label: "Final torque", nominal: 110 });
    Object.assign(done.content[2].attrs!, { recordingId: randomUUID(), start: 12 });
    const saved = await save(builder, draftId, still.version, done, `Half-written studs ${tag}`);
    expect(saved.status).toBe(200);
    expect((await json(saved)).incomplete).toEqual([]);
    expect(await db().select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, draftId))).toHaveLength(1);
    expect(
      (await http(`/procedures/${draftSlug}/r/1`, { cookie: builder.cookie, form: { intent: "submit", changeNote: "First version" } }))
        .status,
    ).toBe(302);
  });

  it("the video-moment picker's recording list reads its search through the edge", async () => {
    expect((await http("/api/procedures/recordings")).status).toBe(401);
    const ok = await http("/api/procedures/recordings?q=head", { cookie: builder.cookie });
    expect(ok.status).toBe(200);
    expect(await json(ok)).toMatchObject({ available: true, results: expect.any(Array) });
    const long = await http(`/api/procedures/recordings?q=${"x".repeat(101)}`, { cookie: builder.cookie });
    expect(long.status).toBe(422);
  });
});

describe("the read page's database work (issue 15 §2)", () => {
  it("renders a published procedure with specs, links, a video moment, marks and a procedure linking to it in at most 6 queries, the session's included", async () => {
    const [author, reviewer, reader] = await Promise.all([createUser("builder"), createUser("editor"), createUser("apprentice")]);
    const [rec] = await db()
      .insert(recordings)
      .values({
        title: `Counted recording ${tag}`,
        originalName: "q.mp4",
        originalSize: 1,
        state: "ready",
        durationS: 60,
        uploadedBy: author.id,
      })
      .returning();
    const publish = async (title: string, content: unknown[]) => {
      const c = await createProcedure(author, { title, area: "fasteners", summary: "", tags: [tag], doc: { type: "doc", content } });
      await submitRevision(author, c.revision.id, "First version");
      await publishRevision(reviewer, c.revision.id);
      return c.procedure;
    };
    const linkTo = (id: string) => ({
      type: "paragraph",
      content: [
        { type: "text", text: "See: " },
        { type: "procedureLink", attrs: { procedureId: id } },
      ],
    });
    const target = await publish(`Hone the bores first ${tag}`, [
      { type: "paragraph", content: [{ type: "text", text: "Hone with the plate on." }] },
    ]);
    const counted = await publish(`Counted read page ${tag}`, [
      ...doc().content,
      {
        type: "spec",
        attrs: { id: "s_stretch", label: "Stud stretch", quantity: "length", unit: "mm", nominal: null, min: 0.15, max: 0.2, note: "" },
      },
      linkTo(target.id),
      { type: "videoMoment", attrs: { recordingId: rec.id, start: 12, end: null, caption: "Washer seating" } },
    ]);
    await publish(`Links to the counted page ${tag}`, [linkTo(counted.id)]);
    await db()
      .insert(marks)
      .values({ recordingId: rec.id, tStart: 5, text: `Points at the counted page ${tag}`, procedureId: counted.id, createdBy: author.id });

    const res = await http(`/procedures/${counted.slug}`, { cookie: reader.cookie });
    expect(res.status).toBe(200);
    const html = await res.text();
    // Everything the page shows came out of those queries.
    for (const shown of [
      "Final torque",
      "Stud stretch",
      `Hone the bores first ${tag}`,
      `Counted recording ${tag}`,
      `Links to the counted page ${tag}`,
      `Points at the counted page ${tag}`,
    ])
      expect(html).toContain(shown);
    const queries = /db;desc="(\d+) quer/.exec(res.headers.get("server-timing") ?? "");
    expect(queries, "Server-Timing names the request's queries").not.toBeNull();
    expect(Number(queries![1])).toBeGreaterThan(0);
    expect(Number(queries![1])).toBeLessThanOrEqual(6);
  });

  it("sends a procedure's body once: in the page and not again in the data the page embeds; a client-side navigation's data carries it", async () => {
    const [author, reviewer, reader] = await Promise.all([createUser("builder"), createUser("editor"), createUser("apprentice")]);
    const sentence = `Chase every thread before the plate goes on ${tag}`;
    const c = await createProcedure(author, {
      title: `Body sent once ${tag}`,
      area: "block",
      summary: "",
      tags: [tag],
      doc: { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: sentence }] }] },
    });
    await submitRevision(author, c.revision.id, "First version");
    await publishRevision(reviewer, c.revision.id);

    const page = await http(`/procedures/${c.procedure.slug}`, { cookie: reader.cookie });
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html.split(sentence).length - 1, "the body's text appears once in the page").toBe(1);
    expect(html).toMatch(new RegExp(`data-testid="procedure-body"[^>]*>[^]*${sentence}`));

    // What React Router's client fetches when a person follows a link to the page.
    const nav = await http(`/procedures/${c.procedure.slug}.data`, { cookie: reader.cookie });
    expect(nav.status).toBe(200);
    expect(await nav.text()).toContain(sentence);
  });
});
