// The read page's rendered-page cache (app/lib/page-cache.server.ts): repeat visits are served
// from it, but never to another person, never after a change, never without a valid session,
// and never while the app is not listening for changes.
import { randomUUID } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import pg from "pg";
import { beforeAll, describe, expect, it } from "vitest";
import { marks, readings, recordings, users } from "~/db/schema";
import { db } from "~/lib/db.server";
import { env } from "~/lib/env.server";
import { createProcedure, saveDraft, startDraftFrom } from "~/lib/procedures/drafts.server";
import { publishRevision, submitRevision } from "~/lib/procedures/transitions.server";
import { createUser, http, waitFor, type TestUser } from "../support/app";

const tag = randomUUID().slice(0, 6);
let author: TestUser, editor: TestUser, reader: TestUser, other: TestUser;
let path = "";
let publishedId = "";

const page = async (user: TestUser, headers: Record<string, string> = {}) => {
  const res = await http(path, { cookie: user.cookie, headers });
  // React separates adjacent text parts with <!-- --> in server HTML; the tests read the text.
  return { status: res.status, cache: res.headers.get("x-page-cache"), html: (await res.text()).replaceAll("<!-- -->", ""), location: res.headers.get("location") };
};

/** Visits until a visit is served from the cache (the first ones render; the listener may still be connecting). */
const cachedVisit = (user: TestUser) => waitFor(async () => { const p = await page(user); return p.cache === "hit" ? p : null; }, 10_000, 50);

const listenerPid = async () => {
  const r = await db().execute<{ pid: number }>(sql`select pid from pg_stat_activity where application_name = 'benchreel-listener'`);
  return r.rows.map((x) => x.pid);
};

/** What the content channel says while `fn` runs (and for `settleMs` after). */
async function notificationsDuring(fn: () => Promise<unknown>, settleMs = 300): Promise<string[]> {
  const c = new pg.Client({ connectionString: env().DATABASE_URL });
  await c.connect();
  const heard: string[] = [];
  c.on("notification", (n) => heard.push(n.payload ?? ""));
  await c.query("LISTEN benchreel_content");
  try {
    await fn();
    await new Promise((r) => setTimeout(r, settleMs));
  } finally {
    await c.end();
  }
  return heard;
}

beforeAll(async () => {
  [author, editor, reader, other] = await Promise.all([
    createUser("builder", { name: `Author ${tag}` }),
    createUser("editor"),
    createUser("apprentice", { name: `Reader ${tag}` }),
    createUser("apprentice", { name: `Other ${tag}` }),
  ]);
  const created = await createProcedure(author, {
    title: `Cached page ${tag}`,
    area: "assembly",
    summary: "A page for the cache tests.",
    tags: [tag],
    doc: { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: `Body text ${tag}.` }] }] },
  });
  await submitRevision(author, created.revision.id, "First version");
  await publishRevision(editor, created.revision.id);
  path = `/procedures/${created.procedure.slug}`;
  publishedId = created.revision.id;
});

