// Demo builds for Larkspur Engine Works (invented), the three the scenario needs: LEW-24-0117
// delivered with a full build sheet, LEW-24-0118 on the bench (with the demo's open run),
// LEW-24-0119 with main 3 out of spec. All three are the 2.3 L aluminium block with iron liners
// that the demo procedures are written for: bore 88.00 mm (the honing procedure's size) and
// stroke 94.60 mm, so 4 × π/4 × (8.8 cm)² × 9.46 cm = 2301.5 cm³, the 2.3 L the engine is called.
// Customers and addresses are made up (.example). Runs
// after the test records and recordings: it links the records by work order number, and puts the
// demo recordings on builds by id, as a person would by choosing the build (their marks take the
// recording's build). Idempotent (by number; links only rows not yet linked).
import { and, eq, isNull } from "drizzle-orm";
import type { NodePgDatabase } from "drizzle-orm/node-postgres";
import { buildEvents, builds, marks, recordings, testRecords } from "../../app/db/schema";
import { BORE_CLIP_ID } from "./captions";
import { DEMO_ID } from "./recordings";

type Db = NodePgDatabase<Record<string, unknown>>;
type Status = "open" | "on_bench" | "finished" | "delivered";

type DemoBuild = {
  number: string;
  customerName: string;
  customerContact: string;
  engine: string;
  engineSerial: string;
  boreMm: [value: number, decimals: number];
  strokeMm: [value: number, decimals: number];
  /** Cylinders and main journals: the rows a run offers per cylinder and journal. */
  counts: [cylinders: number, mainJournals: number];
  notes: string;
  lead: string;
  receivedDaysAgo: number;
  promisedDaysAhead: number;
  /** Each status the build went through after Open, with how many days ago. */
  moves: [Status, number][];
};

const DEMO_BUILDS: DemoBuild[] = [
  {
    number: "LEW-24-0117",
    customerName: "Wren Valley Rally Club",
    customerContact: "workshop@wrenvalley.example",
    engine: "Inline four, 2.3 L, aluminium block with iron liners, turbocharged, forged pistons",
    engineSerial: "LX23-0412",
    boreMm: [88.0, 2],
    strokeMm: [94.6, 2],
    counts: [4, 5],
    notes: "Stage rally engine. Bored to the first oversize, torque-plate honed, forged 2618 pistons, head studs in place of bolts.",
    lead: "demo-marcus",
    receivedDaysAgo: 16,
    promisedDaysAhead: -1,
    moves: [
      ["on_bench", 12],
      ["finished", 2],
      ["delivered", 1],
    ],
  },
  {
    number: "LEW-24-0118",
    customerName: "Hollis Boatyard",
    customerContact: "engines@hollisboatyard.example",
    engine: "Inline four, 2.3 L, aluminium block with iron liners, marine conversion",
    engineSerial: "LX23-0415",
    boreMm: [88.0, 2],
    strokeMm: [94.6, 2],
    counts: [4, 5],
    notes: "Raw-water cooled; head studs and gasket replaced after overheating.",
    lead: "demo-marcus",
    receivedDaysAgo: 10,
    promisedDaysAhead: 6,
    moves: [["on_bench", 8]],
  },
  {
    number: "LEW-24-0119",
    customerName: "A. Brennan",
    customerContact: "+44 1632 960 118",
    engine: "Inline four, 2.3 L, aluminium block with iron liners, naturally aspirated",
    engineSerial: "LX23-0419",
    boreMm: [88.0, 2],
    strokeMm: [94.6, 2],
    counts: [4, 5],
    notes: "Spun bearing on main 3. Crank to be checked for journal size before the shells are chosen.",
    lead: "demo-tomas",
    receivedDaysAgo: 7,
    promisedDaysAhead: 10,
    moves: [["on_bench", 6]],
  },
];

const ago = (days: number) => new Date(Date.now() - days * 86_400_000);
const isoDay = (daysAgo: number) => ago(daysAgo).toISOString().slice(0, 10);

export async function seedBuilds(db: Db): Promise<number> {
  let added = 0;
  for (const d of DEMO_BUILDS) {
    let [b] = await db.select().from(builds).where(eq(builds.number, d.number));
    if (!b) {
      const last = d.moves.at(-1);
      const finished = d.moves.find(([s]) => s === "finished");
      const delivered = d.moves.find(([s]) => s === "delivered");
      [b] = await db
        .insert(builds)
        .values({
          number: d.number,
          customerName: d.customerName,
          customerContact: d.customerContact,
          engine: d.engine,
          engineSerial: d.engineSerial,
          boreM: d.boreMm[0] / 1000,
          boreUnit: "mm",
          boreDecimals: d.boreMm[1],
          strokeM: d.strokeMm[0] / 1000,
          strokeUnit: "mm",
          strokeDecimals: d.strokeMm[1],
          cylinders: d.counts[0],
          mainJournals: d.counts[1],
          notes: d.notes,
          leadBuilderId: d.lead,
          status: last?.[0] ?? "open",
          receivedOn: isoDay(d.receivedDaysAgo),
          promisedOn: isoDay(-d.promisedDaysAhead),
          finishedAt: finished ? ago(finished[1]) : null,
          deliveredAt: delivered ? ago(delivered[1]) : null,
          createdBy: d.lead,
          createdAt: ago(d.receivedDaysAgo),
          updatedAt: ago(last?.[1] ?? d.receivedDaysAgo),
        })
        .returning();
      let from: Status = "open";
      await db.insert(buildEvents).values([
        { buildId: b.id, kind: "created", detail: { customer: d.customerName }, actorId: d.lead, at: ago(d.receivedDaysAgo) },
        ...d.moves.map(([to, days]) => {
          const e = { buildId: b.id, kind: "status", detail: { from, to }, actorId: d.lead, at: ago(days) };
          from = to;
          return e;
        }),
      ]);
      added++;
    }
    // A demo seeded before builds held their counts (migration 0033) gets them once.
    if (b.cylinders == null && b.mainJournals == null)
      await db.update(builds).set({ cylinders: d.counts[0], mainJournals: d.counts[1] }).where(eq(builds.id, b.id));
    await db
      .update(testRecords)
      .set({ buildId: b.id })
      .where(and(eq(testRecords.workOrder, d.number), isNull(testRecords.buildId)));
  }
  // The bench recording of head studs belongs to the build whose studs were replaced; the bore
  // gauge clip to the build that was bored and honed.
  for (const [recordingId, number] of [
    [DEMO_ID, "LEW-24-0118"],
    [BORE_CLIP_ID, "LEW-24-0117"],
  ] as const) {
    const [b] = await db.select().from(builds).where(eq(builds.number, number));
    if (!b) continue;
    await db
      .update(recordings)
      .set({ buildId: b.id })
      .where(and(eq(recordings.id, recordingId), isNull(recordings.buildId)));
    await db
      .update(marks)
      .set({ buildId: b.id })
      .where(and(eq(marks.recordingId, recordingId), isNull(marks.buildId)));
  }
  return added;
}
