// Issue 14 §2: a reading carries where it was taken (stud, cylinder, depth below the deck,
// angle, journal) in fields that fit its quantity; readings typed before keep their place,
// taken out of the free label by migration 0022; Bore distortion opens a cylinder's readings.
import fs from "node:fs";
import { beforeAll, describe, expect, it } from "vitest";
import { and, asc, eq, isNull, sql } from "drizzle-orm";
import { readings, recordings, searchOutbox, testRecordReadings, testRecords } from "~/db/schema";
import { db } from "~/lib/db.server";
import { positionFieldsForSpec, positionFromLabel } from "~/lib/recordings/positions";
import { createUser, http, waitFor, type TestUser } from "../support/app";
import { demoBoreSpec, workOrderPool } from "../support/builds";

const workOrder = workOrderPool("RP");

let builder: TestUser;
let other: TestUser;
let recordingId: string;
const url = () => `/api/recordings/${recordingId}/readings`;
type Row = {
  id: string;
  quantity: string;
  label: string;
  fastener: number | null;
  cylinder: number | null;
  journal: number | null;
  depthM: number | null;
  depthUnit: string | null;
  angleDeg: number | null;
};

beforeAll(async () => {
  builder = await createUser("builder");
  other = await createUser("qc");
  const [rec] = await db()
    .insert(recordings)
    .values({
      title: `Bore check ${Date.now()}`,
      state: "ready",
      originalName: "bores.mp4",
      originalSize: 1,
      durationS: 60,
      uploadedBy: builder.id,
    })
    .returning();
  recordingId = rec.id;
});

const issues = async (res: Response) => ((await res.json()) as { issues: { path: string; message: string }[] }).issues;