describe("read-page cache", () => {
  it("serves a person's repeat visit byte for byte (but for its CSP nonce), and another person only their own page", async () => {
    const first = await page(reader);
    expect(first.status).toBe(200);
    const hit = await cachedVisit(reader);
    // Byte for byte but for the CSP nonce, which every response has its own of (app/lib/csp.server.ts).
    const fresh = await page(reader, { "cache-control": "no-cache" });
    const nonceOf = (html: string) => html.match(/nonce="([^"]+)"/)![1];
    expect(nonceOf(hit.html)).not.toBe(nonceOf(fresh.html));
    expect(hit.html.replaceAll(nonceOf(hit.html), "NONCE")).toBe(fresh.html.replaceAll(nonceOf(fresh.html), "NONCE"));
    expect(hit.html).toContain(`Reader ${tag}`);

    const theirs = await page(other);
    expect(theirs.cache).not.toBe("hit");
    expect(theirs.html).toContain(`Other ${tag}`);
    expect(theirs.html).not.toContain(`Reader ${tag}`);
  });

  it("renders anew on a hard reload (Cache-Control: no-cache)", async () => {
    await cachedVisit(reader);
    expect((await page(reader, { "cache-control": "no-cache" })).cache).not.toBe("hit");
  });

  it("shows a change written by another connection on the next visits, not the stored page", async () => {
    await cachedVisit(reader);
    const renamed = `Author renamed ${tag}`;
    await db().update(users).set({ name: renamed }).where(eq(users.id, author.id));
    // The change's notification reaches the app within milliseconds; no visit after that is stale.
    const fresh = await waitFor(async () => { const p = await page(reader); return p.html.includes(renamed) ? p : null; }, 3_000, 20);
    expect(fresh.cache).not.toBe("hit");
    expect((await page(reader)).html).toContain(renamed);
  });

  it("shows a person's own change on their very next page, without waiting", async () => {
    await cachedVisit(reader);
    expect((await page(reader)).html).toContain("Watch for new revisions");
    const res = await http(path, { cookie: reader.cookie, form: { intent: "watch" } });
    expect(res.status).toBe(302);
    const next = await page(reader); // no flash cookie sent: this is the plain page
    expect(next.html).toContain("Watching — stop");
    expect(next.cache).not.toBe("hit");
  });

  it("never answers a request that carries a flash message from the cache", async () => {
    await cachedVisit(reader);
    const res = await http(path, { cookie: reader.cookie, form: { intent: "unwatch" } });
    const flash = res.headers.getSetCookie().find((c) => c.startsWith("br_flash="))!.split(";")[0];
    const withFlash = await http(path, { cookie: `${reader.cookie}; ${flash}` });
    expect(withFlash.headers.get("x-page-cache")).not.toBe("hit");
    expect(await withFlash.text()).toContain("You no longer watch this procedure.");
  });

  it("gives nothing from the cache to a signed-out session", async () => {
    const leaving = await createUser("apprentice");
    await cachedVisit(leaving);
    expect((await http("/signout", { method: "POST", form: {}, cookie: leaving.cookie })).status).toBe(302);
    const after = await page(leaving);
    expect(after.status).toBe(302);
    expect(after.location).toContain("/signin");
  });

  it("keeps its pages through a draft's autosaves (no cached page shows a draft's text), and drops them when the draft is submitted", async () => {
    const draft = await startDraftFrom(author, publishedId); // a new open revision: the read page says so
    const seen = await cachedVisit(editor);
    expect(seen.html).toContain(`Revision ${draft.number} is draft`);
    let saved: Awaited<ReturnType<typeof saveDraft>> | undefined;
    const heard = await notificationsDuring(async () => {
      saved = await saveDraft(author, draft.id, {
      baseVersion: draft.version,
      title: `Cached page ${tag}`,
      summary: "Autosaved.",
      area: "assembly",
      tags: [tag],
        doc: { type: "doc", content: [{ type: "spec", attrs: { id: "s1", label: "Gap", quantity: "length", unit: "mm", nominal: null, min: 0.1, max: 0.2, note: "" } }] },
      });
    });
    expect(saved?.ok).toBe(true);
    // Other suites' leftovers (the worker finishing a recording) may notify meanwhile; the draft's tables must not.
    expect(heard.filter((t) => t.startsWith("procedure_"))).toEqual([]);
    expect((await page(editor)).cache).toBe("hit");
    await submitRevision(author, draft.id, "Gap spec added");
    const after = await waitFor(async () => { const p = await page(editor); return p.html.includes("in review") ? p : null; }, 3_000, 20);
    expect(after.cache).not.toBe("hit");
  });

  it("keeps a page and its client-navigation data apart (React Router strips .data before middleware)", async () => {
    await cachedVisit(reader);
    const data = await http(`${path}.data`, { cookie: reader.cookie });
    expect(data.status).toBe(200);
    expect(data.headers.get("content-type")).not.toContain("text/html");
    expect(await data.text()).not.toContain("<!DOCTYPE html>");
    const again = await http(`${path}.data`, { cookie: reader.cookie });
    expect(again.headers.get("content-type")).toBe(data.headers.get("content-type"));
    const doc = await http(path, { cookie: reader.cookie });
    expect(doc.headers.get("content-type")).toContain("text/html");
    expect(await doc.text()).toContain("<!DOCTYPE html>");
  });

  it("is not emptied by a recording's processing updates, only by a new title", async () => {
    const [rec] = await db().insert(recordings).values({ title: `Cache rec ${tag}`, originalName: "c.mp4", originalSize: 1, state: "processing", uploadedBy: author.id }).returning();
    const quiet = await notificationsDuring(() => db().update(recordings).set({ state: "ready", durationS: 12 }).where(eq(recordings.id, rec.id)));
    expect(quiet).not.toContain("recordings");
    const renamed = await notificationsDuring(() => db().update(recordings).set({ title: `Cache rec renamed ${tag}` }).where(eq(recordings.id, rec.id)));
    expect(renamed).toContain("recordings");
  });

  it("is emptied by marks that point at a procedure, not by other marks or readings", async () => {
    const [rec] = await db().insert(recordings).values({ title: `Marks rec ${tag}`, originalName: "m.mp4", originalSize: 1, state: "ready", uploadedBy: author.id }).returning();
    const procedureId = (await db().execute<{ id: string }>(sql`select id from procedures where slug = ${path.split("/").pop()}`)).rows[0].id;
    const quiet = await notificationsDuring(async () => {
      await db().insert(marks).values({ recordingId: rec.id, tStart: 3, text: "Plain mark", createdBy: author.id });
      await db().insert(readings).values({ recordingId: rec.id, quantity: "torque", valueSi: 110, valueEntered: 110, unitEntered: "N.m", t: 3, createdBy: author.id });
    });
    expect(quiet.filter((t) => t === "marks" || t === "readings")).toEqual([]);
    const linked = await notificationsDuring(() => db().insert(marks).values({ recordingId: rec.id, tStart: 9, text: "Points at the page", procedureId, createdBy: author.id }));
    expect(linked).toContain("marks");
    const seen = await waitFor(async () => { const p = await page(reader); return p.html.includes("Points at the page") ? p : null; }, 3_000, 20);
    expect(seen.cache).not.toBe("hit");
  });

  it("serves nothing from the cache while the listening connection is down, and resumes when it is back", async () => {
    await cachedVisit(reader);
    const [pid] = await listenerPid();
    expect(pid, "the app keeps a LISTEN connection named benchreel-listener").toBeTruthy();
    await db().execute(sql`select pg_terminate_backend(${pid})`);
    await waitFor(async () => !(await listenerPid()).includes(pid), 3_000, 20);
    const renamed = `Author while deaf ${tag}`;
    await db().update(users).set({ name: renamed }).where(eq(users.id, author.id)); // its notification goes nowhere
    const visit = await page(reader);
    expect(visit.cache).not.toBe("hit");
    expect(visit.html).toContain(renamed);
    // The app reconnects on its own and caches again.
    await waitFor(async () => (await listenerPid()).length > 0, 10_000, 50);
    const again = await cachedVisit(reader);
    expect(again.html).toContain(renamed);
  });
});
