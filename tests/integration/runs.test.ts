// Runs over HTTP: starting pins the revision in force, entries are stored exactly once under
// retried idempotency keys, a newer publish is announced and the pin kept at filing, a run
// with specs left unmeasured files an Incomplete record, and the bad input a tablet or a
// clumsy client can send (ids, values, oversized and non-image photos) is answered 4xx.
// The fixture's bore is measured per cylinder and its torque per stud (positionFieldsForSpec):
// entries carry their place, the latest per spec and place counts, finishing files a reading
// per place, and a cylinder of the engine left unmeasured makes the record Incomplete.
import { execFileSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import {
  builds,
  procedureRevisions,
  procedures,
  procedureSpecs,
  runEntries,
  runs,
  testRecordAmendments,
  testRecordMissingPlaces,
  testRecordReadings,
  testRecords,
} from "~/db/schema";
import { db } from "~/lib/db.server";
import { getRun, listRunPhotos, listRunsForBuild, photosForTestRecord } from "~/lib/runs/runs.server";
import { createUser, http, type TestUser } from "../support/app";
import { parse } from "../support/csv";

const t = (text: string) => ({ type: "text", text });
const p = (text: string) => ({ type: "paragraph", content: [t(text)] });
const specNode = (id: string, label: string, unit: string, quantity: string, nominal: number, min: number, max: number) => ({
  type: "spec",
  attrs: { id, label, quantity, unit, nominal, min, max, note: "" },
});
const DOC = {
  type: "doc",
  content: [
    { type: "caution", content: [p("Planning figures: the makers' values take precedence.")] },
    { type: "heading", attrs: { level: 2 }, content: [t("Steps")] },
    {
      type: "orderedList",
      attrs: { start: 1 },
      content: [
        { type: "listItem", content: [p("Measure the bore at the top of the ring travel.")] },
        { type: "listItem", content: [p("Torque the stud to its final value.")] },
      ],
    },
    specNode("bore", "Bore diameter", "mm", "length", 88.006, 88.0, 88.012),
    specNode("final", "Stud final torque", "N.m", "torque", 110, 105, 115),
  ],
};
const SPECS = [
  { specKey: "bore", label: "Bore diameter", quantity: "length", unit: "mm", nominal: 88.006, min: 88.0, max: 88.012, siUnit: "m" },
  { specKey: "final", label: "Stud final torque", quantity: "torque", unit: "N.m", nominal: 110, min: 105, max: 115, siUnit: "N.m" },
];

async function publishRevision(procedureId: string, number: number, title: string) {
  const [rev] = await db()
    .insert(procedureRevisions)
    .values({ procedureId, number, state: "published", title, area: "block", doc: DOC, publishedAt: new Date() })
    .returning();
  await db()
    .insert(procedureSpecs)
    .values(SPECS.map((s, i) => ({ ...s, revisionId: rev.id, procedureId, position: i })));
  return rev;
}

async function fixture(counts: { cylinders?: number; mainJournals?: number } = {}) {
  const tag = randomUUID().slice(0, 8);
  const [proc] = await db()
    .insert(procedures)
    .values({ slug: `run-check-${tag}`, title: `Run check ${tag}`, area: "block" })
    .returning();
  const rev = await publishRevision(proc.id, 1, proc.title);
  await db().update(procedures).set({ publishedRevisionId: rev.id, publishedAt: new Date() }).where(eq(procedures.id, proc.id));
  const number = `RUN-26-${String(Math.floor(Math.random() * 90000) + 10000)}`;
  const [build] = await db()
    .insert(builds)
    .values({ number, customerName: "Test customer", engine: "Test four", engineSerial: `SN-${tag}`, status: "on_bench", ...counts })
    .returning();
  return { proc, rev, build };
}

async function startRun(user: TestUser, slug: string, build: string): Promise<string> {
  const res = await http("/runs/start", { cookie: user.cookie, form: { procedure: slug, build } });
  expect(res.status).toBe(302);
  const id = /\/runs\/([0-9a-f-]{36})$/.exec(res.headers.get("location") ?? "")?.[1];
  if (!id) throw new Error(`no run started (${res.status})`);
  return id;
}

/** Where the fixture's specs are measured unless a test says otherwise: the bore per cylinder, the torque per stud. */
const FIRST_PLACE: Record<string, Record<string, number>> = { bore: { cylinder: 1 }, final: { fastener: 1 } };

const entry = (specKey: string, value: number | null, unit: string, extra: Record<string, unknown> = {}) => ({
  key: randomUUID(),
  specKey,
  position: FIRST_PLACE[specKey],
  value,
  unit,
  decimals: value == null ? null : 3,
  typedAt: new Date().toISOString(),
  device: "test tablet",
  ...extra,
});

/** A real picture, 8 × 6 grey pixels, as ffmpeg writes a PNG (the build sheet's PDF decodes it). */
const grayPng = () =>
  execFileSync("/usr/bin/ffmpeg", [
    "-v",
    "error",
    "-f",
    "lavfi",
    "-i",
    "color=c=gray:s=8x6",
    "-frames:v",
    "1",
    "-f",
    "image2pipe",
    "-vcodec",
    "png",
    "-",
  ]);

const post = (user: TestUser, runId: string, json: unknown) =>
  http(`/api/runs/${runId}/entries`, { method: "POST", cookie: user.cookie, json });

describe("runs", () => {
  let builder: TestUser;
  let apprentice: TestUser;
  beforeAll(async () => {
    builder = await createUser("builder");
    apprentice = await createUser("apprentice");
  });

  it("stores each entry exactly once however often its key is sent again", async () => {
    const { proc, build } = await fixture();
    const runId = await startRun(builder, proc.slug, build.number);
    const bore = entry("bore", 88.006, "mm");
    const torque = entry("final", 110, "N.m");
    // The first send, then the same batch three more times (the answer lost on the way back), then in another order.
    const first = await post(builder, runId, { entries: [bore, torque] });
    expect(first.status).toBe(200);
    expect(((await first.json()) as { saved: { duplicate: boolean }[] }).saved.map((s) => s.duplicate)).toEqual([false, false]);
    const again = await Promise.all([1, 2, 3].map(() => post(builder, runId, { entries: [bore, torque] })));
    for (const r of again) {
      expect(r.status).toBe(200);
      expect(((await r.json()) as { saved: { duplicate: boolean }[] }).saved.every((s) => s.duplicate)).toBe(true);
    }
    expect((await post(builder, runId, { entries: [torque, bore] })).status).toBe(200);
    const rows = await db().select().from(runEntries).where(eq(runEntries.runId, runId));
    expect(rows).toHaveLength(2);
    expect(rows.find((r) => r.specKey === "bore")?.valueDecimals).toBe(3);

    // The same key with a different value is the device's mistake, never an overwrite.
    const misuse = await post(builder, runId, { entries: [{ ...bore, value: 88.01 }] });
    expect(misuse.status).toBe(409);
    expect((await db().select().from(runEntries).where(eq(runEntries.runId, runId))).length).toBe(2);

    // The build page's list shows the progress: both specs measured.
    const listed = (await listRunsForBuild(build.id)).find((r) => r.id === runId);
    expect(listed).toMatchObject({ status: "open", measured: 2, total: 2 });
  });

  it("keeps the later typing as the value, whenever it arrives, and remembers the step for another device", async () => {
    const { proc, build } = await fixture();
    const runId = await startRun(builder, proc.slug, build.number);
    const late = entry("bore", 88.011, "mm", { typedAt: "2026-01-01T10:00:05.000Z" });
    const early = entry("bore", 88.004, "mm", { typedAt: "2026-01-01T10:00:01.000Z" });
    // The later typing was sent first (the other device was offline); the earlier one arrives after it.
    expect((await post(builder, runId, { entries: [late] })).status).toBe(200);
    expect((await post(builder, runId, { entries: [early], step: 1 })).status).toBe(200);
    const page = await http(`/runs/${runId}`, { cookie: apprentice.cookie });
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toContain("88.011");
    const [run] = await db().select().from(runs).where(eq(runs.id, runId));
    expect(run.currentStep).toBe(1);
  });

  it("keeps its pin when a newer revision is published, says so, and files against the pinned revision", async () => {
    const { proc, rev, build } = await fixture();
    const runId = await startRun(builder, proc.slug, build.number);
    expect((await post(builder, runId, { entries: [entry("bore", 88.006, "mm"), entry("final", 110, "N.m")] })).status).toBe(200);

    await db().update(procedureRevisions).set({ state: "superseded", supersededAt: new Date() }).where(eq(procedureRevisions.id, rev.id));
    const rev2 = await publishRevision(proc.id, 2, proc.title);
    await db().update(procedures).set({ publishedRevisionId: rev2.id, publishedAt: new Date() }).where(eq(procedures.id, proc.id));

    const page = await http(`/runs/${runId}`, { cookie: builder.cookie });
    expect(await page.text()).toContain("Revision 2 of this procedure was published after this run began");

    const done = await http(`/runs/${runId}`, {
      cookie: builder.cookie,
      form: { intent: "finish", notes: "Plate on.", "studs.final": "1" },
    });
    expect(done.status).toBe(302);
    const recordId = /\/test-records\/([0-9a-f-]{36})/.exec(done.headers.get("location") ?? "")?.[1];
    expect(recordId).toBeTruthy();
    const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, recordId!));
    expect(rec).toMatchObject({ revisionId: rev.id, verdict: "within", buildId: build.id, workOrder: build.number, notes: "Plate on." });
    const [run] = await db().select().from(runs).where(eq(runs.id, runId));
    expect(run).toMatchObject({ status: "finished", testRecordId: recordId });

    // Finished: no more entries, and finishing twice files nothing twice.
    expect((await post(builder, runId, { entries: [entry("bore", 88.0, "mm")] })).status).toBe(409);
    expect((await http(`/runs/${runId}`, { cookie: builder.cookie, form: { intent: "finish" } })).status).toBe(409);
    expect(await db().select().from(testRecords).where(eq(testRecords.buildId, build.id))).toHaveLength(1);
  });

  it("files a run with a spec left unmeasured (or cleared again) as Incomplete, never Within spec", async () => {
    const { proc, build } = await fixture();
    const runId = await startRun(builder, proc.slug, build.number);
    const typed = entry("final", 110, "N.m", { typedAt: "2026-01-01T10:00:00.000Z" });
    const cleared = entry("bore", 88.006, "mm", { typedAt: "2026-01-01T10:00:00.000Z" });
    const clear = entry("bore", null, "mm", { typedAt: "2026-01-01T10:00:09.000Z" });
    expect((await post(builder, runId, { entries: [typed, cleared, clear] })).status).toBe(200);
    const done = await http(`/runs/${runId}`, { cookie: builder.cookie, form: { intent: "finish", "studs.final": "1" } });
    expect(done.status).toBe(302);
    const recordId = /\/test-records\/([0-9a-f-]{36})/.exec(done.headers.get("location") ?? "")?.[1];
    const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, recordId!));
    expect(rec.verdict).toBe("incomplete");
    const readings = await db().select().from(testRecordReadings).where(eq(testRecordReadings.recordId, rec.id));
    expect(readings.map((r) => r.specKey)).toEqual(["final"]);
  });

  it("refuses to file a run with nothing measured, and an abandoned run takes no entries", async () => {
    const { proc, build } = await fixture();
    const runId = await startRun(builder, proc.slug, build.number);
    expect((await http(`/runs/${runId}`, { cookie: builder.cookie, form: { intent: "finish" } })).status).toBe(400);
    expect((await http(`/runs/${runId}`, { cookie: builder.cookie, form: { intent: "abandon", reason: "" } })).status).toBe(400);
    expect((await http(`/runs/${runId}`, { cookie: builder.cookie, form: { intent: "abandon", reason: "Wrong build" } })).status).toBe(302);
    const refused = await post(builder, runId, { entries: [entry("bore", 88.0, "mm")] });
    expect(refused.status).toBe(409);
    expect(((await refused.json()) as { reason: string }).reason).toMatch(/abandoned/);
  });

  it("lets apprentices read a run but not work it, and refuses a delivered build", async () => {
    const { proc, build } = await fixture();
    const runId = await startRun(builder, proc.slug, build.number);
    expect((await http(`/runs/${runId}`, { cookie: apprentice.cookie })).status).toBe(200);
    const refused = await post(apprentice, runId, { entries: [entry("bore", 88.0, "mm")] });
    expect(refused.status).toBe(403);
    expect(((await refused.json()) as { reason: string }).reason).toMatch(/work procedures step by step/);
    expect((await http("/runs/start", { cookie: apprentice.cookie, form: { procedure: proc.slug, build: build.number } })).status).toBe(
      403,
    );
    await db().update(builds).set({ status: "delivered" }).where(eq(builds.id, build.id));
    const delivered = await http("/runs/start", { cookie: builder.cookie, form: { procedure: proc.slug, build: build.number } });
    expect(delivered.status).toBe(409);
  });

  it("answers bad ids, values and bodies with a 4xx naming the problem", async () => {
    const { proc, build } = await fixture();
    const runId = await startRun(builder, proc.slug, build.number);
    expect((await post(builder, "not-a-run", { entries: [entry("bore", 88, "mm")] })).status).toBe(404);
    expect((await post(builder, randomUUID(), { entries: [entry("bore", 88, "mm")] })).status).toBe(404);
    const cases: [unknown, number, string][] = [
      [{ entries: [entry("nope", 88, "mm")] }, 422, "entries.0.specKey"],
      [{ entries: [entry("bore", 110, "N.m")] }, 422, "entries.0.unit"],
      [{ entries: [entry("bore", 1e300, "mm")] }, 422, "entries.0.value"],
      [{ entries: [entry("bore", 88, "furlong")] }, 422, "entries.0.unit"],
      [{ entries: [entry("bore", 88, "mm", { key: "x" })] }, 422, "entries.0.key"],
      [{ entries: [entry("bore", 88, "mm", { typedAt: "yesterday" })] }, 422, "entries.0.typedAt"],
      [{ entries: [{ ...entry("bore", 88, "mm"), value: "88" }] }, 422, "entries.0.value"],
      [{ entries: "all of them" }, 422, "entries"],
      [{}, 422, "entries"],
    ];
    for (const [body, status, where] of cases) {
      const res = await post(builder, runId, body);
      expect(res.status, JSON.stringify(body)).toBe(status);
      const out = (await res.json()) as { issues?: { path: string }[] };
      if (out.issues) expect(out.issues.map((i) => i.path)).toContain(where);
    }
    const same = entry("bore", 88, "mm");
    expect((await post(builder, runId, { entries: [same, same] })).status).toBe(422);
    expect(await db().select().from(runEntries).where(eq(runEntries.runId, runId))).toHaveLength(0);
    expect(
      (await http("/runs/start", { cookie: builder.cookie, form: { procedure: "no-such-procedure", build: build.number } })).status,
    ).toBe(422);
    expect((await http("/runs/start", { cookie: builder.cookie, form: { procedure: proc.slug, build: "NO-00-0000" } })).status).toBe(422);
  });

  it("keeps a camera photo with an entry, refusing files that are not pictures and pictures too large", async () => {
    const { proc, build } = await fixture();
    const runId = await startRun(builder, proc.slug, build.number);
    const png = grayPng();
    const send = (specKey: string, bytes: Uint8Array<ArrayBuffer>, name: string, type: string) => {
      const form = new FormData();
      form.set("specKey", specKey);
      form.set("cylinder", "1");
      form.set("photo", new File([new Uint8Array(bytes)], name, { type }));
      return http(`/api/runs/${runId}/photos`, { method: "POST", cookie: builder.cookie, body: form });
    };
    const ok = await send("bore", png, "gauge.png", "image/png");
    expect(ok.status).toBe(201);
    const { url } = (await ok.json()) as { url: string };
    const img = await http(url, { cookie: apprentice.cookie });
    expect(img.status).toBe(200);
    expect(img.headers.get("content-type")).toBe("image/png");
    expect(Buffer.from(await img.arrayBuffer()).equals(png)).toBe(true);

    // A script named like a photo and sent as one is still not a photo.
    expect((await send("bore", new TextEncoder().encode("<script>alert(1)</script>"), "gauge.jpg", "image/jpeg")).status).toBe(415);
    expect((await send("bore", new Uint8Array(0), "empty.jpg", "image/jpeg")).status).toBe(422);
    expect((await send("nope", png, "gauge.png", "image/png")).status).toBe(422);
    // Past the photo limit (12 MB) but inside the route's body limit: the reason comes back as JSON.
    const big = new Uint8Array(12.5 * 1024 * 1024);
    big.set(png);
    const tooBig = await send("bore", big, "huge.png", "image/png");
    expect(tooBig.status).toBe(413);
    expect(((await tooBig.json()) as { reason: string }).reason).toMatch(/up to 12 MB/);

    const photos = await listRunPhotos(runId);
    expect(photos.map((p) => [p.specKey, p.specLabel, p.where])).toEqual([["bore", "Bore diameter", "cyl 1"]]);
    // Once the run files its record, the record's photos are the run's.
    expect((await post(builder, runId, { entries: [entry("bore", 88.006, "mm")] })).status).toBe(200);
    const done = await http(`/runs/${runId}`, { cookie: builder.cookie, form: { intent: "finish", "studs.final": "1" } });
    const recordId = /\/test-records\/([0-9a-f-]{36})/.exec(done.headers.get("location") ?? "")?.[1];
    expect((await photosForTestRecord(recordId!)).map((p) => p.id)).toEqual(photos.map((p) => p.id));
    const recordPage = await http(`/test-records/${recordId}`, { cookie: apprentice.cookie });
    expect(await recordPage.text()).toContain(`src="${url}"`);
    const buildPage = await http(`/builds/${build.number}`, { cookie: apprentice.cookie });
    expect(await buildPage.text()).toContain(`src="${url}"`);
    // The build sheet shows it too: the print view by its address, the PDF as a picture of its own.
    const sheet = await http(`/builds/${build.number}/sheet`, { cookie: apprentice.cookie });
    expect(await sheet.text()).toContain(`src="${url}"`);
    const pdf = await http(`/builds/${build.number}/sheet.pdf`, { cookie: apprentice.cookie });
    expect(pdf.status).toBe(200);
    const file = path.join(os.tmpdir(), `run-photo-sheet-${randomUUID()}.pdf`);
    fs.writeFileSync(file, Buffer.from(await pdf.arrayBuffer()));
    try {
      expect(execFileSync("pdftotext", ["-layout", file, "-"]).toString()).toMatch(/Photos taken at the bench[\s\S]*Bore diameter/);
      // pdfimages (poppler) lists the pictures a PDF holds, a header and a rule first, then a row
      // each: page, num, type, width, height… (transparency would be a row of type "smask").
      const rows = execFileSync("pdfimages", ["-list", file]).toString().trim().split("\n").slice(2);
      const images = rows.map((l) => l.trim().split(/\s+/)).filter((c) => c[2] === "image");
      expect(images.map((c) => [c[3], c[4]])).toEqual([["8", "6"]]);
    } finally {
      fs.rmSync(file, { force: true });
    }
  });

  it("lets several runs be open on one build at once", async () => {
    const { proc, build } = await fixture();
    const other = await createUser("qc");
    const a = await startRun(builder, proc.slug, build.number);
    const b = await startRun(other, proc.slug, build.number);
    expect((await post(other, b, { entries: [entry("final", 112, "N.m")] })).status).toBe(200);
    const listed = await listRunsForBuild(build.id);
    expect(listed.map((r) => [r.id, r.measured]).sort()).toEqual(
      [
        [a, 0],
        [b, 1],
      ].sort(),
    );
    const rows = await db()
      .select()
      .from(runs)
      .where(and(eq(runs.buildId, build.id), eq(runs.status, "open")));
    expect(rows).toHaveLength(2);
    // The build page shows each one's progress.
    const page = await (await http(`/builds/${build.number}`, { cookie: apprentice.cookie })).text();
    expect(page).toContain(`href="/runs/${a}"`);
    expect(page).toContain(`href="/runs/${b}"`);
    expect(page.match(/data-testid="run-row-progress">(\d+)(?:<!-- -->)? of (?:<!-- -->)?(\d+)/g)?.length).toBe(2);
  });

  it("stores per-cylinder and per-stud entries exactly once under retries, and keeps the latest at each place", async () => {
    const { proc, build } = await fixture({ cylinders: 4 });
    const runId = await startRun(builder, proc.slug, build.number);
    const at = (specKey: string, place: Record<string, number>, value: number | null, unit: string, typedAt: string) =>
      entry(specKey, value, unit, { position: place, typedAt });
    const batch = [
      at("bore", { cylinder: 1 }, 88.004, "mm", "2026-01-01T10:00:01.000Z"),
      at("bore", { cylinder: 2 }, 88.011, "mm", "2026-01-01T10:00:02.000Z"),
      at("bore", { cylinder: 3 }, 88.006, "mm", "2026-01-01T10:00:03.000Z"),
      at("final", { fastener: 1 }, 110, "N.m", "2026-01-01T10:00:04.000Z"),
      at("final", { fastener: 2 }, 111, "N.m", "2026-01-01T10:00:05.000Z"),
    ];
    // The same batch four times at once and once more (answers lost on the way back).
    const sends = await Promise.all([1, 2, 3, 4].map(() => post(builder, runId, { entries: batch })));
    for (const r of sends) expect(r.status).toBe(200);
    expect((await post(builder, runId, { entries: [...batch].reverse() })).status).toBe(200);
    expect(await db().select().from(runEntries).where(eq(runEntries.runId, runId))).toHaveLength(5);
    // The same key at another place is the device's mistake, not a new entry.
    expect((await post(builder, runId, { entries: [{ ...batch[0], position: { cylinder: 2 } }] })).status).toBe(409);

    // Cylinder 2 retyped later; an earlier typing of cylinder 3 arriving late does not replace its value.
    const retyped = at("bore", { cylinder: 2 }, 88.007, "mm", "2026-01-01T10:01:00.000Z");
    const stale = at("bore", { cylinder: 3 }, 88.002, "mm", "2026-01-01T09:59:00.000Z");
    expect((await post(builder, runId, { entries: [retyped, stale] })).status).toBe(200);
    const view = await getRun(runId);
    expect(view?.values["bore@cylinder1"]?.value).toBe(88.004);
    expect(view?.values["bore@cylinder2"]?.value).toBe(88.007);
    expect(view?.values["bore@cylinder3"]?.value).toBe(88.006);
    expect(view?.values["final@fastener2"]?.value).toBe(111);
    // Places, counted by hand: cylinders 1–3 of the engine's 4, studs 1–2 of 2 typed → 5 of 6.
    expect(view?.progress).toEqual({ measured: 5, total: 6 });
    expect(view?.specs.map((sp) => [sp.key, sp.field, sp.offered])).toEqual([
      ["bore", "cylinder", [1, 2, 3, 4]],
      ["final", "fastener", [1, 2]],
    ]);
    expect((await listRunsForBuild(build.id)).find((r) => r.id === runId)).toMatchObject({ measured: 5, total: 6 });
  });

  it("files a reading per cylinder and stud, Incomplete while a cylinder of the engine is missing, and the build shows each place", async () => {
    const { proc, build } = await fixture({ cylinders: 4 });
    const first = await startRun(builder, proc.slug, build.number);
    const bores = [88.004, 88.006, null, 88.008];
    const entries = [
      ...bores.flatMap((v, i) => (v == null ? [] : [entry("bore", v, "mm", { position: { cylinder: i + 1 } })])),
      entry("final", 110, "N.m", { position: { fastener: 1 } }),
      entry("final", 109, "N.m", { position: { fastener: 2 } }),
    ];
    expect((await post(builder, first, { entries })).status).toBe(200);
    const done = await http(`/runs/${first}`, { cookie: builder.cookie, form: { intent: "finish", "studs.final": "2" } });
    expect(done.status).toBe(302);
    const recordId = /\/test-records\/([0-9a-f-]{36})/.exec(done.headers.get("location") ?? "")?.[1];
    const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, recordId!));
    // Every value is within its limits, but cylinder 3 was never measured.
    expect(rec.verdict).toBe("incomplete");
    const empty = await db().select().from(testRecordMissingPlaces).where(eq(testRecordMissingPlaces.recordId, rec.id));
    expect(empty.map((m) => [m.version, m.specKey, m.cylinder])).toEqual([[0, "bore", 3]]);
    // The record's page says so too, though every spec has readings.
    const recordPage = await (await http(`/test-records/${recordId}`, { cookie: apprentice.cookie })).text();
    expect(recordPage).toContain('data-verdict="incomplete"');
    expect(recordPage).not.toContain('data-verdict="within"');
    const readings = await db().select().from(testRecordReadings).where(eq(testRecordReadings.recordId, rec.id));
    const placed = readings.map((r) => [r.specKey, r.cylinder, r.fastener, r.valueEntered]).sort();
    expect(placed).toEqual(
      [
        ["bore", 1, null, 88.004],
        ["bore", 2, null, 88.006],
        ["bore", 4, null, 88.008],
        ["final", null, 1, 110],
        ["final", null, 2, 109],
      ].sort(),
    );

    // A second run measures all four: Within spec.
    const second = await startRun(builder, proc.slug, build.number);
    const all = [88.004, 88.006, 88.005, 88.008].map((v, i) => entry("bore", v, "mm", { position: { cylinder: i + 1 } }));
    expect((await post(builder, second, { entries: [...all, entry("final", 110, "N.m", { position: { fastener: 1 } })] })).status).toBe(
      200,
    );
    const done2 = await http(`/runs/${second}`, { cookie: builder.cookie, form: { intent: "finish", "studs.final": "1" } });
    const record2 = /\/test-records\/([0-9a-f-]{36})/.exec(done2.headers.get("location") ?? "")?.[1];
    const [rec2] = await db().select().from(testRecords).where(eq(testRecords.id, record2!));
    expect(rec2.verdict).toBe("within");

    // The build page and its sheet say where each reading was taken, beside its spec.
    for (const where of [`/builds/${build.number}`, `/builds/${build.number}/sheet`]) {
      const html = await (await http(where, { cookie: apprentice.cookie })).text();
      for (const words of ["cyl 1", "cyl 3", "cyl 4", "stud 2"]) expect(html, `${where}: ${words}`).toContain(words);
    }
    const pdf = await http(`/builds/${build.number}/sheet.pdf`, { cookie: apprentice.cookie });
    const file = path.join(os.tmpdir(), `run-places-${randomUUID()}.pdf`);
    fs.writeFileSync(file, Buffer.from(await pdf.arrayBuffer()));
    try {
      const text = execFileSync("pdftotext", ["-layout", file, "-"]).toString();
      expect(text).toMatch(/cyl 4/);
      expect(text).toMatch(/stud 2/);
    } finally {
      fs.rmSync(file, { force: true });
    }
  });

  it("keeps a place a run left empty with the record: amending another value stays Incomplete, filling it reads Within spec", async () => {
    const { proc, rev, build } = await fixture({ cylinders: 4 });
    const runId = await startRun(builder, proc.slug, build.number);
    const entries = [
      ...[1, 2, 4].map((c) => entry("bore", 88.004 + c / 1000, "mm", { position: { cylinder: c } })),
      entry("final", 110, "N.m", { position: { fastener: 1 } }),
      entry("final", 109, "N.m", { position: { fastener: 2 } }),
    ];
    expect((await post(builder, runId, { entries })).status).toBe(200);
    const done = await http(`/runs/${runId}`, { cookie: builder.cookie, form: { intent: "finish", "studs.final": "2" } });
    const id = /\/test-records\/([0-9a-f-]{36})/.exec(done.headers.get("location") ?? "")?.[1] ?? "";
    const words = async (where: string, user: TestUser = apprentice) =>
      (await (await http(where, { cookie: user.cookie })).text())
        .replaceAll("<!-- -->", "")
        .replace(/<[^>]+>/g, " ")
        .replace(/\s+/g, " ");
    expect(await words(`/test-records/${id}`)).toContain("Incomplete: 1 place not measured");
    expect(await words(`/test-records/${id}`)).toContain("Left empty on the run: Bore diameter: Cyl 3.");
    // Its spec's tag says within so far, never plainly "Within spec", beside the empty place (the record page, the build page, the sheet).
    for (const where of [`/test-records/${id}`, `/builds/${build.number}`, `/builds/${build.number}/sheet`])
      expect(await words(where), where).toContain("Bore diameter Within spec so far; 1 place not measured");

    const qc = await createUser("qc");
    const specs = await db().select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, rev.id));
    const bore = specs.find((s) => s.specKey === "bore")!.id;
    const torque = specs.find((s) => s.specKey === "final")!.id;
    // The amend form offers cylinder 3 as an empty row between cylinders 2 and 4.
    const form = await (await http(`/test-records/${id}/amend`, { cookie: qc.cookie })).text();
    expect(form).toMatch(new RegExp(`name="r\\.${bore}\\.2\\.cylinder"[^>]*value="3"`));
    expect(form).toMatch(new RegExp(`name="r\\.${bore}\\.2\\.value"[^>]*value=""`));
    expect(form).toMatch(new RegExp(`name="r\\.${bore}\\.3\\.cylinder"[^>]*value="4"`));
    const [filed] = await db().select().from(testRecords).where(eq(testRecords.id, id));
    const amend = (reason: string, bores: [number, string][], stud2: string) =>
      http(`/test-records/${id}/amend`, {
        cookie: qc.cookie,
        form: {
          reason,
          title: filed.title,
          engineSerial: filed.engineSerial,
          testedOn: filed.testedOn,
          notes: filed.notes,
          ...Object.fromEntries(
            bores.flatMap(([c, v], i) => [
              [`r.${bore}.${i}.value`, v],
              [`r.${bore}.${i}.unit`, "mm"],
              [`r.${bore}.${i}.cylinder`, String(c)],
            ]),
          ),
          [`r.${torque}.0.value`]: "110",
          [`r.${torque}.0.unit`]: "N.m",
          [`r.${torque}.0.fastener`]: "1",
          [`r.${torque}.1.value`]: stud2,
          [`r.${torque}.1.unit`]: "N.m",
          [`r.${torque}.1.fastener`]: "2",
        },
      });
    const three: [number, string][] = [
      [1, "88.005"],
      [2, "88.006"],
      [4, "88.008"],
    ];
    // Amending another value: the place is still empty, so the record stays Incomplete.
    expect((await amend("stud 2 re-read on the wrench's display", three, "108")).status).toBe(302);
    const [once] = await db().select().from(testRecords).where(eq(testRecords.id, id));
    expect([once.currentVersion, once.verdict]).toEqual([1, "incomplete"]);
    const kept = await db().select().from(testRecordMissingPlaces).where(eq(testRecordMissingPlaces.recordId, id));
    expect(kept.map((m) => [m.version, m.cylinder]).sort()).toEqual([
      [0, 3],
      [1, 3],
    ]);
    expect(await words(`/test-records/${id}`)).toContain("Incomplete: 1 place not measured");
    expect(await words(`/test-records?workOrder=${build.number}`)).toContain("Incomplete: 1 place not measured");
    const buildWords = await words(`/builds/${build.number}`);
    expect(buildWords).toContain("Left empty on the run: Bore diameter: Cyl 3.");
    expect(buildWords).toContain("cyl 3, left empty on the run");
    expect(await words(`/builds/${build.number}/sheet`)).toContain("cyl 3, left empty on the run");
    const csv = parse(await (await http(`/builds/${build.number}/readings.csv`, { cookie: apprentice.cookie })).text(), {
      columns: true,
      bom: true,
    });
    expect(csv.filter((r) => r.reading_verdict === "Not measured").map((r) => [r.spec, r.cylinder, r.note])).toEqual([
      ["Bore diameter", "3", "left empty on the run"],
    ]);
    const recordsCsv = parse(await (await http(`/test-records/export.csv?workOrder=${build.number}`, { cookie: qc.cookie })).text(), {
      columns: true,
      bom: true,
    });
    expect(recordsCsv.filter((r) => r.reading_verdict === "not measured").map((r) => [r.spec, r.reading_note])).toEqual([
      ["Bore diameter", "Cyl 3"],
    ]);
    const api = await (await http(`/api/builds/${build.number}`, { cookie: apprentice.cookie })).json();
    expect(api.incomplete).toBe(1);
    expect(api.testRecords[0]).toMatchObject({
      verdict: "incomplete",
      notMeasured: [],
      placesNotMeasured: [{ spec: "Bore diameter", place: "Cyl 3", position: { cylinder: 3, fastener: null, journal: null } }],
    });
    const pdf = path.join(os.tmpdir(), `left-empty-${randomUUID()}.pdf`);
    fs.writeFileSync(
      pdf,
      Buffer.from(await (await http(`/builds/${build.number}/sheet.pdf`, { cookie: apprentice.cookie })).arrayBuffer()),
    );
    try {
      const text = execFileSync("pdftotext", ["-layout", pdf, "-"]).toString();
      expect(text).toContain("Incomplete: 1 place not measured");
      expect(text).toMatch(/cyl 3\s+not measured\s+left empty/);
      const plain = execFileSync("pdftotext", [pdf, "-"]).toString().replace(/\s+/g, " ");
      expect(plain).toContain("Within spec so far; 1 place not measured");
    } finally {
      fs.rmSync(pdf, { force: true });
    }

    // Typing cylinder 3 fills the place: Within spec, and nothing is carried forward.
    const four: [number, string][] = [...three.slice(0, 2), [3, "88.007"], three[2]];
    expect((await amend("cylinder 3 measured after the plate came off", four, "108")).status).toBe(302);
    const [twice] = await db().select().from(testRecords).where(eq(testRecords.id, id));
    expect([twice.currentVersion, twice.verdict]).toEqual([2, "within"]);
    const after = await db().select().from(testRecordMissingPlaces).where(eq(testRecordMissingPlaces.recordId, id));
    expect(after.filter((m) => m.version === 2)).toEqual([]);
    const amendments = await db().select().from(testRecordAmendments).where(eq(testRecordAmendments.recordId, id));
    expect(amendments.map((a) => [a.version, a.verdictBefore, a.verdictAfter]).sort()).toEqual([
      [1, "incomplete", "incomplete"],
      [2, "incomplete", "within"],
    ]);
    expect(await words(`/test-records/${id}`)).not.toContain("left empty on the run");
    // The version as first filed still says what it lacked.
    expect(await words(`/test-records/${id}?v=0`)).toContain("Incomplete: 1 place not measured");
    const api2 = await (await http(`/api/builds/${build.number}`, { cookie: apprentice.cookie })).json();
    expect(api2.testRecords[0]).toMatchObject({ verdict: "within", placesNotMeasured: [] });
  });

  it("asks how many studs a per-stud spec covers before finishing, and files the studs never torqued as missing places", async () => {
    const { proc, build } = await fixture();
    const finish = (runId: string, studs?: string) =>
      http(`/runs/${runId}`, { cookie: builder.cookie, form: { intent: "finish", ...(studs == null ? {} : { "studs.final": studs }) } });
    const torqued = (n: number) => Array.from({ length: n }, (_, i) => entry("final", 110, "N.m", { position: { fastener: i + 1 } }));
    const bores = [1, 2, 3, 4].map((c) => entry("bore", 88.006, "mm", { position: { cylinder: c } }));

    // A head of ten studs, torqued 1–6: every value within, four studs never touched.
    const runId = await startRun(builder, proc.slug, build.number);
    expect((await post(builder, runId, { entries: [...bores, ...torqued(6)] })).status).toBe(200);
    const unanswered = await finish(runId);
    expect(unanswered.status).toBe(400);
    expect(await unanswered.text()).toContain("How many studs does “Stud final torque” cover? Enter the number before finishing.");
    const fewer = await finish(runId, "4");
    expect(fewer.status).toBe(400);
    expect(await fewer.text()).toContain("has a value at stud 6: it covers at least 6 studs.");
    expect((await finish(runId, "ten")).status).toBe(400);
    expect(await db().select().from(testRecords).where(eq(testRecords.buildId, build.id))).toHaveLength(0);

    const done = await finish(runId, "10");
    expect(done.status).toBe(302);
    const recordId = /\/test-records\/([0-9a-f-]{36})/.exec(done.headers.get("location") ?? "")?.[1] as string;
    const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, recordId));
    expect(rec.verdict).toBe("incomplete");
    const empty = await db().select().from(testRecordMissingPlaces).where(eq(testRecordMissingPlaces.recordId, recordId));
    expect(empty.map((m) => [m.specKey, m.fastener]).sort((a, b) => Number(a[1]) - Number(b[1]))).toEqual([
      ["final", 7],
      ["final", 8],
      ["final", 9],
      ["final", 10],
    ]);

    // All ten torqued and the count answered: Within spec.
    const second = await startRun(builder, proc.slug, build.number);
    expect((await post(builder, second, { entries: [...bores.map((b) => ({ ...b, key: randomUUID() })), ...torqued(10)] })).status).toBe(
      200,
    );
    const done2 = await finish(second, "10");
    expect(done2.status).toBe(302);
    const record2 = /\/test-records\/([0-9a-f-]{36})/.exec(done2.headers.get("location") ?? "")?.[1] as string;
    const [rec2] = await db().select().from(testRecords).where(eq(testRecords.id, record2));
    expect(rec2.verdict).toBe("within");
  });

  it("refuses a place out of the engine's range, a place the spec is not measured at, and fields a place does not have", async () => {
    const { proc, build } = await fixture({ cylinders: 4 });
    const runId = await startRun(builder, proc.slug, build.number);
    const cases: [unknown, number, string | null][] = [
      [{ entries: [entry("bore", 88, "mm", { position: { cylinder: 5 } })] }, 422, "entries.0.position"],
      [{ entries: [entry("bore", 88, "mm", { position: { cylinder: 0 } })] }, 422, "entries.0.position.cylinder"],
      [{ entries: [entry("bore", 88, "mm", { position: { cylinder: 2.5 } })] }, 422, "entries.0.position.cylinder"],
      [{ entries: [entry("bore", 88, "mm", { position: { cylinder: "3" } })] }, 422, "entries.0.position.cylinder"],
      [{ entries: [entry("bore", 88, "mm", { position: { journal: 2 } })] }, 422, "entries.0.position"],
      [{ entries: [entry("bore", 88, "mm", { position: { depth: 20 } })] }, 422, "entries.0.position"],
      [{ entries: [entry("bore", 88, "mm", { position: undefined })] }, 422, "entries.0.position"],
      [{ entries: [entry("final", 110, "N.m", { position: { fastener: 201 } })] }, 422, "entries.0.position.fastener"],
      [{ entries: [entry("final", 110, "N.m", { position: { cylinder: 1 } })] }, 422, "entries.0.position"],
      [{ entries: [entry("final", 110, "N.m", { position: { fastener: 1, cylinder: 1 } })] }, 422, "entries.0.position"],
    ];
    for (const [body, status, where] of cases) {
      const res = await post(builder, runId, body);
      expect(res.status, JSON.stringify(body)).toBe(status);
      const out = (await res.json()) as { issues?: { path: string }[]; field?: string };
      const paths = [...(out.issues ?? []).map((i) => i.path), out.field].filter(Boolean);
      expect(
        paths.some((p) => p?.startsWith(where ?? "")),
        `${JSON.stringify(body)} → ${JSON.stringify(out)}`,
      ).toBe(true);
    }
    expect(await db().select().from(runEntries).where(eq(runEntries.runId, runId))).toHaveLength(0);
  });

  it("keeps a photo at its place once however often the device sends it again", async () => {
    const { proc, build } = await fixture({ cylinders: 4 });
    const runId = await startRun(builder, proc.slug, build.number);
    const png = grayPng();
    const send = (fields: Record<string, string>) => {
      const form = new FormData();
      for (const [k, v] of Object.entries(fields)) form.set(k, v);
      form.set("photo", new File([new Uint8Array(png)], "gauge.png", { type: "image/png" }));
      return http(`/api/runs/${runId}/photos`, { method: "POST", cookie: builder.cookie, body: form });
    };
    const key = `photo-${randomUUID()}`;
    const sent = await Promise.all([1, 2, 3].map(() => send({ specKey: "bore", cylinder: "3", key })));
    expect(sent.map((r) => r.status).sort()).toEqual([200, 200, 201]);
    const ids = new Set(await Promise.all(sent.map(async (r) => ((await r.json()) as { id: string }).id)));
    expect(ids.size).toBe(1);
    expect((await listRunPhotos(runId)).map((p) => [p.where, p.placeKey])).toEqual([["cyl 3", "bore@cylinder3"]]);
    // The same key for another place is refused; places out of range, or that the spec has not, are 4xx.
    expect((await send({ specKey: "bore", cylinder: "2", key })).status).toBe(409);
    expect((await send({ specKey: "bore", cylinder: "9" })).status).toBe(422);
    expect((await send({ specKey: "bore", journal: "1" })).status).toBe(422);
    expect((await send({ specKey: "bore" })).status).toBe(422);
    expect((await send({ specKey: "bore", cylinder: "three" })).status).toBe(422);
    expect((await send({ specKey: "bore", cylinder: "1", key: "no" })).status).toBe(422);
    expect(await listRunPhotos(runId)).toHaveLength(1);
  });

  it("takes a build's count of cylinders and main journals on its form, refusing counts no engine has", async () => {
    const { proc, build } = await fixture();
    const edit = (fields: Record<string, string>) =>
      http(`/builds/${build.number}/edit`, { cookie: builder.cookie, form: { customerName: "Test customer", ...fields } });
    const bads: Record<string, string>[] = [
      { cylinders: "17" },
      { cylinders: "0" },
      { cylinders: "four" },
      { mainJournals: "13" },
      { mainJournals: "2.5" },
    ];
    for (const bad of bads) expect((await edit(bad)).status, JSON.stringify(bad)).toBe(400);
    expect((await edit({ cylinders: "6", mainJournals: "7" })).status).toBe(302);
    const [b] = await db().select().from(builds).where(eq(builds.id, build.id));
    expect([b.cylinders, b.mainJournals]).toEqual([6, 7]);
    // A run on it now offers six cylinders.
    const runId = await startRun(builder, proc.slug, build.number);
    expect((await getRun(runId))?.specs.find((sp) => sp.key === "bore")?.offered).toEqual([1, 2, 3, 4, 5, 6]);
  });
});
