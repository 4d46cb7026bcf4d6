// Recordings and marks attached to a build by choosing it (issue 16): the recording's page and
// the API, a new mark taking its recording's build (or another, or none), the build page's
// Attach and Detach, every move a build event on the timeline, unknown numbers refused with a
// reason, and the search finding a recording and its marks by the build's number.
import { and, desc, eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { buildEvents, builds, marks, recordings } from "~/db/schema";
import { db } from "~/lib/db.server";
import { createUser, http, type TestUser, waitFor } from "../support/app";

let seq = 0;
const uniqueNumber = () => `BA-${String(10 + Math.floor(Math.random() * 89))}-${10_000 + Math.floor(Math.random() * 80_000) + seq++}`;

async function makeBuild(extra: Partial<typeof builds.$inferInsert> = {}) {
  const [b] = await db()
    .insert(builds)
    .values({ number: uniqueNumber(), customerName: "Attach test customer", ...extra })
    .returning();
  return b;
}

async function makeRecording(by: TestUser, title = `Attach test ${Math.random().toString(36).slice(2, 8)}`, buildId: string | null = null) {
  const [r] = await db()
    .insert(recordings)
    .values({ title, originalName: "a.mp4", originalSize: 1, state: "ready", durationS: 60, uploadedBy: by.id, buildId })
    .returning();
  return r;
}

const buildIdOf = async (id: string) => (await db().select().from(recordings).where(eq(recordings.id, id)))[0].buildId;
const markBuildIdOf = async (id: string) => (await db().select().from(marks).where(eq(marks.id, id)))[0].buildId;
const eventsOf = (buildId: string) => db().select().from(buildEvents).where(eq(buildEvents.buildId, buildId)).orderBy(desc(buildEvents.at));

describe("a recording's build", () => {
  it("is chosen on the recording's page (Edit details), shown as a link, and each move is a timeline event", async () => {
    const builder = await createUser("builder");
    const [a, b] = [await makeBuild(), await makeBuild()];
    const rec = await makeRecording(builder);
    const save = (buildNumber: string) =>
      http(`/recordings/${rec.id}`, {
        cookie: builder.cookie,
        form: { intent: "details", title: rec.title, tags: "", description: "", buildNumber },
      });

    expect((await save(a.number)).status).toBe(302);
    expect(await buildIdOf(rec.id)).toBe(a.id);
    const page = await (await http(`/recordings/${rec.id}`, { cookie: builder.cookie })).text();
    expect(page).toContain(`href="/builds/${a.number}"`);
    const [attached] = await eventsOf(a.id);
    expect(attached).toMatchObject({
      kind: "attached",
      actorId: builder.id,
      detail: { what: "recording", recordingId: rec.id, title: rec.title },
    });

    // Moved to another build: detached from the first, attached to the second, saying where from.
    expect((await save(b.number.toLowerCase())).status).toBe(302);
    expect(await buildIdOf(rec.id)).toBe(b.id);
    expect((await eventsOf(a.id))[0]).toMatchObject({ kind: "detached", detail: { what: "recording", to: b.number } });
    expect((await eventsOf(b.id))[0]).toMatchObject({ kind: "attached", detail: { from: a.number } });
    const buildPage = await (await http(`/builds/${b.number}`, { cookie: builder.cookie })).text();
    expect(buildPage).toContain(`Attached the recording “${rec.title}” (from ${a.number})`);

    // Saving the same build again writes no event; "No build" takes it off.
    const before = (await eventsOf(b.id)).length;
    expect((await save(b.number)).status).toBe(302);
    expect((await eventsOf(b.id)).length).toBe(before);
    expect((await save("")).status).toBe(302);
    expect(await buildIdOf(rec.id)).toBeNull();
    expect((await eventsOf(b.id))[0]).toMatchObject({ kind: "detached", detail: { to: null } });
  });

  it("an unknown or malformed build number on the page is a 4xx with the field's reason, and nothing is saved", async () => {
    const builder = await createUser("builder");
    const rec = await makeRecording(builder);
    const form = (buildNumber: string) => ({
      intent: "details",
      title: "Renamed by a refused form",
      tags: "",
      description: "",
      buildNumber,
    });
    const unknown = await http(`/recordings/${rec.id}`, { cookie: builder.cookie, form: form("ZZ-99-99999") });
    expect(unknown.status).toBe(422);
    expect(await unknown.text()).toContain("No build has the work order ZZ-99-99999");
    const malformed = await http(`/recordings/${rec.id}`, { cookie: builder.cookie, form: form("not a number") });
    expect(malformed.status).toBe(400);
    const [after] = await db().select().from(recordings).where(eq(recordings.id, rec.id));
    expect(after).toMatchObject({ buildId: null, title: rec.title });
  });

  it("is set through PATCH /api/recordings/:id by number, answered by GET, refused with a reason when unknown", async () => {
    const builder = await createUser("builder");
    const b = await makeBuild();
    const rec = await makeRecording(builder);
    const patch = (who: TestUser, json: unknown) => http(`/api/recordings/${rec.id}`, { method: "PATCH", cookie: who.cookie, json });

    const ok = await patch(builder, { buildNumber: b.number });
    expect(ok.status).toBe(200);
    expect(await ok.json()).toEqual({ recording: { id: rec.id, buildNumber: b.number } });
    const got = (await (await http(`/api/recordings/${rec.id}`, { cookie: builder.cookie })).json()) as {
      recording: { buildNumber: string };
    };
    expect(got.recording.buildNumber).toBe(b.number);
    const list = (await (await http(`/api/recordings?q=${encodeURIComponent(rec.title)}`, { cookie: builder.cookie })).json()) as {
      recordings: { id: string; buildNumber: string | null }[];
    };
    expect(list.recordings.find((r) => r.id === rec.id)?.buildNumber).toBe(b.number);

    const unknown = await patch(builder, { buildNumber: "ZZ-99-99998" });
    expect(unknown.status).toBe(422);
    const why = (await unknown.json()) as { reason: string; issues: { path: string }[] };
    expect(why.reason).toContain("No build has the work order ZZ-99-99998");
    expect(why.issues[0].path).toBe("buildNumber");
    const malformed = await patch(builder, { buildNumber: 17 });
    expect(malformed.status).toBe(422);
    expect(await buildIdOf(rec.id)).toBe(b.id);

    // Someone else's recording: a builder may not, an editor may; an apprentice never.
    expect((await patch(await createUser("builder"), { buildNumber: null })).status).toBe(403);
    expect((await patch(await createUser("apprentice"), { buildNumber: null })).status).toBe(403);
    const editor = await createUser("editor");
    expect((await patch(editor, { buildNumber: null })).status).toBe(200);
    expect(await buildIdOf(rec.id)).toBeNull();
    expect((await eventsOf(b.id))[0]).toMatchObject({ kind: "detached", actorId: editor.id });
    // Other verbs are not taken.
    expect((await http(`/api/recordings/${rec.id}`, { cookie: builder.cookie, json: { buildNumber: null } })).status).toBe(405);
  });

  it("is offered on the upload page, builds in progress first", async () => {
    const builder = await createUser("builder");
    const bench = await makeBuild({ status: "on_bench" });
    const gone = await makeBuild({ status: "delivered" });
    const html = await (await http("/recordings/upload", { cookie: builder.cookie })).text();
    // The options are rendered by the queue for each file; the page carries the list to choose from.
    expect(html).toContain(bench.number);
    expect(html).toContain(gone.number);
    // Opened from a build's page with its number; anything else there is a 400.
    expect((await http(`/recordings/upload?build=${bench.number.toLowerCase()}`, { cookie: builder.cookie })).status).toBe(200);
    expect((await http("/recordings/upload?build=not-a-build", { cookie: builder.cookie })).status).toBe(400);
  });
});

describe("a mark's build", () => {
  it("a new mark takes its recording's build, or the one chosen, or none; a change is a timeline event", async () => {
    const builder = await createUser("builder");
    const [onRec, other] = [await makeBuild(), await makeBuild()];
    const rec = await makeRecording(builder, undefined, onRec.id);
    const add = (json: Record<string, unknown>) =>
      http(`/api/recordings/${rec.id}/marks`, { cookie: builder.cookie, json: { tStart: 2, text: "Stud 3 reaches 110 N·m", ...json } });

    const byDefault = await add({});
    expect(byDefault.status).toBe(201);
    const d = ((await byDefault.json()) as { mark: { id: string; buildNumber: string } }).mark;
    expect(d.buildNumber).toBe(onRec.number);
    expect(await markBuildIdOf(d.id)).toBe(onRec.id);

    const chosen = ((await (await add({ buildNumber: other.number })).json()) as { mark: { id: string; buildNumber: string } }).mark;
    expect(chosen.buildNumber).toBe(other.number);
    const none = ((await (await add({ buildNumber: null })).json()) as { mark: { id: string; buildNumber: string | null } }).mark;
    expect(none.buildNumber).toBeNull();
    expect(await markBuildIdOf(none.id)).toBeNull();

    const unknown = await add({ buildNumber: "ZZ-99-99997" });
    expect(unknown.status).toBe(422);
    expect(((await unknown.json()) as { reason: string }).reason).toContain("No build has the work order ZZ-99-99997");

    // GET lists each mark with its build's number.
    const listed = (await (await http(`/api/recordings/${rec.id}/marks`, { cookie: builder.cookie })).json()) as {
      marks: { id: string; buildNumber: string | null }[];
    };
    expect(Object.fromEntries(listed.marks.map((m) => [m.id, m.buildNumber]))).toMatchObject({
      [d.id]: onRec.number,
      [chosen.id]: other.number,
      [none.id]: null,
    });

    // PATCH moves it: detached from one build, attached to the other; the text is kept.
    const moved = await http(`/api/recordings/${rec.id}/marks/${d.id}`, {
      method: "PATCH",
      cookie: builder.cookie,
      json: { buildNumber: other.number },
    });
    expect(moved.status).toBe(200);
    expect(((await moved.json()) as { mark: { buildNumber: string; text: string } }).mark).toMatchObject({
      buildNumber: other.number,
      text: "Stud 3 reaches 110 N·m",
    });
    expect((await eventsOf(onRec.id))[0]).toMatchObject({ kind: "detached", actorId: builder.id, detail: { what: "mark", id: d.id } });
    expect((await eventsOf(other.id))[0]).toMatchObject({ kind: "attached", detail: { what: "mark", from: onRec.number, t: 2 } });
    const refused = await http(`/api/recordings/${rec.id}/marks/${d.id}`, {
      method: "PATCH",
      cookie: builder.cookie,
      json: { buildNumber: "ZZ-99-99996" },
    });
    expect(refused.status).toBe(422);
    expect(await markBuildIdOf(d.id)).toBe(other.id);
  });
});

describe("the build page's Attach and Detach", () => {
  it("attaches a recording on no build and detaches recordings and marks, for those who change builds", async () => {
    const qc = await createUser("qc");
    const uploader = await createUser("builder");
    const b = await makeBuild();
    const rec = await makeRecording(uploader);
    const post = (who: TestUser, form: Record<string, string>) => http(`/builds/${b.number}`, { cookie: who.cookie, form });

    const page = await (await http(`/builds/${b.number}`, { cookie: qc.cookie })).text();
    expect(page).toContain("Attach a recording");
    expect(page).toContain(rec.title);

    expect((await post(await createUser("apprentice"), { intent: "attach-recording", recordingId: rec.id })).status).toBe(403);
    expect((await post(qc, { intent: "attach-recording", recordingId: "" })).status).toBe(400);
    const ok = await post(qc, { intent: "attach-recording", recordingId: rec.id });
    expect(ok.status).toBe(302);
    expect(ok.headers.get("location")).toBe(`/builds/${b.number}#media`);
    expect(await buildIdOf(rec.id)).toBe(b.id);
    expect((await eventsOf(b.id))[0]).toMatchObject({ kind: "attached", actorId: qc.id, detail: { what: "recording", title: rec.title } });

    // A recording on another build is moved on its own page, not taken from here.
    const elsewhere = await makeBuild();
    const taken = await makeRecording(uploader, undefined, elsewhere.id);
    expect((await post(qc, { intent: "attach-recording", recordingId: taken.id })).status).toBe(409);
    expect(await buildIdOf(taken.id)).toBe(elsewhere.id);

    // Its new mark is on the build (the recording's), and listed on the build page.
    const mark = (await (
      await http(`/api/recordings/${rec.id}/marks`, { cookie: uploader.cookie, json: { tStart: 5, text: "Deck measured at four corners" } })
    ).json()) as { mark: { id: string } };
    const withMark = await (await http(`/builds/${b.number}`, { cookie: qc.cookie })).text();
    expect(withMark).toContain("Deck measured at four corners");

    expect((await post(qc, { intent: "detach-mark", markId: mark.mark.id })).status).toBe(302);
    expect(await markBuildIdOf(mark.mark.id)).toBeNull();
    expect((await post(qc, { intent: "detach-mark", markId: mark.mark.id })).status).toBe(409);
    expect((await post(qc, { intent: "detach-recording", recordingId: rec.id })).status).toBe(302);
    expect(await buildIdOf(rec.id)).toBeNull();
    expect((await post(qc, { intent: "detach-recording", recordingId: taken.id })).status).toBe(409);
    const kinds = (await eventsOf(b.id)).slice(0, 3).map((e) => `${e.kind} ${e.detail.what}`);
    expect(kinds).toEqual(["detached recording", "detached mark", "attached recording"]);
    const timeline = await (await http(`/builds/${b.number}`, { cookie: qc.cookie })).text();
    expect(timeline).toContain(`Detached the recording “${rec.title}”`);
    expect(timeline).toContain("Detached the mark “Deck measured at four corners”");
  });
});

describe("search by build number", () => {
  it("finds the build's recordings and marks by its number", async () => {
    const builder = await createUser("builder");
    const b = await makeBuild();
    const rec = await makeRecording(builder, `Crank grind check ${Math.random().toString(36).slice(2, 7)}`);
    const made = await http(`/api/recordings/${rec.id}/marks`, {
      cookie: builder.cookie,
      json: { tStart: 4, text: "Journal 2 miked", buildNumber: b.number },
    });
    const markId = ((await made.json()) as { mark: { id: string } }).mark.id;
    await http(`/api/recordings/${rec.id}`, { method: "PATCH", cookie: builder.cookie, json: { buildNumber: b.number } });
    const hits = await waitFor(async () => {
      const body = (await (await http(`/api/search?q=${encodeURIComponent(b.number)}`, { cookie: builder.cookie })).json()) as {
        hits: { kind: string; url: string }[];
      };
      const recHit = body.hits.find((h) => h.kind === "recording" && h.url === `/recordings/${rec.id}`);
      const markHit = body.hits.find((h) => h.kind === "mark" && h.url.startsWith(`/recordings/${rec.id}?t=4`));
      return recHit && markHit && { recHit, markHit };
    }, 30_000);
    expect(hits.recHit).toBeTruthy();
    expect(hits.markHit).toBeTruthy();
    expect(await markBuildIdOf(markId)).toBe(b.id);
    expect(
      await db()
        .select()
        .from(marks)
        .where(and(eq(marks.id, markId), eq(marks.buildId, b.id))),
    ).toHaveLength(1);
  });
});