describe("readings API with positions", () => {
  it("stores a bore reading's cylinder, depth and angle, and lists them", async () => {
    const bore = (depth: number, angle: number, value: number) => ({
      quantity: "bore-diameter",
      value,
      unit: "mm",
      cylinder: 3,
      depth: { value: depth, unit: "mm" },
      angle,
    });
    const res = await http(url(), {
      cookie: builder.cookie,
      json: { readings: [bore(12, 0, 88.012), bore(12, 90, 88.004), bore(45, 0, 88.01), bore(45, 90, 88.006)] },
    });
    expect(res.status).toBe(201);
    const rows = ((await res.json()) as { readings: Row[] }).readings;
    expect(rows[1]).toMatchObject({ cylinder: 3, depthM: 0.012, depthUnit: "mm", angleDeg: 90, fastener: null, journal: null, label: "" });

    const torque = await http(url(), {
      cookie: builder.cookie,
      json: { quantity: "torque", value: 110, unit: "N.m", fastener: 4, label: "final pass" },
    });
    expect(((await torque.json()) as { reading: Row }).reading).toMatchObject({ fastener: 4, cylinder: null, label: "final pass" });
    const main = await http(url(), { cookie: builder.cookie, json: { quantity: "clearance", value: 0.052, unit: "mm", journal: 2 } });
    expect(((await main.json()) as { reading: Row }).reading).toMatchObject({ journal: 2 });

    const list = ((await (await http(url(), { cookie: other.cookie })).json()) as { readings: Row[] }).readings;
    expect(list.filter((r) => r.cylinder === 3)).toHaveLength(4);
  });

  it("is found by its place: “cyl 3” finds the recording's bore readings", async () => {
    await waitFor(async () => {
      const [r] = await db().select({ n: sql<number>`count(*)::int` }).from(searchOutbox).where(isNull(searchOutbox.doneAt));
      return r.n === 0;
    }, 20_000);
    const res = await http(`/api/search?q=${encodeURIComponent("cyl 3")}&type=reading`, { cookie: other.cookie });
    expect(res.status).toBe(200);
    const { hits } = (await res.json()) as { hits: { url: string; snippet: string }[] };
    const mine = hits.find((h) => h.url.startsWith(`/recordings/${recordingId}`));
    expect(mine, JSON.stringify(hits.map((h) => h.url))).toBeDefined();
  });

  it("answers 422 with the field for a place out of range or one the quantity does not take", async () => {
    const cases: [Record<string, unknown>, string][] = [
      [{ quantity: "bore-diameter", value: 88, unit: "mm", angle: 400 }, "angle"],
      [{ quantity: "bore-diameter", value: 88, unit: "mm", cylinder: 0 }, "cylinder"],
      [{ quantity: "bore-diameter", value: 88, unit: "mm", cylinder: 2.5 }, "cylinder"],
      [{ quantity: "bore-diameter", value: 88, unit: "mm", depth: { value: -5, unit: "mm" } }, "depth"],
      [{ quantity: "torque", value: 110, unit: "N.m", cylinder: 3 }, "cylinder"],
      [{ quantity: "clearance", value: 0.05, unit: "mm", journal: 99 }, "journal"],
    ];
    for (const [body, path] of cases) {
      const res = await http(url(), { cookie: builder.cookie, json: body });
      expect(res.status, JSON.stringify(body)).toBe(422);
      expect((await issues(res)).map((i) => i.path)).toEqual([path]);
    }
  });

  it("keeps the place on a PATCH of the value, and drops it when the quantity changes", async () => {
    const created = await http(url(), {
      cookie: builder.cookie,
      json: { quantity: "bore-diameter", value: 88.02, unit: "mm", cylinder: 1, depth: { value: 0.5, unit: "in" }, angle: 45 },
    });
    const { reading } = (await created.json()) as { reading: Row };
    const one = `${url()}/${reading.id}`;
    const value = await http(one, { method: "PATCH", cookie: builder.cookie, json: { value: 88.021 } });
    expect(value.status).toBe(200);
    expect(((await value.json()) as { reading: Row }).reading).toMatchObject({
      cylinder: 1,
      depthM: expect.closeTo(0.0127, 12),
      depthUnit: "in",
      angleDeg: 45,
    });
    const angle = await http(one, { method: "PATCH", cookie: builder.cookie, json: { angle: 135 } });
    expect(((await angle.json()) as { reading: Row }).reading).toMatchObject({ cylinder: 1, angleDeg: 135 });
    const changed = await http(one, {
      method: "PATCH",
      cookie: builder.cookie,
      json: { quantity: "ring-gap", value: 0.3, unit: "mm", cylinder: 1 },
    });
    expect(changed.status).toBe(200);
    expect(((await changed.json()) as { reading: Row }).reading).toMatchObject({
      quantity: "ring-gap",
      cylinder: 1,
      depthM: null,
      angleDeg: null,
    });
  });

  it("opens a cylinder's bore readings in Bore distortion, laid out by depth and angle", async () => {
    const res = await http(`/calculators/distortion?recording=${recordingId}&cylinder=3`, { cookie: other.cookie });
    expect(res.status).toBe(200);
    const html = (await res.text()).replaceAll("<!-- -->", "");
    expect(html).toContain("Readings of cylinder 3 from");
    expect(html).toMatch(/name="depths"[^>]*value="12, 45"|value="12, 45"[^>]*name="depths"/);
    expect(html).toMatch(/name="m\.1\.1"[^>]*value="88\.006"|value="88\.006"[^>]*name="m\.1\.1"/);
    const bad = await http(`/calculators/distortion?recording=${recordingId}&cylinder=abc`, { cookie: other.cookie });
    expect(bad.status).toBe(400);
  });
});

describe("readings API: the resolution typed", () => {
  type Typed = { id: string; valueEntered: number; valueDecimals: number | null };
  it("keeps the decimals typed beside the value (88.010 arrives as 88.01), lists them, and guesses them when not given", async () => {
    const res = await http(url(), {
      cookie: builder.cookie,
      json: {
        readings: [
          { quantity: "bore-diameter", value: 88.01, valueDecimals: 3, unit: "mm", cylinder: 4 },
          { quantity: "torque", value: 110, unit: "N.m" },
        ],
      },
    });
    expect(res.status).toBe(201);
    const [bore, torque] = ((await res.json()) as { readings: Typed[] }).readings;
    expect([bore.valueEntered, bore.valueDecimals]).toEqual([88.01, 3]);
    expect(torque.valueDecimals).toBe(0);
    const list = ((await (await http(url(), { cookie: other.cookie })).json()) as { readings: Typed[] }).readings;
    expect(list.find((r) => r.id === bore.id)?.valueDecimals).toBe(3);

    // A PATCH of the label keeps them; a PATCH of the value says them anew, or they are the value's own.
    const one = `${url()}/${bore.id}`;
    const label = await http(one, { method: "PATCH", cookie: builder.cookie, json: { label: "plate on" } });
    expect(((await label.json()) as { reading: Typed }).reading.valueDecimals).toBe(3);
    const value = await http(one, { method: "PATCH", cookie: builder.cookie, json: { value: 88.5 } });
    expect(((await value.json()) as { reading: Typed }).reading.valueDecimals).toBe(1);
  });

  it("answers 422 for decimals fewer than the value has, or not a small whole number", async () => {
    for (const valueDecimals of [1, -1, 2.5, 40, "3"]) {
      const res = await http(url(), {
        cookie: builder.cookie,
        json: { quantity: "bore-diameter", value: 88.012, valueDecimals, unit: "mm" },
      });
      expect(res.status, String(valueDecimals)).toBe(422);
      expect((await issues(res)).map((i) => i.path)).toEqual(["valueDecimals"]);
    }
  });
});

