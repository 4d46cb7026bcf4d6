// Security classes of issue 13 over HTTP: spreadsheet formulas in both CSV exports, and the
// title and address of a never-published draft through the three routes that showed them to
// people who may not read it (the editor's title search, the recording page, the marks API).
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { marks, procedureRevisions, procedures, procedureSpecs, readings, recordings, testRecordReadings, testRecords } from "~/db/schema";
import { db } from "~/lib/db.server";
import { createUser, http, type TestUser } from "../support/app";

const DOC = { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "Measure and record." }] }] };

/** The cells of a CSV line whose cells hold no comma, quote or line break (all of this file's values). */
const cellsOf = (line: string) => line.split(",");
const linesOf = (text: string) =>
  text
    .replace(/^\uFEFF/, "")
    .split("\n")
    .filter(Boolean);

describe("CSV exports: text a spreadsheet would run as a formula is written as text", () => {
  const tag = randomUUID().slice(0, 8);
  let builder: TestUser;
  let recordingId: string;

  beforeAll(async () => {
    builder = await createUser("builder", { name: `@Builder ${tag}` });
    const [rec] = await db()
      .insert(recordings)
      .values({ title: `CSV ${tag}`, originalName: "c.mp4", originalSize: 1, state: "ready", durationS: 60, uploadedBy: builder.id })
      .returning();
    recordingId = rec.id;
    await db()
      .insert(readings)
      .values({
        recordingId,
        quantity: "torque",
        label: "=1+2",
        valueEntered: -12.5,
        unitEntered: "N.m",
        valueSi: -12.5,
        conditions: { lube: "+SUM(A1:A3)", tool: "\tcalc", pass: "-2+3", note: "@SUM(A1)" },
        t: 4,
        createdBy: builder.id,
      });
  });

  it("recording readings: labels, lube, tool, pass, note and names get a leading quote; the negative value stays a number", async () => {
    const res = await http(`/api/recordings/${recordingId}/readings?format=csv`, { cookie: builder.cookie });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toContain("text/csv");
    const [head, row, ...rest] = linesOf(await res.text());
    expect(rest).toEqual([]);
    const cell = Object.fromEntries(cellsOf(head).map((h, i) => [h, cellsOf(row)[i]]));
    expect(cell).toMatchObject({
      label: "'=1+2",
      lube: "'+SUM(A1:A3)",
      tool: "'\tcalc",
      pass: "'-2+3",
      note: "'@SUM(A1)",
      entered_by: `'@Builder ${tag}`,
    });
    expect(cell.value).toBe("-12.5");
    expect(cell.value_si).toBe("-12.5");
    expect(cell.time_s).toBe("4");
  });

  it("test records: title, work order, serial, spec label, reading note and the filer's name get a leading quote; numbers do not", async () => {
    const qc = await createUser("qc", { name: `-QC ${tag}` });
    const [p] = await db()
      .insert(procedures)
      .values({ slug: `csv-${tag}`, title: `CSV check ${tag}`, area: "block" })
      .returning();
    const [rev] = await db()
      .insert(procedureRevisions)
      .values({ procedureId: p.id, number: 1, state: "published", title: p.title, area: "block", doc: DOC, publishedAt: new Date() })
      .returning();
    await db().update(procedures).set({ publishedRevisionId: rev.id, publishedAt: new Date() }).where(eq(procedures.id, p.id));
    const [spec] = await db()
      .insert(procedureSpecs)
      .values({
        revisionId: rev.id,
        procedureId: p.id,
        specKey: "s1",
        position: 0,
        label: "+Deck flatness",
        quantity: "length",
        unit: "mm",
        min: -0.05,
        max: 0.05,
        siUnit: "m",
        minSi: -0.00005,
        maxSi: 0.00005,
      })
      .returning();
    const [rec] = await db()
      .insert(testRecords)
      .values({
        procedureId: p.id,
        revisionId: rev.id,
        title: "=HYPERLINK(x)",
        workOrder: `@WO${tag}`,
        engineSerial: "+44-1",
        testedOn: "2026-03-02",
        verdict: "out",
        createdBy: qc.id,
      })
      .returning();
    await db().insert(testRecordReadings).values({
      recordId: rec.id,
      version: 0,
      specId: spec.id,
      specKey: "s1",
      position: 0,
      valueEntered: -0.08,
      unitEntered: "mm",
      valueSi: -0.00008,
      valueInSpecUnit: -0.08,
      verdict: "below",
      note: "=2+5",
    });

    const res = await http(`/test-records/export.csv?workOrder=WO${tag}`, { cookie: qc.cookie });
    expect(res.status).toBe(200);
    const [head, row, ...rest] = linesOf(await res.text());
    expect(rest).toEqual([]);
    const cell = Object.fromEntries(cellsOf(head).map((h, i) => [h, cellsOf(row)[i]]));
    expect(cell).toMatchObject({
      title: "'=HYPERLINK(x)",
      work_order: `'@WO${tag}`,
      engine_serial: "'+44-1",
      spec: "'+Deck flatness",
      reading_note: "'=2+5",
      filed_by: `'-QC ${tag}`,
      tested_on: "2026-03-02",
    });
    expect([cell.spec_min, cell.spec_max, cell.reading, cell.reading_in_spec_unit, cell.revision]).toEqual([
      "-0.05",
      "0.05",
      "-0.08",
      "-0.08",
      "1",
    ]);
  });
});

