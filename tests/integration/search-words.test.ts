// The shop's search words (/search/words): editors keep groups of words that mean the same;
// the worker applies them as the search service's synonyms, also after an outage.
import { randomUUID } from "node:crypto";
import { eq, isNull, sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { auditLog, marks, recordings, searchOutbox, searchWordGroups } from "~/db/schema";
import { db } from "~/lib/db.server";
import { createUser, http, waitFor } from "../support/app";

const word = () =>
  `zw${randomUUID()
    .replace(/[-0-9]/g, "")
    .slice(0, 10)}`; // letters only, no other test's word

async function indexed() {
  await waitFor(async () => {
    const [r] = await db().select({ n: sql<number>`count(*)::int` }).from(searchOutbox).where(isNull(searchOutbox.doneAt));
    return r.n === 0;
  }, 20_000);
}

async function markSaying(text: string) {
  const owner = await createUser("qc");
  const [rec] = await db()
    .insert(recordings)
    .values({
      title: `Words test ${randomUUID().slice(0, 6)}`,
      originalName: "clip.mp4",
      originalSize: 1000,
      state: "ready",
      uploadedBy: owner.id,
      durationS: 60,
    })
    .returning();
  const [mark] = await db().insert(marks).values({ recordingId: rec.id, tStart: 12, text, createdBy: owner.id }).returning();
  return mark;
}

async function findsMark(cookie: string, q: string, markId: string) {
  const res = await http(`/api/search?q=${encodeURIComponent(q)}&type=mark`, { cookie });
  const body = (await res.json()) as { hits: { id: string }[] };
  return body.hits.some((h) => h.id === `mark-${markId}`);
}

const post = (cookie: string, form: Record<string, string>) => http("/search/words", { cookie, form });
const groupWith = async (w: string) => (await db().select().from(searchWordGroups).where(sql`${w} = any(${searchWordGroups.words})`))[0];

describe("search words", () => {
  it("an editor's new group makes either word find the other; removing it undoes that", async () => {
    const editor = await createUser("editor");
    const apprentice = await createUser("apprentice");
    const [a, b] = [word(), word()];
    const mark = await markSaying(`checked ${b} on the bench`);
    const other = await markSaying(`noted ${a} at the stand`);
    await indexed();
    expect(await findsMark(apprentice.cookie, a, mark.id)).toBe(false);
    expect(await findsMark(apprentice.cookie, b, other.id)).toBe(false);

    const added = await post(editor.cookie, { intent: "add", words: `${a.toUpperCase()}, ${b}` });
    expect(added.status).toBe(302);
    const group = await groupWith(a);
    expect(group.words).toEqual([a, b]); // lower case, in the order typed
    expect(group.updatedBy).toBe(editor.id);
    await indexed();
    expect(await findsMark(apprentice.cookie, a, mark.id)).toBe(true);
    expect(await findsMark(apprentice.cookie, b, other.id)).toBe(true);

    const page = await (await http("/search/words", { cookie: editor.cookie })).text();
    expect(page).toContain(a);
    expect(page).toContain(`Changed by ${editor.name}`);

    expect((await post(editor.cookie, { intent: "remove", id: group.id })).status).toBe(302);
    expect(await groupWith(a)).toBeUndefined();
    await indexed();
    expect(await findsMark(apprentice.cookie, a, mark.id)).toBe(false);
    const [removal] = await db()
      .select()
      .from(auditLog)
      .where(sql`${auditLog.entity} = 'search_words' and ${auditLog.entityId} = ${group.id} and ${auditLog.action} = 'remove'`);
    expect(removal.actorId).toBe(editor.id);
    expect(removal.detail).toEqual({ words: [a, b] });
  });

  it("says what is wrong with a group and saves nothing", async () => {
    const editor = await createUser("editor");
    const [a, b, c] = [word(), word(), word()];
    const one = await post(editor.cookie, { intent: "add", words: `${a}` });
    expect(one.status).toBe(400);
    expect(await one.text()).toContain("Give at least two words or phrases that mean the same");
    expect(await groupWith(a)).toBeUndefined();

    expect((await post(editor.cookie, { intent: "add", words: `${a}, ${b}` })).status).toBe(302);
    const twice = await post(editor.cookie, { intent: "add", words: `${b}, ${c}` });
    expect(twice.status).toBe(409);
    const html = await twice.text();
    expect(html).toContain(`“${b}” is already in the group “${a}, ${b}”`);
    expect(html).toContain(`value="${b}, ${c}"`); // what was typed stays in the field
    expect(await groupWith(c)).toBeUndefined();
  });

  it("keeps both versions when two editors change the same group", async () => {
    const [first, second] = [await createUser("editor"), await createUser("admin")];
    const [a, b, c, d] = [word(), word(), word(), word()];
    expect((await post(first.cookie, { intent: "add", words: `${a}, ${b}` })).status).toBe(302);
    const group = await groupWith(a);
    const loadedAt = String(group.updatedAt.getTime());

    expect((await post(second.cookie, { intent: "change", id: group.id, loadedAt, words: `${a}, ${b}, ${c}` })).status).toBe(302);
    const late = await post(first.cookie, { intent: "change", id: group.id, loadedAt, words: `${a}, ${d}` });
    expect(late.status).toBe(409);
    const html = await late.text();
    expect(html).toContain("Someone changed this group while you were editing it");
    expect(html).toContain(`${a}, ${b}, ${c}`); // as it is now
    expect(html).toContain(`value="${a}, ${d}"`); // and what the late editor typed
    const [now] = await db().select().from(searchWordGroups).where(eq(searchWordGroups.id, group.id));
    expect(now.words).toEqual([a, b, c]);
    expect(now.updatedBy).toBe(second.id);
    // The page now carries the group's current time: saving again replaces it on purpose.
    expect(html).toContain(`name="loadedAt" value="${now.updatedAt.getTime()}"`);
    const again = await post(first.cookie, {
      intent: "change",
      id: group.id,
      loadedAt: String(now.updatedAt.getTime()),
      words: `${a}, ${d}`,
    });
    expect(again.status).toBe(302);
    expect((await groupWith(a)).words).toEqual([a, d]);
  });

  it("keeps a change made while the search service is down and applies it when it is back", async () => {
    const editor = await createUser("editor");
    const apprentice = await createUser("apprentice");
    const [a, b] = [word(), word()];
    const mark = await markSaying(`noted ${b} after the pull`);
    await indexed();
    await fetch(`${process.env.SEARCH_CONTROL_URL}/search/stop`, { method: "POST" });
    try {
      expect((await post(editor.cookie, { intent: "add", words: `${a}, ${b}` })).status).toBe(302);
      await waitFor(async () => {
        const rows = await db().select().from(searchOutbox).where(isNull(searchOutbox.doneAt));
        return rows.some((r) => r.kind === "search_words" && r.lastError) ? rows : null;
      });
      const page = await (await http("/search/words", { cookie: editor.cookie })).text();
      expect(page).toContain("Saved, not yet in use: the search service is not answering.");
    } finally {
      await fetch(`${process.env.SEARCH_CONTROL_URL}/search/start`, { method: "POST" });
    }
    await indexed();
    expect(await findsMark(apprentice.cookie, a, mark.id)).toBe(true);
  });

  it("lets only editors and admins change the words", async () => {
    const [a, b] = [word(), word()];
    for (const role of ["apprentice", "builder", "qc"] as const) {
      const who = await createUser(role);
      expect((await http("/search/words", { cookie: who.cookie })).status).toBe(403);
      expect((await post(who.cookie, { intent: "add", words: `${a}, ${b}` })).status).toBe(403);
    }
    expect(await groupWith(a)).toBeUndefined();
  });
});
