// A run's Bore distortion grid over HTTP: a step holding a bore measured per cylinder and a
// Bore distortion calculator asks each cylinder's diameters at the calculator's depths and
// angles. Entries carry depth and angle and are stored exactly once under retried keys, the
// latest per spec and full place counts, finishing files each diameter with its cylinder, depth
// and angle, and the build page's distortion for that cylinder and its sheet read them.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { evaluate } from "mathjs";
import { beforeAll, describe, expect, it } from "vitest";
import {
  builds,
  procedureRevisions,
  procedures,
  procedureSpecs,
  runEntries,
  testRecordMissingPlaces,
  testRecordReadings,
  testRecords,
} from "~/db/schema";
import { calculateDistortion, type DistortionResult } from "~/lib/calc";
import { buildCalcs } from "~/lib/builds/page.server";
import { db } from "~/lib/db.server";
import { getRun } from "~/lib/runs/runs.server";
import { getTestRecord } from "~/lib/test-records/records.server";
import { createUser, http, type TestUser } from "../support/app";

const t = (text: string) => ({ type: "text", text });
const p = (text: string) => ({ type: "paragraph", content: [t(text)] });
const DEPTHS = [10, 50];
const ANGLES = [0, 45, 90, 135];
const DOC = {
  type: "doc",
  content: [
    { type: "heading", attrs: { level: 2 }, content: [t("Steps")] },
    {
      type: "orderedList",
      attrs: { start: 1 },
      content: [{ type: "listItem", content: [p("Measure each bore at 10 and 50 mm down at 0°, 45°, 90° and 135°, plate fitted.")] }],
    },
    {
      type: "spec",
      attrs: {
        id: "bore",
        label: "Bore diameter, plate fitted",
        quantity: "length",
        unit: "mm",
        nominal: 88,
        min: 87.995,
        max: 88.01,
        note: "",
      },
    },
    {
      type: "calculator",
      attrs: {
        kind: "distortion",
        title: "Example bore",
        preset: {
          mode: "diametral",
          reference: { value: 88, unit: "mm" },
          readings: DEPTHS.flatMap((d) =>
            ANGLES.map((a) => ({ depth: { value: d, unit: "mm" }, angleDeg: a, diameter: { value: 88.005, unit: "mm" } })),
          ),
        },
      },
    },
  ],
};

async function fixture() {
  const tag = randomUUID().slice(0, 8);
  const [proc] = await db()
    .insert(procedures)
    .values({ slug: `grid-${tag}`, title: `Grid check ${tag}`, area: "block" })
    .returning();
  const [rev] = await db()
    .insert(procedureRevisions)
    .values({ procedureId: proc.id, number: 1, state: "published", title: proc.title, area: "block", doc: DOC, publishedAt: new Date() })
    .returning();
  await db().insert(procedureSpecs).values({
    revisionId: rev.id,
    procedureId: proc.id,
    position: 0,
    specKey: "bore",
    label: "Bore diameter, plate fitted",
    quantity: "length",
    unit: "mm",
    nominal: 88,
    min: 87.995,
    max: 88.01,
    siUnit: "m",
  });
  await db().update(procedures).set({ publishedRevisionId: rev.id, publishedAt: new Date() }).where(eq(procedures.id, proc.id));
  const number = `GRD-26-${String(Math.floor(Math.random() * 90000) + 10000)}`;
  const [build] = await db()
    .insert(builds)
    .values({ number, customerName: "Test customer", engine: "Test twin", engineSerial: `SN-${tag}`, status: "on_bench", cylinders: 2 })
    .returning();
  return { proc, build };
}

// Cylinder 2's diameters, 10 mm down then 50 mm down, at 0°, 45°, 90°, 135°.
const CYL2 = [
  [88.006, 88.012, 88.009, 88.003],
  [88.004, 88.008, 88.007, 88.001],
];

const cell = (cylinder: number, depth: number, angle: number, value: number, extra: Record<string, unknown> = {}) => ({
  key: randomUUID(),
  specKey: "bore",
  position: { cylinder, depth: { value: depth, unit: "mm" }, angle },
  value,
  unit: "mm",
  decimals: 3,
  typedAt: new Date().toISOString(),
  device: "test tablet",
  ...extra,
});
const gridOf = (cylinder: number, values: number[][]) => DEPTHS.flatMap((d, i) => ANGLES.map((a, j) => cell(cylinder, d, a, values[i][j])));