describe("migration 0022: the place out of an old label", () => {
  const migration = fs.readFileSync("drizzle/0022_reading_positions_from_labels.sql", "utf8");
  const statements = migration
    .split("--> statement-breakpoint")
    .map((s) => s.trim())
    .filter(Boolean);

  it("moves cylinder, depth and angle of an old bore label into the fields and keeps the rest", async () => {
    const [old] = await db()
      .insert(readings)
      .values([
        {
          recordingId,
          quantity: "bore-diameter",
          label: "cyl 3, 20 mm down, 90°, plate on",
          valueEntered: 88.01,
          unitEntered: "mm",
          valueSi: 0.08801,
          createdBy: builder.id,
        },
        { recordingId, quantity: "torque", label: "stud 7", valueEntered: 110, unitEntered: "N.m", valueSi: 110, createdBy: builder.id },
        {
          recordingId,
          quantity: "temperature",
          label: "cyl 3 head",
          valueEntered: 90,
          unitEntered: "degC",
          valueSi: 363.15,
          createdBy: builder.id,
        },
      ])
      .returning();
    for (const s of statements) await db().execute(sql.raw(s));
    const [bore] = await db().select().from(readings).where(eq(readings.id, old.id));
    expect(bore).toMatchObject({
      cylinder: 3,
      depthM: 0.02,
      depthUnit: "mm",
      angleDeg: 90,
      label: "plate on",
      fastener: null,
      journal: null,
    });
    const mine = await db().select().from(readings).where(eq(readings.recordingId, recordingId));
    expect(
      mine.find((r) => r.quantity === "torque" && r.valueEntered === 110 && r.createdBy === builder.id && r.fastener === 7),
    ).toMatchObject({ label: "" });
    expect(mine.find((r) => r.quantity === "temperature")).toMatchObject({ label: "cyl 3 head", cylinder: null });
  });

  it("moves the place of a filed test record's reading out of its note, past the immutability trigger, which stays on", async () => {
    const [rec] = await db()
      .select()
      .from(testRecords)
      .where(eq(testRecords.title, "Bore finish after torque-plate honing, all four cylinders"));
    const [first] = await db()
      .select()
      .from(testRecordReadings)
      .where(and(eq(testRecordReadings.recordId, rec.id), eq(testRecordReadings.specKey, "bore-dia")))
      .orderBy(asc(testRecordReadings.position))
      .limit(1);
    // Put it back as filed before positions existed: the place in the note.
    await db().execute(sql`ALTER TABLE test_record_readings DISABLE TRIGGER test_record_readings_no_update`);
    await db().execute(
      sql`UPDATE test_record_readings SET note = 'cyl 1, 10 mm down, 0°', cylinder = NULL, depth_m = NULL, depth_unit = NULL, angle_deg = NULL WHERE id = ${first.id}`,
    );
    await db().execute(sql`ALTER TABLE test_record_readings ENABLE TRIGGER test_record_readings_no_update`);
    for (const s of statements) await db().execute(sql.raw(s));
    const [after] = await db().select().from(testRecordReadings).where(eq(testRecordReadings.id, first.id));
    expect(after).toMatchObject({ cylinder: 1, depthM: 0.01, depthUnit: "mm", angleDeg: 0, note: "" });
    await expect(db().execute(sql`UPDATE test_record_readings SET note = 'x' WHERE id = ${first.id}`)).rejects.toThrow();
  });

  it("parses labels as the API does (positionFromLabel), quantity by quantity", async () => {
    const labels = [
      "cyl 3, 20 mm down, 90°",
      "Cylinder 2; 1.5 in deep, plate on",
      'bore #4, 0.75" below deck, 45 deg',
      "stud 4, moly",
      "Bolt no. 12",
      "main 3",
      "rod 2, Plastigage",
      "cyl 40, 400°",
      "cyl 1, cyl 2",
      "stud 0",
      "2000 mm down",
      "final pass",
      "",
    ];
    const quantities = [
      "torque",
      "clamp-load",
      "bore-diameter",
      "out-of-round",
      "clearance",
      "ring-gap",
      "leak-down",
      "temperature",
      "other",
    ];
    for (const q of quantities) {
      for (const label of labels) {
        const { rows } = await db().execute<{
          fastener: number | null;
          cylinder: number | null;
          journal: number | null;
          depth_m: number | null;
          depth_unit: string | null;
          angle_deg: number | null;
          rest: string;
        }>(sql`SELECT * FROM reading_position_from_label(reading_position_fields(${q}), ${label})`);
        const ts = positionFromLabel(q, label);
        const r = rows[0];
        expect({
          q,
          label,
          fastener: r.fastener,
          cylinder: r.cylinder,
          journal: r.journal,
          depthM: r.depth_m,
          depthUnit: r.depth_unit,
          angleDeg: r.angle_deg,
          rest: r.rest,
        }).toEqual({ q, label, ...ts.position, rest: ts.label });
      }
    }
  });

  it("gives a test record's spec the same fields as positionFieldsForSpec", async () => {
    const specs = [
      ["length", "Bore diameter, plate fitted"],
      ["length", "Out-of-round at any depth"],
      ["length", "Piston-to-wall, forged 2618 in iron liner"],
      ["length", "Main bearing oil clearance"],
      ["length", "Stud protrusion above deck"],
      ["length", "Deck flatness over the whole deck"],
      ["torque", "Head stud final torque"],
      ["stress", "Leak-down after break-in (as a pressure drop at 7 bar)"],
      ["temperature", "Oil temperature"],
    ];
    for (const [quantity, label] of specs) {
      const { rows } = await db().execute<{ f: string[] }>(sql`SELECT spec_position_fields(${quantity}, ${label}) AS f`);
      expect({ label, fields: rows[0].f }).toEqual({ label, fields: positionFieldsForSpec({ quantity, label }) });
    }
  });
});

