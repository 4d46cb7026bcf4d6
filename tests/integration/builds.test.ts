// Builds (issue 16): the migration's linking of old records, the build's life (open, change,
// move forward, reopen), test records filed by choosing a build, the readings CSV and JSON, the
// build sheet PDF and its mail with the PDF attached.
import { execFileSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { and, eq, sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { max, min, subtract } from "mathjs";
import { buildEvents, builds, marks, procedureRevisions, procedures, recordings, testRecords } from "~/db/schema";
import { buildCalcs, buildPage } from "~/lib/builds/page.server";
import { calcSummary } from "~/lib/builds/sheet";
import { boreOf, sizeText, strokeOf } from "~/lib/builds/sizes";
import { db } from "~/lib/db.server";
import { walk, type JSONNode } from "~/lib/procedures/document";
import type { TestRecordView } from "~/lib/test-records/records.server";
import { createUser, http, mailbox, waitFor } from "../support/app";
import { demoBoreSpec } from "../support/builds";
import { parse } from "../support/csv";

const uniqueNumber = () => `BT-${String(10 + Math.floor(Math.random() * 89))}-${10_000 + Math.floor(Math.random() * 89_999)}`;

const buildForm = (extra: Record<string, string> = {}) => ({
  customerName: "Fernhill Tractor Club",
  customerContact: "secretary@fernhill.example",
  engine: "Inline three, 1.5 L diesel",
  engineSerial: `FH-${randomUUID().slice(0, 6)}`,
  sizeUnit: "mm",
  bore: "88.00",
  stroke: "82.0",
  notes: "",
  leadBuilderId: "",
  receivedOn: "2026-11-02",
  promisedOn: "",
  ...extra,
});

async function openBuild(cookie: string, extra: Record<string, string> = {}) {
  const number = uniqueNumber();
  const res = await http("/builds/new", { cookie, form: { number, ...buildForm(extra) } });
  expect(res.status).toBe(302);
  expect(res.headers.get("location")).toBe(`/builds/${number}`);
  return number;
}

async function fileBore(cookie: string, workOrder: string, value: string, cylinder = "1") {
  const { slug, revisionId, spec } = await demoBoreSpec();
  const b = `r.${spec.id}.0`;
  return http(`/test-records/new?procedure=${slug}`, {
    cookie,
    form: {
      revisionId,
      title: "Bore check",
      workOrder,
      engineSerial: "",
      testedOn: new Date().toISOString().slice(0, 10),
      notes: "",
      [`${b}.value`]: value,
      [`${b}.unit`]: "mm",
      [`${b}.cylinder`]: cylinder,
      [`${b}.depth`]: "10",
      [`${b}.depthUnit`]: "mm",
      [`${b}.angle`]: "0",
    },
  });
}

/** The hand-written statements of migration 0029 that make builds from old work order text and link the rows. */
function linkingStatements(): string[] {
  const file = fs.readFileSync(path.resolve(import.meta.dirname, "../../drizzle/0029_builds.sql"), "utf8");
  const parts = file.split("--> statement-breakpoint").map((s) => s.trim());
  const first = parts.findIndex((s) => s.startsWith("-- One build per distinct work order"));
  const last = parts.findIndex((s) => s.startsWith('INSERT INTO "build_events"'));
  expect(first).toBeGreaterThan(0);
  return parts.slice(first, last + 1);
}

describe("builds", () => {
  it("migration 0029 makes one build per old work order (records and recording titles), with the placeholder customer, and links the rows", async () => {
    const qc = await createUser("qc");
    const { revisionId } = await demoBoreSpec();
    const [rev] = await db()
      .select({ procedureId: sql<string>`procedure_id` })
      .from(sql`procedure_revisions`)
      .where(sql`id = ${revisionId}`);
    const a = uniqueNumber();
    const c = uniqueNumber();
    const rolledBack = new Error("roll back");
    let seen: Record<string, unknown> = {};
    await db()
      .transaction(async (tx) => {
        const rows = await tx
          .insert(testRecords)
          .values([
            {
              procedureId: rev.procedureId,
              revisionId,
              title: "old 1",
              workOrder: a,
              engineSerial: "OLD-1",
              testedOn: "2024-03-01",
              verdict: "within",
              createdBy: qc.id,
            },
            {
              procedureId: rev.procedureId,
              revisionId,
              title: "old 2",
              workOrder: ` ${a.toLowerCase()}`,
              engineSerial: "OLD-1",
              testedOn: "2024-02-01",
              verdict: "out",
              createdBy: qc.id,
            },
          ])
          .returning({ id: testRecords.id });
        const [recA] = await tx
          .insert(recordings)
          .values({ title: `Stud test (WO ${a})`, originalName: "a.mp4", originalSize: 1, uploadedBy: qc.id })
          .returning({ id: recordings.id });
        const [recC] = await tx
          .insert(recordings)
          .values({ title: `Honing (${c})`, originalName: "c.mp4", originalSize: 1, uploadedBy: qc.id })
          .returning({ id: recordings.id });
        await tx.insert(marks).values({ recordingId: recA.id, tStart: 3, text: "pass 2" });
        for (const stmt of linkingStatements()) await tx.execute(sql.raw(stmt));
        const [bA] = await tx.select().from(builds).where(eq(builds.number, a));
        const [bC] = await tx.select().from(builds).where(eq(builds.number, c));
        const linked = await tx
          .select({ buildId: testRecords.buildId, workOrder: testRecords.workOrder })
          .from(testRecords)
          .where(
            sql`${testRecords.id} in (${sql.join(
              rows.map((r) => sql`${r.id}`),
              sql`, `,
            )})`,
          );
        const [recRow] = await tx
          .select({ buildId: recordings.buildId, title: recordings.title })
          .from(recordings)
          .where(eq(recordings.id, recA.id));
        const [recCRow] = await tx.select({ buildId: recordings.buildId }).from(recordings).where(eq(recordings.id, recC.id));
        const [mark] = await tx.select({ buildId: marks.buildId }).from(marks).where(eq(marks.recordingId, recA.id));
        const [event] = await tx.select().from(buildEvents).where(eq(buildEvents.buildId, bA.id));
        seen = { bA, bC, linked, recRow, recCRow, mark, event };
        throw rolledBack;
      })
      .catch((err) => {
        if (err !== rolledBack) throw err;
      });
    const { bA, bC, linked, recRow, recCRow, mark, event } = seen as {
      bA: typeof builds.$inferSelect;
      bC: typeof builds.$inferSelect;
      linked: { buildId: string; workOrder: string }[];
      recRow: { buildId: string; title: string };
      recCRow: { buildId: string };
      mark: { buildId: string };
      event: typeof buildEvents.$inferSelect;
    };
    expect(bA).toMatchObject({ customerName: "Customer not recorded", engineSerial: "OLD-1", receivedOn: "2024-02-01", status: "open" });
    expect(bC).toMatchObject({ customerName: "Customer not recorded" });
    // Both spellings of the number land on one build; the text stays as it was typed.
    expect(linked.map((l) => l.buildId)).toEqual([bA.id, bA.id]);
    expect(linked.map((l) => l.workOrder).sort()).toEqual([a, ` ${a.toLowerCase()}`].sort());
    expect(recRow).toEqual({ buildId: bA.id, title: `Stud test (WO ${a})` });
    expect(recCRow.buildId).toBe(bC.id);
    expect(mark.buildId).toBe(bA.id);
    expect(event).toMatchObject({ kind: "linked", detail: { testRecords: 2, recordings: 1 } });
    // Rolled back: nothing of it stays in the shared database.
    expect(await db().select().from(builds).where(eq(builds.number, a))).toEqual([]);
  });

  it("a build is opened, changed, moved forward and reopened with a reason; each step is on its timeline; apprentices only read", async () => {
    const builder = await createUser("builder");
    const apprentice = await createUser("apprentice");
    const number = await openBuild(builder.cookie, { leadBuilderId: builder.id });
    const [b] = await db().select().from(builds).where(eq(builds.number, number));
    expect(b).toMatchObject({
      status: "open",
      boreM: expect.closeTo(0.088, 12),
      boreUnit: "mm",
      boreDecimals: 2,
      strokeDecimals: 1,
      leadBuilderId: builder.id,
    });

    // The same number again is refused on its field.
    const again = await http("/builds/new", { cookie: builder.cookie, form: { number: number.toLowerCase(), ...buildForm() } });
    expect(again.status).toBe(409);
    expect(await again.text()).toContain(`There is already a build ${number}.`);

    const edit = await http(`/builds/${number}/edit`, {
      cookie: builder.cookie,
      form: buildForm({ customerName: "Fernhill Tractor Club (east)", bore: "3.4646", stroke: "3.228", sizeUnit: "in" }),
    });
    expect(edit.status).toBe(302);
    const [edited] = await db().select().from(builds).where(eq(builds.number, number));
    expect(edited).toMatchObject({
      customerName: "Fernhill Tractor Club (east)",
      boreUnit: "in",
      boreDecimals: 4,
      boreM: expect.closeTo(3.4646 * 0.0254, 12),
    });

    for (const to of ["on_bench", "finished", "delivered"]) {
      const res = await http(`/builds/${number}`, { cookie: builder.cookie, form: { intent: "status", to } });
      expect(res.status).toBe(302);
    }
    // Backwards is not a status move…
    const back = await http(`/builds/${number}`, { cookie: builder.cookie, form: { intent: "status", to: "on_bench" } });
    expect(back.status).toBe(409);
    // …it is a reopen, which needs a reason.
    const noReason = await http(`/builds/${number}`, { cookie: builder.cookie, form: { intent: "reopen", reason: "" } });
    expect(noReason.status).toBe(400);
    expect(await noReason.text()).toContain("Say why the build is reopened");
    const reopen = await http(`/builds/${number}`, {
      cookie: builder.cookie,
      form: { intent: "reopen", reason: "Oil pressure low on the customer's dyno" },
    });
    expect(reopen.status).toBe(302);
    const [now] = await db().select().from(builds).where(eq(builds.number, number));
    expect(now).toMatchObject({ status: "on_bench", reopenReason: "Oil pressure low on the customer's dyno", deliveredAt: null });

    const page = await (await http(`/builds/${number}`, { cookie: apprentice.cookie })).text();
    for (const line of ["Opened the build", "Changed the customer, ", "Moved it to Delivered", "Reopened it: Oil pressure low"])
      expect(page).toContain(line);
    expect(page).not.toContain("Move to Finished");
    expect((await http("/builds/new", { cookie: apprentice.cookie, form: { number: uniqueNumber(), ...buildForm() } })).status).toBe(403);
    expect((await http(`/builds/${number}`, { cookie: apprentice.cookie, form: { intent: "status", to: "finished" } })).status).toBe(403);
  });

  it("a build is found by search on its number, customer, serial and engine", async () => {
    const qc = await createUser("qc");
    const serial = `SRCH${randomUUID().slice(0, 6).toUpperCase()}`;
    const number = await openBuild(qc.cookie, {
      engineSerial: serial,
      customerName: "Marlowe Quarry Plant",
      engine: "Twin-cylinder pump engine",
    });
    for (const q of [serial, number, "Marlowe Quarry", "pump engine"]) {
      const hit = await waitFor(async () => {
        const body = (await (await http(`/api/search?q=${encodeURIComponent(q)}`, { cookie: qc.cookie })).json()) as {
          hits: { kind: string; url: string }[];
        };
        return body.hits.find((h) => h.kind === "build" && h.url === `/builds/${number}`);
      }, 30_000);
      expect(hit).toBeTruthy();
    }
    // The search page's "Builds" filter asks for builds alone.
    const only = await http(`/api/search?q=${encodeURIComponent(serial)}&type=build`, { cookie: qc.cookie });
    expect(only.status).toBe(200);
    const kinds = ((await only.json()) as { hits: { kind: string }[] }).hits.map((h) => h.kind);
    expect(kinds.length).toBeGreaterThan(0);
    expect(new Set(kinds)).toEqual(new Set(["build"]));
  });

  it("bad build input is answered on its fields", async () => {
    const qc = await createUser("qc");
    const res = await http("/builds/new", {
      cookie: qc.cookie,
      form: { number: "job 17", ...buildForm({ customerName: "", bore: "eighty", stroke: "-3", receivedOn: "2026-02-30" }) },
    });
    expect(res.status).toBe(400);
    const html = await res.text();
    for (const m of ["Work orders look like LEW-24-0117.", "Name the customer.", "Type the bore as a number", "That day does not exist"])
      expect(html).toContain(m);
    // Sizes and days are checked against each other once every field reads.
    const second = await http("/builds/new", {
      cookie: qc.cookie,
      form: { number: uniqueNumber(), ...buildForm({ stroke: "-3", receivedOn: "2026-11-05", promisedOn: "2026-11-01" }) },
    });
    expect(second.status).toBe(400);
    const html2 = await second.text();
    expect(html2).toContain("Must be more than zero.");
    expect(html2).toContain("Promised for a day before it came in.");
  });

  it("a test record is attached by choosing its build; old clients posting an unknown work order get a 400 naming it", async () => {
    const qc = await createUser("qc");
    const number = await openBuild(qc.cookie);
    const unknown = uniqueNumber();
    const refused = await fileBore(qc.cookie, unknown, "88.006");
    expect(refused.status).toBe(400);
    expect(await refused.text()).toContain(`No build has the work order ${unknown}`);

    const res = await fileBore(qc.cookie, number.toLowerCase(), "88.006");
    expect(res.status).toBe(302);
    const id = /\/test-records\/([0-9a-f-]{36})/.exec(res.headers.get("location") ?? "")![1];
    const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, id));
    const [b] = await db().select().from(builds).where(eq(builds.number, number));
    // The record takes the build's number and, left empty, its serial.
    expect(rec).toMatchObject({ buildId: b.id, workOrder: number, engineSerial: b.engineSerial });

    // The form offers the build in its picker.
    const { slug } = await demoBoreSpec();
    const form = await (await http(`/test-records/new?procedure=${slug}&build=${number}`, { cookie: qc.cookie })).text();
    expect(form).toContain(`<option value="${number}" selected="">`);
  });

  it("the build page puts out-of-spec readings first; the CSV and the API carry every reading with its position", async () => {
    const qc = await createUser("qc");
    const number = await openBuild(qc.cookie);
    expect((await fileBore(qc.cookie, number, "88.006", "1")).status).toBe(302);
    expect((await fileBore(qc.cookie, number, "90.500", "3")).status).toBe(302);

    const html = await (await http(`/builds/${number}`, { cookie: qc.cookie })).text();
    expect(html).toMatch(/data-testid="out-of-spec" data-count="1"/);
    expect(html.indexOf("Out of spec (1)")).toBeLessThan(html.indexOf("Test records</h2>"));

    const csvRes = await http(`/builds/${number}/readings.csv`, { cookie: qc.cookie });
    expect(csvRes.headers.get("content-type")).toContain("text/csv");
    const rows = parse(await csvRes.text(), { columns: true, bom: true });
    const bores = rows.filter((r) => r.reading !== "");
    expect(bores.map((r) => [r.work_order, r.cylinder, r.depth, r.depth_unit, r.angle_deg, r.reading, r.reading_verdict]).sort()).toEqual(
      [
        [number, "1", "10", "mm", "0", "88.006", "within"],
        [number, "3", "10", "mm", "0", "90.5", "above max"],
      ].sort(),
    );

    const api = await http(`/api/builds/${number}`, { cookie: qc.cookie });
    expect(api.status).toBe(200);
    const body = await api.json();
    expect(body).toMatchObject({ number, status: "open", outOfSpec: 1, customer: { name: "Fernhill Tractor Club" } });
    expect(body.engine.bore).toMatchObject({ unit: "mm", decimals: 2, text: "88.00 mm (3.4646 in)" });
    expect(body.testRecords).toHaveLength(2);
    expect(
      body.testRecords
        .flatMap((t: { readings: { position: { cylinder: number } }[] }) => t.readings.map((r) => r.position.cylinder))
        .sort(),
    ).toEqual([1, 3]);

    expect((await http(`/api/builds/${uniqueNumber()}`, { cookie: qc.cookie })).status).toBe(404);
    expect((await http(`/api/builds/${number}`)).status).toBe(401);
  });

  it("the build sheet is a PDF (A4 or Letter) with the engine's serial in its text, and mailing it delivers the PDF and notes it on the build", async () => {
    const qc = await createUser("qc");
    const serial = `SHEET-${randomUUID().slice(0, 6).toUpperCase()}`;
    const number = await openBuild(qc.cookie, { engineSerial: serial });
    expect((await fileBore(qc.cookie, number, "88.006")).status).toBe(302);

    const tmp = fs.mkdtempSync(path.join(os.tmpdir(), "build-sheet-"));
    for (const [paper, points] of [
      ["", "595.28 x 841.89"],
      ["?paper=letter", "612 x 792"],
    ]) {
      const res = await http(`/builds/${number}/sheet.pdf${paper}`, { cookie: qc.cookie });
      expect(res.status).toBe(200);
      expect(res.headers.get("content-type")).toBe("application/pdf");
      const bytes = Buffer.from(await res.arrayBuffer());
      expect(bytes.subarray(0, 5).toString()).toBe("%PDF-");
      const file = path.join(tmp, `sheet${paper ? "-letter" : ""}.pdf`);
      fs.writeFileSync(file, bytes);
      const text = execFileSync("pdftotext", ["-layout", file, "-"]).toString();
      expect(text).toContain(serial);
      expect(text).toContain("Bore check");
      expect(execFileSync("pdfinfo", [file]).toString()).toMatch(new RegExp(`Page size:\\s+${points} pts`));
    }

    const to = `owner-${randomUUID().slice(0, 6)}@fernhill.example`;
    const res = await http(`/builds/${number}`, { cookie: qc.cookie, form: { intent: "mail", to } });
    expect(res.status).toBe(302);
    const msg = await waitFor(async () => (await mailbox(to)).find((m) => m.to.includes(to)), 30_000);
    expect(msg.subject).toContain(number);
    expect(msg.attachments).toHaveLength(1);
    const att = msg.attachments![0];
    expect(att).toMatchObject({ filename: `build-sheet-${number}.pdf`, contentType: "application/pdf" });
    const mailed = path.join(tmp, "mailed.pdf");
    fs.writeFileSync(mailed, Buffer.from(att.contentBase64, "base64"));
    expect(execFileSync("pdftotext", [mailed, "-"]).toString()).toContain(serial);
    const page = await (await http(`/builds/${number}`, { cookie: qc.cookie })).text();
    expect(page).toContain(`Mailed the build sheet to ${to}`);
    fs.rmSync(tmp, { recursive: true, force: true });
  });

  it("the demo builds: LEW-24-0117 delivered with its records and recording, LEW-24-0119 with main 3 out of spec, LEW-24-0118 on the bench", async () => {
    const demo = await db().select().from(builds).where(sql`${builds.number} in ('LEW-24-0117', 'LEW-24-0118', 'LEW-24-0119')`);
    const by = Object.fromEntries(demo.map((b) => [b.number, b]));
    expect(by["LEW-24-0117"]).toMatchObject({ status: "delivered", engineSerial: "LX23-0412" });
    expect(by["LEW-24-0118"]).toMatchObject({ status: "on_bench" });
    const recs = await db().select().from(testRecords).where(eq(testRecords.buildId, by["LEW-24-0117"].id));
    expect(recs.length).toBeGreaterThanOrEqual(3);
    const [rec] = await db().select().from(recordings).where(eq(recordings.buildId, by["LEW-24-0117"].id));
    expect(rec.title).not.toMatch(/LEW-24/);
    const out = await db()
      .select()
      .from(testRecords)
      .where(and(eq(testRecords.buildId, by["LEW-24-0119"].id), eq(testRecords.verdict, "out")));
    expect(out).toHaveLength(1);
    // Its sheet shows the loose main as typed, and the limits in words the PDF's fonts can draw.
    const apprentice = await createUser("apprentice");
    const pdf = Buffer.from(await (await http("/builds/LEW-24-0119/sheet.pdf", { cookie: apprentice.cookie })).arrayBuffer());
    const file = path.join(os.tmpdir(), `sheet-0119-${randomUUID().slice(0, 6)}.pdf`);
    fs.writeFileSync(file, pdf);
    const text = execFileSync("pdftotext", ["-layout", file, "-"]).toString();
    fs.rmSync(file);
    expect(text).toMatch(/journal 3\s+0\.071 mm\s+0\.04 – 0\.065 mm|journal 3\s+0\.071 mm\s+above max/);
  });

  it("the delivered demo build is a full build sheet: every cylinder at the honing depths, a torque per stud, a clearance per main journal, all within spec", async () => {
    const page = (await buildPage("LEW-24-0117"))!;
    expect(page.build).toMatchObject({ status: "delivered", cylinders: 4, mainJournals: 5 });
    expect(sizeText(boreOf(page.build))).toBe("88.00 mm (3.4646 in)");
    expect(sizeText(strokeOf(page.build))).toBe("94.60 mm (3.7244 in)");
    // 4 × π/4 × bore² × stroke is the 2.3 L the engine is called.
    const litres = (4 * (Math.PI / 4) * page.build.boreM! ** 2 * page.build.strokeM! * 1000).toFixed(1);
    expect(page.build.engine).toContain(`${litres} L`);
    expect(page.outOfSpec).toEqual([]);
    expect(page.incomplete).toEqual([]);
    for (const v of page.records) expect(v.evaluation.verdict).toBe("within");
    const readingsOf = (key: string) => page.records.flatMap((v) => v.readings.filter((r) => r.specKey === key));
    // The honing procedure's own words say where each bore is measured.
    const honing = page.records.find((v) => v.procedure.slug === "torque-plate-honing-iron-lined-block")!;
    const [rev] = await db()
      .select({ doc: procedureRevisions.doc })
      .from(procedureRevisions)
      .where(eq(procedureRevisions.id, honing.revision.id));
    let asked = "";
    walk(rev.doc as JSONNode, (n) => {
      if (n.type === "text" && typeof n.text === "string" && /Measure each bore/.test(n.text)) asked = n.text;
    });
    expect(asked).toMatch(/at 10, 50 and 90 mm down at 0°, 45°, 90° and 135°/);
    const places = readingsOf("bore-dia").map((r) => `${r.cylinder}@${Math.round(r.depthM! * 1000)}@${r.angleDeg}`);
    const wanted = [1, 2, 3, 4].flatMap((c) => [10, 50, 90].flatMap((d) => [0, 45, 90, 135].map((a) => `${c}@${d}@${a}`)));
    expect(places.sort()).toEqual(wanted.sort());
    expect(readingsOf("studs-final").map((r) => r.fastener)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
    expect(readingsOf("studs-protrusion").map((r) => r.fastener)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
    expect(readingsOf("main-oil").map((r) => r.journal)).toEqual([1, 2, 3, 4, 5]);
    // Each record against the revision in force.
    for (const v of page.records) {
      const [p] = await db().select().from(procedures).where(eq(procedures.slug, v.procedure.slug));
      expect(p.publishedRevisionId).toBe(v.revision.id);
    }
  });

  it("the delivered build's PDF reads well on A4 and Letter: embedded fonts only, ≤ drawn, headed tables on every page, short records whole, signature lines", async () => {
    const apprentice = await createUser("apprentice");
    const { records } = (await buildPage("LEW-24-0117"))!;
    for (const paper of ["", "?paper=letter"]) {
      const file = path.join(os.tmpdir(), `sheet-0117-${randomUUID().slice(0, 6)}.pdf`);
      fs.writeFileSync(
        file,
        Buffer.from(await (await http(`/builds/LEW-24-0117/sheet.pdf${paper}`, { cookie: apprentice.cookie })).arrayBuffer()),
      );
      try {
        // pdffonts: a header, a rule, then one font a line with its "emb" column; all embedded, no stand-in Helvetica.
        const fonts = execFileSync("pdffonts", [file]).toString().trim().split("\n").slice(2);
        expect(fonts.length).toBeGreaterThan(0);
        for (const font of fonts) expect(font, paper).toMatch(/^\S+\s+CID TrueType\s+Identity-H\s+yes/);
        expect(fonts.join("\n")).not.toContain("Helvetica");
        const text = execFileSync("pdftotext", ["-layout", file, "-"]).toString();
        // The out-of-round limit has no min: "≤ 0.008 mm", never the "d0.008" a non-embedded font drew.
        expect(text).toMatch(/0\.003 mm\s+≤ 0\.008 mm/);
        expect(text).not.toMatch(/\sd0\./);
        const pages = text.split("\f").filter((p) => p.trim());
        expect(pages.length).toBeGreaterThan(1);
        const verdictAtEnd = /\s(within|below min|above max|no limit|left empty)\s*$/;
        for (const [i, p] of pages.entries()) {
          // A page that goes on with a table (a row before any record's title) starts with its header row.
          const lines = p.split("\n").filter((l) => l.trim());
          const row = lines.findIndex((l) => verdictAtEnd.test(l));
          const title = lines.findIndex((l) => records.some((v) => l.includes(v.record.title)));
          if (row >= 0 && (title < 0 || row < title))
            expect(lines[0], `page ${i + 1}${paper}`).toMatch(/^\s*SPEC\s+WHERE\s+READING\s+LIMITS\s+VERDICT/);
        }
        for (const v of records) {
          const at = pages.find((p) => p.includes(v.record.title))!;
          const rows = (at.slice(at.indexOf(v.record.title)).match(new RegExp(verdictAtEnd.source, "gm")) ?? []).length;
          // A record of up to 12 rows is whole on its title's page; a longer one has at least three rows under its title.
          if (v.readings.length <= 12) expect(rows, v.record.title).toBeGreaterThanOrEqual(v.readings.length);
          else expect(rows, v.record.title).toBeGreaterThanOrEqual(3);
        }
        expect(text).toMatch(/Lead builder · Marcus Lind\s+Received by the customer · Wren Valley Rally Club/);
        expect(text.match(/Signature and date/g)).toHaveLength(2);
      } finally {
        fs.rmSync(file, { force: true });
      }
    }
  });

  it("the build's calculators: bore distortion per cylinder and the clamp load of each stud's torque, on the page and the sheet", async () => {
    const page = (await buildPage("LEW-24-0117"))!;
    const distortion = page.calcs.filter((c) => c.kind === "distortion");
    expect(distortion.map((c) => c.label)).toEqual([1, 2, 3, 4].map((c) => `Bore distortion, Bore diameter, plate fitted, cylinder ${c}`));
    const bores = page.records.flatMap((v) => v.readings.filter((r) => r.specKey === "bore-dia"));
    for (const c of distortion) {
      if (!c.ok || c.kind !== "distortion") throw new Error(`${c.label} refused`);
      const cyl = Number(c.label.split(" ").at(-1));
      expect(c.result.levels.map((l) => l.depth_mm)).toEqual([10, 50, 90]);
      for (const l of c.result.levels) {
        // docs/calculations.md (Bore distortion): out-of-round at a depth is max − min diameter;
        // mathjs max/min/subtract on the readings as typed.
        const at = bores.filter((r) => r.cylinder === cyl && Math.round(r.depthM! * 1000) === l.depth_mm).map((r) => r.valueEntered);
        expect(at).toHaveLength(4);
        expect(l.outOfRound_mm).toBeCloseTo(Number(subtract(max(at), min(at))), 9);
      }
    }

    const loads = page.calcs.filter((c) => c.kind === "preload");
    expect(loads).toHaveLength(10);
    const studs = page.records.find((v) => v.procedure.slug === "head-stud-installation-and-torque-sequence")!;
    const torques = studs.readings.filter((r) => r.specKey === "studs-final");
    for (const c of loads) {
      if (!c.ok || c.kind !== "preload") throw new Error(`${c.label} refused`);
      const t = torques.find((r) => `stud ${r.fastener}` === c.where)!;
      expect(c.result.torque_Nm).toBe(t.valueEntered);
      // Nut-factor short form T = K·F·d (VDI 2230 / ISO 16047), K = 0.18 from the procedure's
      // preset, d = 12 mm for M12×1.5: F = T / (0.18 × 0.012 m).
      expect(c.result.preload_N).toBeCloseTo(t.valueEntered / (0.18 * 0.012), 6);
      expect(c.calculator).toBe("M12×1.5 head studs, moly");
    }
    // 110 N·m / (0.18 × 0.012 m) = 50 925.9 N.
    const stud1 = loads.find((c) => c.label.endsWith("stud 1"))!;
    expect(calcSummary(stud1)).toBe(
      "Clamp load, Head stud final torque, stud 1: 110 N·m gives a clamp load of 50.9 kN (M12×1.5 head studs, moly)",
    );

    const apprentice = await createUser("apprentice");
    const html = await (await http("/builds/LEW-24-0117", { cookie: apprentice.cookie })).text();
    expect(html.match(/data-testid="clamp-load"/g)).toHaveLength(10);
    expect(html).toContain("50.93 kN");
    expect(html.match(/data-testid="build-calc"/g)).toHaveLength(4);
    const sheet = await (await http("/builds/LEW-24-0117/sheet", { cookie: apprentice.cookie })).text();
    expect(sheet).toContain("stud 1: 110 N·m gives a clamp load of 50.9 kN");
    const pdf = Buffer.from(await (await http("/builds/LEW-24-0117/sheet.pdf", { cookie: apprentice.cookie })).arrayBuffer());
    const file = path.join(os.tmpdir(), `sheet-0117-${randomUUID().slice(0, 6)}.pdf`);
    fs.writeFileSync(file, pdf);
    const text = execFileSync("pdftotext", [file, "-"]).toString().replace(/\s+/g, " ");
    fs.rmSync(file);
    expect(text).toContain("gives a clamp load of 50.9 kN");
  });

  it("piston-to-wall per cylinder from the tightest bore and the piston measured for it", () => {
    const spec = (id: string, label: string, lo: number | null, hi: number | null) => ({
      id,
      label,
      quantity: "length",
      unit: "mm",
      min: lo,
      max: hi,
      nominal: null,
    });
    const reading = (id: string, specId: string, value: number, cylinder: number) => ({
      id,
      specId,
      valueEntered: value,
      unitEntered: "mm",
      noteText: "",
      cylinder,
    });
    const view = {
      record: { id: "r1" },
      specs: [
        spec("b", "Bore diameter", 87.995, 88.01),
        spec("p", "Piston skirt diameter", null, null),
        spec("c", "Piston-to-wall clearance", 0.06, 0.08),
      ],
      readings: [
        reading("1", "b", 88.006, 1),
        reading("2", "b", 88.004, 1),
        reading("3", "p", 87.934, 1),
        reading("4", "b", 88.007, 2),
        reading("5", "p", 87.95, 2),
      ],
    } as unknown as TestRecordView;
    const ptw = buildCalcs([view]).filter((c) => c.kind === "piston-to-wall");
    expect(ptw.map((c) => c.label)).toEqual(["Piston-to-wall, cylinder 1", "Piston-to-wall, cylinder 2"]);
    const [one, two] = ptw.map((c) => (c.ok && c.kind === "piston-to-wall" ? c.result : null));
    // docs/calculations.md (Clearances): clearance = bore − piston; mathjs subtract on the readings.
    expect(one!.clearance_mm).toBeCloseTo(Number(subtract(88.004, 87.934)), 9);
    expect(one!.verdict).toBe("within");
    expect(two!.clearance_mm).toBeCloseTo(Number(subtract(88.007, 87.95)), 9);
    expect(two!.verdict).toBe("below");
  });
});