describe("a run's Bore distortion grid", () => {
  let builder: TestUser;
  let apprentice: TestUser;
  beforeAll(async () => {
    builder = await createUser("builder");
    apprentice = await createUser("apprentice");
  });

  const post = (runId: string, json: unknown) => http(`/api/runs/${runId}/entries`, { method: "POST", cookie: builder.cookie, json });
  async function startRun(slug: string, build: string) {
    const res = await http("/runs/start", { cookie: builder.cookie, form: { procedure: slug, build } });
    expect(res.status).toBe(302);
    return /\/runs\/([0-9a-f-]{36})$/.exec(res.headers.get("location") ?? "")?.[1] as string;
  }

  it("stores grid entries with depth and angle exactly once under retries, the latest per cylinder, depth and angle", async () => {
    const { proc, build } = await fixture();
    const runId = await startRun(proc.slug, build.number);
    const cells = gridOf(2, CYL2);
    // Sent, then sent again three times at once (answers lost), then in reverse order.
    expect((await post(runId, { entries: cells })).status).toBe(200);
    const again = await Promise.all([1, 2, 3].map(() => post(runId, { entries: cells })));
    for (const r of again) expect(((await r.json()) as { saved: { duplicate: boolean }[] }).saved.every((s) => s.duplicate)).toBe(true);
    expect((await post(runId, { entries: [...cells].reverse() })).status).toBe(200);
    const rows = await db().select().from(runEntries).where(eq(runEntries.runId, runId));
    expect(rows).toHaveLength(8);
    expect(rows.find((r) => r.angleDeg === 45 && r.depthM === 0.01)).toMatchObject({ cylinder: 2, depthUnit: "mm", valueEntered: 88.012 });

    // The same key at another angle is the device's mistake, never a move.
    const moved = await post(runId, { entries: [{ ...cells[0], position: { ...cells[0].position, angle: 90 } }] });
    expect(moved.status).toBe(409);

    // A later typing at one cell replaces that cell only; an earlier one arriving late does not.
    const later = cell(2, 10, 45, 88.011, { typedAt: new Date(Date.now() + 60_000).toISOString() });
    const stale = cell(2, 10, 45, 88.002, { typedAt: "2026-01-01T00:00:00.000Z" });
    expect((await post(runId, { entries: [later, stale] })).status).toBe(200);
    const view = await getRun(runId);
    const values = Object.entries(view!.values).filter(([k]) => k.startsWith("bore@cylinder2@"));
    expect(values).toHaveLength(8);
    expect(values.find(([k]) => k === "bore@cylinder2@d0.01a45")?.[1].value).toBe(88.011);
    // Cylinder 2 is measured (in its grid), cylinder 1 not yet.
    expect(view!.progress).toEqual({ measured: 1, total: 2 });
  });

  it("refuses a depth or an angle alone, outside a cylinder or off a bore, naming the field", async () => {
    const { proc, build } = await fixture();
    const runId = await startRun(proc.slug, build.number);
    const bads: unknown[] = [
      { cylinder: 1, angle: 45 },
      { cylinder: 1, depth: { value: 10, unit: "mm" } },
      { depth: { value: 10, unit: "mm" }, angle: 45 },
      { cylinder: 1, depth: { value: 10, unit: "cm" }, angle: 45 },
      { cylinder: 1, depth: { value: -1, unit: "mm" }, angle: 45 },
      { cylinder: 1, depth: { value: 10, unit: "mm" }, angle: 361 },
      { cylinder: 3, depth: { value: 10, unit: "mm" }, angle: 45 },
    ];
    for (const position of bads) {
      const res = await post(runId, { entries: [{ ...cell(1, 10, 0, 88), position }] });
      expect(res.status, JSON.stringify(position)).toBe(422);
      const out = (await res.json()) as { issues?: { path: string }[] };
      expect(
        out.issues?.some((i) => i.path.startsWith("entries.0.position")),
        JSON.stringify(out),
      ).toBe(true);
    }
    expect(await db().select().from(runEntries).where(eq(runEntries.runId, runId))).toHaveLength(0);
  });

  it("files each diameter with its cylinder, depth and angle, and the build page's distortion for that cylinder reads them", async () => {
    const { proc, build } = await fixture();
    const runId = await startRun(proc.slug, build.number);
    const cyl1 = CYL2.map((row) => row.map((v) => v - 0.001));
    expect((await post(runId, { entries: [...gridOf(1, cyl1), ...gridOf(2, CYL2)] })).status).toBe(200);
    const done = await http(`/runs/${runId}`, { cookie: builder.cookie, form: { intent: "finish" } });
    expect(done.status).toBe(302);
    const recordId = /\/test-records\/([0-9a-f-]{36})/.exec(done.headers.get("location") ?? "")?.[1] as string;
    const readings = await db().select().from(testRecordReadings).where(eq(testRecordReadings.recordId, recordId));
    expect(readings).toHaveLength(16);
    const at = (c: number, d: number, a: number) => readings.find((r) => r.cylinder === c && r.depthM === d / 1000 && r.angleDeg === a);
    expect(at(2, 10, 45)).toMatchObject({ valueEntered: 88.012, depthUnit: "mm" });
    expect(at(1, 50, 135)).toMatchObject({ valueEntered: 88.0 });

    // The build's calculators: cylinder 2's Bore distortion from exactly these diameters.
    const view = await getTestRecord(recordId);
    const calc = buildCalcs([view!]).find((c) => c.label.endsWith("cylinder 2"));
    expect(calc?.ok).toBe(true);
    const direct = calculateDistortion({
      mode: "diametral",
      readings: DEPTHS.flatMap((d, i) =>
        ANGLES.map((a, j) => ({
          depth: { value: d, unit: "mm" as const },
          angleDeg: a,
          diameter: { value: CYL2[i][j], unit: "mm" as const },
        })),
      ),
    });
    expect(calc?.ok && calc.result).toEqual(direct);
    // Source: mathjs, max − min of the four diameters 10 mm down (a two-point gauge's out-of-round).
    expect(calc?.ok && (calc.result as DistortionResult).levels[0].outOfRound_mm).toBeCloseTo(
      evaluate("max(88.006, 88.012, 88.009, 88.003) - min(88.006, 88.012, 88.009, 88.003)"),
      9,
    );

    // The build page shows both cylinders' distortion; the sheet says where each diameter was read.
    const page = await (await http(`/builds/${build.number}`, { cookie: apprentice.cookie })).text();
    expect(page).toContain("Bore distortion, Bore diameter, plate fitted, cylinder 1");
    expect(page).toContain("Bore distortion, Bore diameter, plate fitted, cylinder 2");
    expect(page).not.toContain("without a depth or an angle");
    const sheet = await (await http(`/builds/${build.number}/sheet`, { cookie: apprentice.cookie })).text();
    expect(sheet).toContain("cyl 2, 10 mm down, 45°");
  });
  it("files a half-filled grid Incomplete with its cylinder missing, and Within spec only when every diameter is typed", async () => {
    const { proc, build } = await fixture();
    const finish = async (entries: unknown[]) => {
      const runId = await startRun(proc.slug, build.number);
      expect((await post(runId, { entries })).status).toBe(200);
      const done = await http(`/runs/${runId}`, { cookie: builder.cookie, form: { intent: "finish" } });
      expect(done.status).toBe(302);
      const recordId = /\/test-records\/([0-9a-f-]{36})/.exec(done.headers.get("location") ?? "")?.[1] as string;
      const [rec] = await db().select().from(testRecords).where(eq(testRecords.id, recordId));
      const empty = await db().select().from(testRecordMissingPlaces).where(eq(testRecordMissingPlaces.recordId, recordId));
      return { verdict: rec.verdict, missing: empty.map((m) => [m.specKey, m.cylinder]).sort() };
    };
    // Every diameter within 87.995–88.010 mm, so only an empty place can keep the record from Within spec.
    const within = [
      [88.004, 88.006, 88.005, 88.003],
      [88.004, 88.005, 88.006, 88.002],
    ];
    // Each run gets entries with keys of its own (a key names one entry of one run).
    const top2 = () => gridOf(2, within).slice(0, ANGLES.length); // 10 mm down only: four of the eight diameters
    const full1 = () => gridOf(1, within);
    // Cylinder 1 whole, cylinder 2's top row only: every diameter typed is within its limits.
    expect(await finish([...full1(), ...top2()])).toEqual({ verdict: "incomplete", missing: [["bore", 2]] });
    // Both cylinders begun and neither full: still Incomplete, both named.
    expect(await finish([...full1().slice(0, 3), ...top2()])).toEqual({
      verdict: "incomplete",
      missing: [
        ["bore", 1],
        ["bore", 2],
      ],
    });
    // Every place of both grids typed: Within spec, nothing missing.
    expect(await finish([...gridOf(1, within), ...gridOf(2, within)])).toEqual({ verdict: "within", missing: [] });
  });
});