describe("test record entry with positions", () => {
  const form = (revisionId: string, extra: Record<string, string>) => ({
    revisionId,
    title: "Bore finish, positions",
    workOrder: workOrder(),
    engineSerial: "LX23-0412",
    testedOn: new Date().toISOString().slice(0, 10),
    notes: "",
    ...extra,
  });

  it("files a bore reading's cylinder, depth and angle, and shows them on the record", async () => {
    const qc = await createUser("qc");
    const { slug, revisionId, spec } = await demoBoreSpec();
    const b = `r.${spec.id}.0`;
    const res = await http(`/test-records/new?procedure=${slug}`, {
      cookie: qc.cookie,
      form: form(revisionId, {
        [`${b}.value`]: "88.006",
        [`${b}.unit`]: "mm",
        [`${b}.cylinder`]: "2",
        [`${b}.depth`]: "0.5",
        [`${b}.depthUnit`]: "in",
        [`${b}.angle`]: "45",
        [`${b}.note`]: "plate on",
      }),
    });
    expect(res.status).toBe(302);
    const id = /\/test-records\/([0-9a-f-]{36})/.exec(res.headers.get("location") ?? "")![1];
    const [row] = await db().select().from(testRecordReadings).where(eq(testRecordReadings.recordId, id));
    expect(row).toMatchObject({
      cylinder: 2,
      depthM: expect.closeTo(0.0127, 12),
      depthUnit: "in",
      angleDeg: 45,
      note: "plate on",
      fastener: null,
      journal: null,
    });
    const page = (await (await http(`/test-records/${id}`, { cookie: qc.cookie })).text()).replaceAll("<!-- -->", "");
    expect(page).toContain("cyl 2, 0.5 in down, 45°, plate on");
  });

  it("answers the form with the field's error for an angle past 360° or a cylinder that is no whole number", async () => {
    const qc = await createUser("qc");
    const { slug, revisionId, spec } = await demoBoreSpec();
    const b = `r.${spec.id}.0`;
    const res = await http(`/test-records/new?procedure=${slug}`, {
      cookie: qc.cookie,
      form: form(revisionId, { [`${b}.value`]: "88.006", [`${b}.unit`]: "mm", [`${b}.cylinder`]: "2b", [`${b}.angle`]: "400" }),
    });
    expect(res.status).toBe(400);
    const page = (await res.text()).replaceAll("<!-- -->", "");
    expect(page).toContain("An angle runs from 0 to 360°.");
    expect(page).toContain("A cylinder number from 1 to 24.");
  });
});
