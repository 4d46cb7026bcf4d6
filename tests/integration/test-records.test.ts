// Test records over HTTP: filing per role, verdicts, field errors, revision pinning,
// amendments with the audit log, calculator runs, CSV export and the procedure page.
import { randomUUID } from "node:crypto";
import { and, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import {
  auditLog,
  procedureRevisions,
  procedures,
  procedureSpecs,
  readings,
  recordings,
  testRecordAmendments,
  testRecordCalcs,
  testRecordReadings,
  testRecords,
} from "~/db/schema";
import { db } from "~/lib/db.server";
import { createUser, http, waitFor, type TestUser } from "../support/app";
import { workOrderPool } from "../support/builds";
import { parse } from "../support/csv";

type SpecDef = {
  key: string;
  label: string;
  quantity: string;
  unit: string;
  min: number | null;
  max: number | null;
  nominal?: number | null;
};
const DOC = { type: "doc", content: [{ type: "paragraph", content: [{ type: "text", text: "Measure and record." }] }] };

async function publishRevision(procedureId: string, number: number, specs: SpecDef[]) {
  await db()
    .update(procedureRevisions)
    .set({ state: "superseded", supersededAt: new Date() })
    .where(and(eq(procedureRevisions.procedureId, procedureId), eq(procedureRevisions.state, "published")));
  const [rev] = await db()
    .insert(procedureRevisions)
    .values({
      procedureId,
      number,
      state: "published",
      title: `Bore check ${procedureId.slice(0, 6)}`,
      area: "block",
      doc: DOC,
      publishedAt: new Date(),
    })
    .returning();
  const rows = await db()
    .insert(procedureSpecs)
    .values(
      specs.map((s, i) => ({
        revisionId: rev.id,
        procedureId,
        specKey: s.key,
        position: i,
        label: s.label,
        quantity: s.quantity,
        unit: s.unit,
        nominal: s.nominal ?? null,
        min: s.min,
        max: s.max,
        siUnit: s.quantity === "length" ? "m" : "N.m",
        minSi: s.min == null ? null : s.min / 1000,
        maxSi: s.max == null ? null : s.max / 1000,
      })),
    )
    .returning();
  await db().update(procedures).set({ publishedRevisionId: rev.id, publishedAt: new Date() }).where(eq(procedures.id, procedureId));
  return { rev, specs: Object.fromEntries(rows.map((r) => [r.specKey, r])) };
}

async function makeProcedure(specs: SpecDef[]) {
  const slug = `tr-test-${randomUUID().slice(0, 8)}`;
  const [p] = await db()
    .insert(procedures)
    .values({ slug, title: `Bore check ${slug}`, area: "block" })
    .returning();
  const { rev, specs: s } = await publishRevision(p.id, 1, specs);
  return { procedure: p, rev, specs: s };
}

const BORE: SpecDef[] = [
  { key: "bore", label: "Bore diameter", quantity: "length", unit: "mm", min: 88.0, max: 88.012, nominal: 88.006 },
  { key: "oor", label: "Out-of-round", quantity: "length", unit: "mm", min: null, max: 0.008 },
  { key: "gap", label: "Top ring end gap", quantity: "length", unit: "mm", min: 0.45, max: null },
];

const workOrder = workOrderPool("TR");

function form(revisionId: string, extra: Record<string, string>) {
  return {
    revisionId,
    title: "Bore finish after honing",
    workOrder: workOrder(),
    engineSerial: "LX23-0412",
    testedOn: new Date().toISOString().slice(0, 10),
    notes: "",
    ...extra,
  };
}

/** Posts the form to the page it is on, as the browser does (/test-records/new?procedure=…). */
async function file(user: TestUser, body: Record<string, string>) {
  const [p] = await db()
    .select({ slug: procedures.slug })
    .from(procedureRevisions)
    .innerJoin(procedures, eq(procedures.id, procedureRevisions.procedureId))
    .where(eq(procedureRevisions.id, body.revisionId));
  return http(`/test-records/new?procedure=${p.slug}`, { form: body, cookie: user.cookie });
}

/** Page text without React's text-joining comments. */
const textOf = async (res: Response) => (await res.text()).replaceAll("<!-- -->", "");
/** The words of a page as read, tags out and spaces joined ("Incomplete: 1 spec not measured" across spans). */
const wordsOf = (html: string) => html.replace(/<[^>]+>/g, " ").replace(/\s+/g, " ");

async function dbError(p: Promise<unknown>): Promise<string> {
  try {
    await p;
    return "no error";
  } catch (err) {
    const e = err as { message: string; cause?: { message?: string } };
    return `${e.message} ${e.cause?.message ?? ""}`;
  }
}

const idFrom = (res: Response) => /\/test-records\/([0-9a-f-]{36})/.exec(res.headers.get("location") ?? "")?.[1] ?? "";

describe("test records", () => {
  let qc: TestUser;
  let fx: Awaited<ReturnType<typeof makeProcedure>>;
  beforeAll(async () => {
    qc = await createUser("qc");
    fx = await makeProcedure(BORE);
  });

  it("staff file a record through the form; an apprentice is refused", async () => {
    for (const role of ["admin", "editor", "builder", "qc"] as const) {
      const u = role === "qc" ? qc : await createUser(role);
      const res = await file(u, form(fx.rev.id, { [`r.${fx.specs.bore.id}.0.value`]: "88.006", [`r.${fx.specs.bore.id}.0.unit`]: "mm" }));
      expect(res.status, role).toBe(302);
      const id = idFrom(res);
      const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, id));
      expect(rec.createdBy).toBe(u.id);
      expect(rec.revisionId).toBe(fx.rev.id);
      // Only the bore was measured: two specs are missing, so the record is not within spec.
      expect(rec.verdict).toBe("incomplete");
    }
    const apprentice = await createUser("apprentice");
    const res = await file(
      apprentice,
      form(fx.rev.id, { [`r.${fx.specs.bore.id}.0.value`]: "88.006", [`r.${fx.specs.bore.id}.0.unit`]: "mm" }),
    );
    expect(res.status).toBe(403);
    expect((await http("/test-records/new", { cookie: apprentice.cookie })).status).toBe(403);
  });

  it("computes per-reading verdicts with unit conversion and lists specs left empty as not measured", async () => {
    const b = fx.specs.bore.id;
    const res = await file(
      qc,
      form(fx.rev.id, {
        [`r.${b}.0.value`]: "88.004",
        [`r.${b}.0.unit`]: "mm",
        [`r.${b}.0.note`]: "cyl 1, 10 mm down, 0°",
        [`r.${b}.1.value`]: "3.4655",
        [`r.${b}.1.unit`]: "in",
        [`r.${b}.1.note`]: "cyl 1, 10 mm down, 90°",
        [`r.${fx.specs.gap.id}.0.value`]: "0.45",
        [`r.${fx.specs.gap.id}.0.unit`]: "mm",
      }),
    );
    expect(res.status).toBe(302);
    const id = idFrom(res);
    const rows = await db()
      .select()
      .from(testRecordReadings)
      .where(eq(testRecordReadings.recordId, id))
      .orderBy(testRecordReadings.position);
    const bore = rows.filter((r) => r.specId === b);
    expect(bore.map((r) => r.verdict)).toEqual(["within", "above"]);
    expect(bore[1].valueInSpecUnit).toBeCloseTo(88.0237, 4);
    expect(rows.find((r) => r.specId === fx.specs.gap.id)!.verdict).toBe("within");
    const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, id));
    expect(rec.verdict).toBe("out");
    const page = await textOf(await http(`/test-records/${id}`, { cookie: qc.cookie }));
    expect(page).toContain("Out of spec");
    expect(page).toContain("Not measured: Out-of-round");
    expect(page).toContain("above max");
    // A reading typed in inches: the table gains its "In spec unit" column.
    expect(page).toContain("In spec unit");
  });

  it("answers bad input with field messages and keeps what was typed", async () => {
    const b = fx.specs.bore.id;
    const res = await file(qc, {
      ...form(fx.rev.id, { [`r.${b}.0.value`]: "88,0x6", [`r.${b}.0.unit`]: "mm", [`r.${b}.1.value`]: "88", [`r.${b}.1.unit`]: "N.m" }),
      workOrder: "job 17",
      testedOn: "",
    });
    expect(res.status).toBe(400);
    const html = await textOf(res);
    expect(html).toContain("Work orders look like LEW-24-0117.");
    expect(html).toContain("Enter the date of the test.");
    expect(html).toContain("Enter a number, e.g. 88.006.");
    expect(html).toContain("Bore diameter is a length spec; N.m is a torque unit.");
    expect(html).toContain('value="88,0x6"');
    expect(html).toContain('value="job 17"');
    const none = await file(qc, form(fx.rev.id, {}));
    expect(none.status).toBe(400);
    expect(await textOf(none)).toContain("Type at least one reading");
  });

  it("is Incomplete, never Within spec, while a spec is unmeasured; Within once every spec is measured and met", async () => {
    const b = fx.specs.bore.id;
    const all = {
      [`r.${b}.0.value`]: "88.006",
      [`r.${b}.0.unit`]: "mm",
      [`r.${fx.specs.oor.id}.0.value`]: "0.004",
      [`r.${fx.specs.oor.id}.0.unit`]: "mm",
      [`r.${fx.specs.gap.id}.0.value`]: "0.5",
      [`r.${fx.specs.gap.id}.0.unit`]: "mm",
    };
    const complete = idFrom(await file(qc, form(fx.rev.id, all)));
    const [done] = await db().select().from(testRecords).where(eq(testRecords.id, complete));
    expect(done.verdict).toBe("within");
    const completePage = await textOf(await http(`/test-records/${complete}`, { cookie: qc.cookie }));
    expect(completePage).toContain("Every spec of the revision was measured.");
    // Every reading in its spec's own unit: no empty "In spec unit" column squeezing "Where".
    expect(completePage).toContain("Limits (filed revision)");
    expect(completePage).not.toContain("In spec unit");

    const partial = Object.fromEntries(Object.entries(all).filter(([k]) => !k.startsWith(`r.${fx.specs.gap.id}.`)));
    const wo = workOrder();
    const id = idFrom(await file(qc, { ...form(fx.rev.id, partial), workOrder: wo }));
    const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, id));
    expect(rec.verdict).toBe("incomplete");
    const page = await textOf(await http(`/test-records/${id}`, { cookie: qc.cookie }));
    expect(wordsOf(page)).toContain("Incomplete: 1 spec not measured");
    expect(page).toContain("Not measured: Top ring end gap");
    expect(page).toContain('data-verdict="incomplete"');
    expect(page).not.toContain('data-verdict="within"');
    const sheet = await textOf(await http(`/test-records/${id}/print`, { cookie: qc.cookie }));
    expect(wordsOf(sheet)).toContain("Incomplete: 1 spec not measured");
    // The list shows it as incomplete, and filters by it.
    const list = await textOf(await http(`/test-records?workOrder=${wo}&verdict=incomplete`, { cookie: qc.cookie }));
    expect(list).toContain(`/test-records/${id}`);
    expect(wordsOf(list)).toContain("Incomplete: 1 spec not measured");
    expect(await textOf(await http(`/test-records?workOrder=${wo}&verdict=within`, { cookie: qc.cookie }))).not.toContain(
      `/test-records/${id}`,
    );
  });

  it("migration 0024 turns a record stored as within with a spec unmeasured into incomplete, and leaves a complete one within", async () => {
    const b = fx.specs.bore.id;
    // Records as they were stored before the migration: 'within' whatever was left unmeasured.
    const insert = async (specIds: string[]) => {
      const [rec] = await db()
        .insert(testRecords)
        .values({
          procedureId: fx.procedure.id,
          revisionId: fx.rev.id,
          title: "Filed before 0024",
          workOrder: workOrder(),
          testedOn: "2024-05-02",
          verdict: "within",
        })
        .returning();
      await db()
        .insert(testRecordReadings)
        .values(
          specIds.map((specId, i) => ({
            recordId: rec.id,
            version: 0,
            specId,
            specKey: "k",
            position: i,
            valueEntered: 0.5,
            unitEntered: "mm",
            valueSi: 0.0005,
            valueInSpecUnit: 0.5,
            verdict: "within" as const,
          })),
        );
      return rec.id;
    };
    const old = await insert([b]);
    const full = await insert([b, fx.specs.oor.id, fx.specs.gap.id]);
    // The migration's statements that set the records right (those after the type is made anew).
    const fs = await import("node:fs");
    const statements = fs.readFileSync("drizzle/0024_test_record_incomplete.sql", "utf8").split("--> statement-breakpoint");
    const from = statements.findIndex((s) => s.includes("FUNCTION pg_temp."));
    expect(from).toBeGreaterThan(0);
    await db().transaction(async (tx) => {
      for (const s of statements.slice(from)) await tx.execute(sql.raw(s));
    });
    const rows = await db()
      .select({ id: testRecords.id, verdict: testRecords.verdict })
      .from(testRecords)
      .where(sql`${testRecords.id} in (${old}, ${full})`);
    expect(Object.fromEntries(rows.map((r) => [r.id, r.verdict]))).toEqual({ [old]: "incomplete", [full]: "within" });
  });

  it("migration 0026 guesses the decimals of readings stored before it from the value as it reads", async () => {
    const b = fx.specs.bore.id;
    const [rec] = await db()
      .insert(testRecords)
      .values({
        procedureId: fx.procedure.id,
        revisionId: fx.rev.id,
        title: "Filed before 0026",
        workOrder: workOrder(),
        testedOn: "2024-05-02",
        verdict: "within",
      })
      .returning();
    // 88.00600000000001 is what arithmetic leaves of 88.006; 1e-7 prints in exponent form.
    const values = [88.01, 88.00600000000001, 88, 1e-7];
    await db()
      .insert(testRecordReadings)
      .values(
        values.map((v, i) => ({
          recordId: rec.id,
          version: 0,
          specId: b,
          specKey: "bore",
          position: i,
          valueEntered: v,
          unitEntered: "mm",
          valueSi: v / 1000,
          valueInSpecUnit: v,
          verdict: "within" as const,
        })),
      );
    const [recording] = await db()
      .insert(recordings)
      .values({ title: "Before 0026", state: "ready", originalName: "b.mp4", originalSize: 1, durationS: 10 })
      .returning();
    const [reading] = await db()
      .insert(readings)
      .values({ recordingId: recording.id, quantity: "bore-diameter", valueEntered: 88.01, unitEntered: "mm", valueSi: 0.08801 })
      .returning();
    const fs = await import("node:fs");
    const statements = fs.readFileSync("drizzle/0026_reading_typed_decimals.sql", "utf8").split("--> statement-breakpoint");
    const from = statements.findIndex((st) => st.includes("UPDATE readings"));
    expect(from).toBeGreaterThan(0);
    await db().transaction(async (tx) => {
      for (const st of statements.slice(from)) await tx.execute(sql.raw(st));
    });
    const rows = await db()
      .select()
      .from(testRecordReadings)
      .where(eq(testRecordReadings.recordId, rec.id))
      .orderBy(testRecordReadings.position);
    expect(rows.map((r) => r.valueDecimals)).toEqual([2, 3, 0, 7]);
    const [after] = await db().select().from(readings).where(eq(readings.id, reading.id));
    expect(after.valueDecimals).toBe(2);
    // The filed readings stay immutable after it.
    expect(
      await dbError(db().update(testRecordReadings).set({ valueDecimals: 4 }).where(eq(testRecordReadings.recordId, rec.id))),
    ).toContain("readings are immutable");
  });

  it("pins the record to the revision in force; a later revision supersedes it and both limits show", async () => {
    const p = await makeProcedure(BORE);
    const res = await file(qc, form(p.rev.id, { [`r.${p.specs.bore.id}.0.value`]: "88.011", [`r.${p.specs.bore.id}.0.unit`]: "mm" }));
    const id = idFrom(res);
    const next = await publishRevision(p.procedure.id, 2, [{ ...BORE[0], max: 88.01 }, BORE[1], BORE[2]]);
    const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, id));
    expect(rec.revisionId).toBe(p.rev.id);
    expect(rec.verdict).toBe("incomplete");
    const html = await textOf(await http(`/test-records/${id}`, { cookie: qc.cookie }));
    expect(html).toContain("superseded by revision 2");
    expect(html).toContain("88 – 88.012 mm");
    expect(html).toContain("88 – 88.01 mm (changed)");
    // A form opened before the new revision was published is refused, with what was typed kept.
    const stale = await file(qc, form(p.rev.id, { [`r.${p.specs.bore.id}.0.value`]: "88.005", [`r.${p.specs.bore.id}.0.unit`]: "mm" }));
    expect(stale.status).toBe(409);
    expect(await textOf(stale)).toContain("Revision 2 of this procedure was published while the form was open");
    // New records go to revision 2.
    const fresh = await file(
      qc,
      form(next.rev.id, { [`r.${next.specs.bore.id}.0.value`]: "88.011", [`r.${next.specs.bore.id}.0.unit`]: "mm" }),
    );
    const [rec2] = await db()
      .select()
      .from(testRecords)
      .where(eq(testRecords.id, idFrom(fresh)));
    expect(rec2.revisionId).toBe(next.rev.id);
    expect(rec2.verdict).toBe("out");
    // And the database itself refuses to move a record to another revision.
    expect(await dbError(db().update(testRecords).set({ revisionId: next.rev.id }).where(eq(testRecords.id, id)))).toContain(
      "stays pinned to the revision",
    );
  });

  it("amends by a new version: the original stays, the change and its reason are in the history and the audit log", async () => {
    const b = fx.specs.bore.id;
    const wo = workOrder();
    const id = idFrom(
      await file(qc, {
        ...form(fx.rev.id, { [`r.${b}.0.value`]: "88.015", [`r.${b}.0.unit`]: "mm", [`r.${b}.0.note`]: "cyl 3" }),
        workOrder: wo,
      }),
    );
    const builder = await createUser("builder");
    expect((await http(`/test-records/${id}/amend`, { cookie: builder.cookie })).status).toBe(403);
    const base = {
      title: "Bore finish after honing",
      engineSerial: "LX23-0412",
      testedOn: new Date().toISOString().slice(0, 10),
      notes: "",
    };
    const noReason = await http(`/test-records/${id}/amend`, {
      form: { ...base, reason: "", [`r.${b}.0.value`]: "88.009", [`r.${b}.0.unit`]: "mm" },
      cookie: qc.cookie,
    });
    expect(noReason.status).toBe(400);
    expect(await textOf(noReason)).toContain("Say why the record is amended");
    const same = await http(`/test-records/${id}/amend`, {
      form: { ...base, reason: "checking", [`r.${b}.0.value`]: "88.015", [`r.${b}.0.unit`]: "mm", [`r.${b}.0.note`]: "cyl 3" },
      cookie: qc.cookie,
    });
    expect(same.status).toBe(400);
    expect(await textOf(same)).toContain("Nothing was changed");

    const editor = await createUser("editor");
    const ok = await http(`/test-records/${id}/amend`, {
      form: {
        ...base,
        reason: "gauge re-zeroed on the ring, cyl 3 re-measured",
        [`r.${b}.0.value`]: "88.009",
        [`r.${b}.0.unit`]: "mm",
        [`r.${b}.0.note`]: "cyl 3",
      },
      cookie: editor.cookie,
    });
    expect(ok.status).toBe(302);
    const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, id));
    expect(rec.currentVersion).toBe(1);
    expect(rec.verdict).toBe("incomplete");
    expect(rec.workOrder).toBe(wo);
    const rows = await db()
      .select()
      .from(testRecordReadings)
      .where(eq(testRecordReadings.recordId, id))
      .orderBy(testRecordReadings.version);
    expect(rows.map((r) => [r.version, r.valueEntered, r.verdict])).toEqual([
      [0, 88.015, "above"],
      [1, 88.009, "within"],
    ]);
    const [a] = await db().select().from(testRecordAmendments).where(eq(testRecordAmendments.recordId, id));
    expect(a.createdBy).toBe(editor.id);
    expect(a.verdictBefore).toBe("out");
    expect(a.changes).toEqual([{ kind: "spec", key: b, label: "Bore diameter", before: "88.015 mm (cyl 3)", after: "88.009 mm (cyl 3)" }]);
    const logs = await db()
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, "test_record"), eq(auditLog.entityId, id)));
    expect(logs.map((l) => l.action).sort()).toEqual(["amend", "create"]);
    expect(logs.find((l) => l.action === "amend")!.actorId).toBe(editor.id);
    expect((logs.find((l) => l.action === "amend")!.detail as { reason: string }).reason).toBe(
      "gauge re-zeroed on the ring, cyl 3 re-measured",
    );

    const now = await textOf(await http(`/test-records/${id}`, { cookie: qc.cookie }));
    expect(now).toContain("gauge re-zeroed on the ring");
    expect(wordsOf(now)).toContain("Incomplete: 2 specs not measured");
    expect(now).toContain("Verdict Out of spec → Incomplete");
    const original = await textOf(await http(`/test-records/${id}?v=0`, { cookie: qc.cookie }));
    expect(original).toContain("the record as originally filed");
    expect(original).toContain("88.015");
    // Filed readings cannot be changed in place, not even from the database.
    expect(await dbError(db().update(testRecordReadings).set({ valueEntered: 1 }).where(eq(testRecordReadings.recordId, id)))).toContain(
      "readings are immutable",
    );
  });

  it("runs Bore distortion on the readings at the depth and angle of their position fields, per cylinder, and keeps the result", async () => {
    const b = fx.specs.bore.id;
    // Cylinder 1 at two depths and four angles; cylinder 2 (three readings) a run of its own. The
    // notes are the inspector's words: "12 mm feeler" is not where the gauge sat.
    const vals = [88.01, 88.005, 88.0, 88.005, 88.004, 88.004, 88.004, 88.004];
    const f: Record<string, string> = {};
    vals.forEach((v, i) => {
      Object.assign(f, {
        [`r.${b}.${i}.value`]: String(v),
        [`r.${b}.${i}.unit`]: "mm",
        [`r.${b}.${i}.cylinder`]: "1",
        [`r.${b}.${i}.depth`]: String(i < 4 ? 10 : 60),
        [`r.${b}.${i}.depthUnit`]: "mm",
        // The third diameter was filed without its angle: the page asks for it.
        [`r.${b}.${i}.angle`]: i === 2 ? "" : String((i % 4) * 45),
        [`r.${b}.${i}.note`]: i === 0 ? "12 mm feeler, plate on" : "plate on",
      });
    });
    [88.02, 88.02, 88.02].forEach((v, j) => {
      const i = 8 + j;
      Object.assign(f, {
        [`r.${b}.${i}.value`]: String(v),
        [`r.${b}.${i}.unit`]: "mm",
        [`r.${b}.${i}.cylinder`]: "2",
        [`r.${b}.${i}.depth`]: "10",
        [`r.${b}.${i}.angle`]: String(j * 60),
      });
    });
    const id = idFrom(await file(qc, form(fx.rev.id, f)));
    const rs = await db().select().from(testRecordReadings).where(eq(testRecordReadings.recordId, id)).orderBy(testRecordReadings.position);
    const page = await textOf(await http(`/test-records/${id}`, { cookie: qc.cookie }));
    expect(wordsOf(page)).toContain("Bore distortion from the 8 readings of “Bore diameter”, cyl 1");
    expect(wordsOf(page)).toContain("Bore distortion from the 3 readings of “Bore diameter”, cyl 2");
    // Only the missing angle is asked for; the filed places are shown, not typed again.
    expect(page).toContain(`name="angle.${rs[2].id}"`);
    expect(page).not.toContain(`name="depth.${rs[0].id}"`);
    expect(page).not.toContain(`name="angle.${rs[0].id}"`);

    const body: Record<string, string> = { intent: "distortion", specId: b, cylinder: "1" };
    const bad = await http(`/test-records/${id}`, { form: body, cookie: qc.cookie });
    expect(bad.status).toBe(400);
    expect(await textOf(bad)).toContain("Give every reading its depth and angle.");
    body[`angle.${rs[2].id}`] = "90";
    const res = await http(`/test-records/${id}`, { form: body, cookie: qc.cookie });
    expect(res.status).toBe(302);
    const [c] = await db().select().from(testRecordCalcs).where(eq(testRecordCalcs.recordId, id));
    expect(c.label).toBe("Bore distortion: Bore diameter (cyl 1)");
    const input = c.input as { readings: { depth: { value: number; unit: string }; angleDeg: number }[] };
    expect(input.readings.map((r) => `${r.depth.value} ${r.depth.unit} ${r.angleDeg}°`)).toEqual([
      "10 mm 0°",
      "10 mm 45°",
      "10 mm 90°",
      "10 mm 135°",
      "60 mm 0°",
      "60 mm 45°",
      "60 mm 90°",
      "60 mm 135°",
    ]);
    const result = c.result as { levels: { outOfRound_mm: number }[] };
    expect(result.levels.map((l) => Number(l.outOfRound_mm.toFixed(6)))).toEqual([0.01, 0]);
    const apprentice = await createUser("apprentice");
    expect((await http(`/test-records/${id}`, { form: body, cookie: apprentice.cookie })).status).toBe(403);
    const unknown = await http(`/test-records/${id}`, { form: { intent: "erase" }, cookie: qc.cookie });
    expect(unknown.status).toBe(400);
    expect(await textOf(unknown)).toContain("This form asked for something this page does not do.");
  });

  it("keeps a reading at the resolution it was typed: 88.010 stays 88.010 on the record, the amend form and converted", async () => {
    const b = fx.specs.bore.id;
    const res = await file(
      qc,
      form(fx.rev.id, { [`r.${b}.0.value`]: "88.010", [`r.${b}.0.unit`]: "mm", [`r.${b}.1.value`]: "3.46500", [`r.${b}.1.unit`]: "in" }),
    );
    expect(res.status).toBe(302);
    const id = idFrom(res);
    const rows = await db()
      .select()
      .from(testRecordReadings)
      .where(eq(testRecordReadings.recordId, id))
      .orderBy(testRecordReadings.position);
    expect(rows.map((r) => [r.valueEntered, r.valueDecimals])).toEqual([
      [88.01, 3],
      [3.465, 5],
    ]);
    const page = await textOf(await http(`/test-records/${id}`, { cookie: qc.cookie }));
    expect(page).toContain("88.010 mm");
    expect(page).toContain("3.46500 in");
    // 3.46500 in = 88.011 mm; a step of 0.00001 in is 0.000254 mm, so four decimals (1 in = 25.4 mm).
    expect(page).toContain("88.0110 mm");
    const amend = await textOf(await http(`/test-records/${id}/amend`, { cookie: qc.cookie }));
    expect(amend).toContain('value="88.010"');
    expect(amend).toContain('value="3.46500"');
  });

  it("files from a recording: its readings are offered, pulled in with a link to their moment, and the span is kept", async () => {
    const [rec] = await db()
      .insert(recordings)
      .values({ title: "Cyl 3 bore check after honing", state: "ready", originalName: "bore.mp4", originalSize: 1000, durationS: 240 })
      .returning();
    const [rd] = await db()
      .insert(readings)
      .values({
        recordingId: rec.id,
        quantity: "length",
        label: "cyl 3 bore, 10 mm down, 0°",
        valueSi: 0.088007,
        valueEntered: 88.007,
        unitEntered: "mm",
        t: 42,
      })
      .returning();
    const page = await textOf(await http(`/test-records/new?procedure=${fx.procedure.slug}&recording=${rec.id}`, { cookie: qc.cookie }));
    expect(page).toContain("Readings typed on the recording");
    expect(page).toContain("cyl 3 bore, 10 mm down, 0°");
    const b = fx.specs.bore.id;
    const res = await http(`/test-records/new?procedure=${fx.procedure.slug}&recording=${rec.id}`, {
      form: {
        ...form(fx.rev.id, { [`r.${b}.0.value`]: "88.007", [`r.${b}.0.unit`]: "mm", [`r.${b}.0.note`]: rd.label, [`r.${b}.0.src`]: rd.id }),
        recordingId: rec.id,
        recordingStartS: "30",
        recordingEndS: "95.5",
      },
      cookie: qc.cookie,
    });
    expect(res.status).toBe(302);
    const id = idFrom(res);
    const [row] = await db().select().from(testRecords).where(eq(testRecords.id, id));
    expect([row.recordingId, row.recordingStartS, row.recordingEndS]).toEqual([rec.id, 30, 95.5]);
    const [r] = await db().select().from(testRecordReadings).where(eq(testRecordReadings.recordId, id));
    expect(r.sourceReadingId).toBe(rd.id);
    const html = await textOf(await http(`/test-records/${id}`, { cookie: qc.cookie }));
    expect(html).toContain(`/recordings/${rec.id}?t=30`);
    const backwards = await http(`/test-records/new?procedure=${fx.procedure.slug}&recording=${rec.id}`, {
      form: {
        ...form(fx.rev.id, { [`r.${b}.0.value`]: "88.007", [`r.${b}.0.unit`]: "mm" }),
        recordingId: rec.id,
        recordingStartS: "95",
        recordingEndS: "30",
      },
      cookie: qc.cookie,
    });
    expect(backwards.status).toBe(400);
    expect(await textOf(backwards)).toContain("The span must end after it starts.");
  });

  it("runs piston-to-wall from a bore and a piston reading against the clearance spec", async () => {
    const p = await makeProcedure([
      { key: "bore", label: "Bore diameter", quantity: "length", unit: "mm", min: 88.0, max: 88.012 },
      { key: "piston", label: "Piston diameter at the gauge point", quantity: "length", unit: "mm", min: null, max: null, nominal: 87.935 },
      { key: "ptw", label: "Piston-to-wall clearance", quantity: "length", unit: "mm", min: 0.06, max: 0.08 },
    ]);
    const id = idFrom(
      await file(
        qc,
        form(p.rev.id, {
          [`r.${p.specs.bore.id}.0.value`]: "88.006",
          [`r.${p.specs.bore.id}.0.unit`]: "mm",
          [`r.${p.specs.piston.id}.0.value`]: "3.4620",
          [`r.${p.specs.piston.id}.0.unit`]: "in",
        }),
      ),
    );
    const rs = await db().select().from(testRecordReadings).where(eq(testRecordReadings.recordId, id));
    const bore = rs.find((r) => r.specId === p.specs.bore.id)!;
    const piston = rs.find((r) => r.specId === p.specs.piston.id)!;
    expect(piston.verdict).toBe("unchecked");
    const same = await http(`/test-records/${id}`, {
      form: { intent: "piston-to-wall", boreReading: bore.id, pistonReading: bore.id, clearanceSpec: p.specs.ptw.id },
      cookie: qc.cookie,
    });
    expect(same.status).toBe(400);
    expect(await textOf(same)).toContain("Choose two different readings.");
    const res = await http(`/test-records/${id}`, {
      form: { intent: "piston-to-wall", boreReading: bore.id, pistonReading: piston.id, clearanceSpec: p.specs.ptw.id },
      cookie: qc.cookie,
    });
    expect(res.status).toBe(302);
    const [c] = await db().select().from(testRecordCalcs).where(eq(testRecordCalcs.recordId, id));
    // 88.006 mm − 3.4620 in (87.9348 mm) = 0.0712 mm, inside 0.06–0.08.
    expect((c.result as { clearance_mm: number }).clearance_mm).toBeCloseTo(0.0712, 6);
    expect((c.result as { verdict: string }).verdict).toBe("within");
    expect(await textOf(await http(`/test-records/${id}`, { cookie: qc.cookie }))).toContain("within the clearance spec");
  });

  it("exports the filtered records with one row per reading and one per spec not measured", async () => {
    const wo = workOrder();
    const b = fx.specs.bore.id;
    await file(qc, {
      ...form(fx.rev.id, { [`r.${b}.0.value`]: "88.002", [`r.${b}.0.unit`]: "mm", [`r.${b}.1.value`]: "0.2", [`r.${b}.1.unit`]: "thou" }),
      workOrder: wo,
    });
    const apprentice = await createUser("apprentice");
    const res = await http(`/test-records/export.csv?workOrder=${wo}`, { cookie: apprentice.cookie });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toContain("text/csv");
    const rows = parse(await res.text(), { columns: true, bom: true }) as Record<string, string>[];
    expect(rows).toHaveLength(4);
    expect(rows.every((r) => r.work_order === wo && r.record_verdict === "Out of spec" && r.revision === "1")).toBe(true);
    expect(rows.map((r) => [r.spec, r.reading, r.reading_unit, r.reading_verdict])).toEqual([
      ["Bore diameter", "88.002", "mm", "within"],
      ["Bore diameter", "0.2", "thou", "below"],
      ["Out-of-round", "", "", "not measured"],
      ["Top ring end gap", "", "", "not measured"],
    ]);
    expect(Number(rows[1].reading_in_spec_unit)).toBeCloseTo(0.00508, 9);
    const none = parse(await (await http(`/test-records/export.csv?workOrder=NOPE-00-0000`, { cookie: apprentice.cookie })).text(), {
      columns: true,
      bom: true,
    });
    expect(none).toHaveLength(0);
  });

  it("is found by search: work order, verdict and notes, opening the record", async () => {
    const word = `zq${randomUUID().replace(/-/g, "").slice(0, 10)}`;
    const b = fx.specs.bore.id;
    const id = idFrom(
      await file(qc, form(fx.rev.id, { [`r.${b}.0.value`]: "88.02", [`r.${b}.0.unit`]: "mm", notes: `bore 2 tight at the top ${word}` })),
    );
    const apprentice = await createUser("apprentice");
    const hit = await waitFor(async () => {
      const res = await http(`/api/search?q=${word}`, { cookie: apprentice.cookie });
      const body = (await res.json()) as { hits: { kind: string; url: string; title: string; snippet: string }[] };
      return body.hits.find((h) => h.url === `/test-records/${id}`);
    }, 20_000);
    expect(hit.kind).toBe("test_record");
    expect(hit.snippet.replace(/<[^>]+>/g, "")).toContain("Out of spec");
  });

  it("lists with filters, and the procedure page lists the records that back it", async () => {
    const p = await makeProcedure(BORE);
    const within = idFrom(
      await file(qc, form(p.rev.id, { [`r.${p.specs.bore.id}.0.value`]: "88.006", [`r.${p.specs.bore.id}.0.unit`]: "mm" })),
    );
    const out = idFrom(
      await file(qc, form(p.rev.id, { [`r.${p.specs.bore.id}.0.value`]: "88.02", [`r.${p.specs.bore.id}.0.unit`]: "mm" })),
    );
    const list = await textOf(await http(`/test-records?procedure=${p.procedure.slug}&verdict=out`, { cookie: qc.cookie }));
    expect(list).toContain(`/test-records/${out}`);
    expect(list).not.toContain(`/test-records/${within}`);
    const old = await textOf(await http(`/test-records?procedure=${p.procedure.slug}&to=2000-01-01`, { cookie: qc.cookie }));
    expect(old).toContain("No test record matches these filters");
    const page = await http(`/procedures/${p.procedure.slug}`, { cookie: qc.cookie });
    expect(page.status).toBe(200);
    const html = await textOf(page);
    expect(html).toContain(`/test-records/${within}`);
    expect(html).toContain(`/test-records/${out}`);
    expect(html).toContain("File a test record");
    const count = await db().select({ n: sql<number>`count(*)::int` }).from(testRecords).where(eq(testRecords.procedureId, p.procedure.id));
    expect(count[0].n).toBe(2);
  });
});