describe("a never-published draft's title and address reach only those who may read it", () => {
  const tag = randomUUID().slice(0, 8);
  const secretTitle = `Zephyr cam timing draft ${tag}`;
  const secretSlug = `zephyr-cam-timing-draft-${tag}`;
  let author: TestUser;
  let editor: TestUser;
  let outsiders: TestUser[];
  let draftId: string;
  let publishedId: string;
  let recordingId: string;
  let markId: string;

  beforeAll(async () => {
    author = await createUser("builder");
    editor = await createUser("editor");
    // The roles that may not read someone else's draft: another builder, QC, an apprentice.
    outsiders = [await createUser("builder"), await createUser("qc"), await createUser("apprentice")];
    const [draft] = await db()
      .insert(procedures)
      .values({ slug: secretSlug, title: secretTitle, area: "heads", createdBy: author.id })
      .returning();
    draftId = draft.id;
    await db()
      .insert(procedureRevisions)
      .values({ procedureId: draft.id, number: 1, state: "draft", title: secretTitle, area: "heads", doc: DOC, authorId: author.id });
    const [pub] = await db()
      .insert(procedures)
      .values({ slug: `zephyr-published-${tag}`, title: `Zephyr valve lash ${tag}`, area: "heads" })
      .returning();
    publishedId = pub.id;
    const [rev] = await db()
      .insert(procedureRevisions)
      .values({ procedureId: pub.id, number: 1, state: "published", title: pub.title, area: "heads", doc: DOC, publishedAt: new Date() })
      .returning();
    await db().update(procedures).set({ publishedRevisionId: rev.id, publishedAt: new Date() }).where(eq(procedures.id, pub.id));
    const [rec] = await db()
      .insert(recordings)
      .values({ title: `Cam timing ${tag}`, originalName: "t.mp4", originalSize: 1, state: "ready", durationS: 60, uploadedBy: author.id })
      .returning();
    recordingId = rec.id;
    const [m] = await db()
      .insert(marks)
      .values({ recordingId, tStart: 2, text: "Cam timing set", procedureId: draftId, createdBy: author.id })
      .returning();
    markId = m.id;
  });

  const leaks = (text: string) => text.includes(secretTitle) || text.includes(secretSlug);

  it("/api/procedures/titles: only the author and the editors find it; published ones everyone", async () => {
    for (const u of outsiders) {
      const res = await http(`/api/procedures/titles?q=${tag}`, { cookie: u.cookie });
      expect(res.status).toBe(200);
      const text = await res.text();
      expect(leaks(text), u.role).toBe(false);
      expect(
        (JSON.parse(text) as { results: { id: string }[] }).results.map((r) => r.id),
        u.role,
      ).toEqual([publishedId]);
    }
    for (const u of [author, editor]) {
      const body = (await (await http(`/api/procedures/titles?q=${tag}`, { cookie: u.cookie })).json()) as {
        results: { id: string; title: string; slug: string }[];
      };
      expect(body.results.map((r) => r.id).sort(), u.role).toEqual([draftId, publishedId].sort());
      expect(body.results.find((r) => r.id === draftId)).toMatchObject({ title: secretTitle, slug: secretSlug });
    }
  });

  it("the recording page: neither the mark's link nor the procedure choices show the draft to others", async () => {
    for (const u of outsiders) {
      for (const path of [`/recordings/${recordingId}`, `/recordings/${recordingId}.data`]) {
        const res = await http(path, { cookie: u.cookie });
        expect(res.status, `${u.role} ${path}`).toBe(200);
        const text = await res.text();
        expect(leaks(text), `${u.role} ${path}`).toBe(false);
        expect(text).toContain("a procedure not yet published");
        expect(text).toContain("Cam timing set");
      }
    }
    for (const u of [author, editor]) {
      const text = await (await http(`/recordings/${recordingId}`, { cookie: u.cookie })).text();
      expect(text, u.role).toContain(secretTitle);
      expect(text, u.role).toContain(`/procedures/${secretSlug}`);
    }
  });

  it("the marks API: the link shows without title or address to others, and only the author may link to the draft", async () => {
    for (const u of outsiders) {
      const list = await http(`/api/recordings/${recordingId}/marks`, { cookie: u.cookie });
      const one = await http(`/api/recordings/${recordingId}/marks/${markId}`, { cookie: u.cookie });
      expect([list.status, one.status], u.role).toEqual([200, 200]);
      const listText = await list.text();
      const oneText = await one.text();
      expect(leaks(listText) || leaks(oneText), u.role).toBe(false);
      const mark = (JSON.parse(oneText) as { mark: { procedureTitle: string | null; procedureSlug: string | null } }).mark;
      expect(mark).toMatchObject({ procedureTitle: "a procedure not yet published", procedureSlug: null });
    }
    const seen = (await (await http(`/api/recordings/${recordingId}/marks/${markId}`, { cookie: author.cookie })).json()) as {
      mark: { procedureTitle: string; procedureSlug: string };
    };
    expect(seen.mark).toMatchObject({ procedureTitle: secretTitle, procedureSlug: secretSlug });

    // Pointing a mark at it: refused (422) to every staff role that may not read it, like an
    // unknown procedure; the apprentice may not make marks at all.
    for (const u of outsiders) {
      const res = await http(`/api/recordings/${recordingId}/marks`, {
        cookie: u.cookie,
        json: { tStart: 5, text: "Linked", procedureId: draftId },
      });
      if (u.role === "apprentice") {
        expect(res.status).toBe(403);
        continue;
      }
      expect(res.status, u.role).toBe(422);
      const body = (await res.json()) as { issues: { path: string }[] };
      expect(body.issues.map((i) => i.path)).toEqual(["procedureId"]);
      const unknown = await http(`/api/recordings/${recordingId}/marks`, {
        cookie: u.cookie,
        json: { tStart: 5, text: "Linked", procedureId: randomUUID() },
      });
      expect(await unknown.json()).toEqual(body);
      // Their own mark: linking it to the published one is fine, to the draft is not.
      const own = await http(`/api/recordings/${recordingId}/marks`, {
        cookie: u.cookie,
        json: { tStart: 6, text: "Own", procedureId: publishedId },
      });
      expect(own.status, u.role).toBe(201);
      const ownId = ((await own.json()) as { mark: { id: string } }).mark.id;
      const patched = await http(`/api/recordings/${recordingId}/marks/${ownId}`, {
        method: "PATCH",
        cookie: u.cookie,
        json: { procedureId: draftId },
      });
      expect(patched.status, u.role).toBe(422);
    }
    const byAuthor = await http(`/api/recordings/${recordingId}/marks`, {
      cookie: author.cookie,
      json: { tStart: 7, text: "Mine", procedureId: draftId },
    });
    expect(byAuthor.status).toBe(201);
  });
});
