// Demo test records for Larkspur Engine Works (PRODUCT.md's invented shop): a handful of QC
// results for work orders LEW-24-0117 …, one of them out of spec. Needs the demo procedures:
// a record whose procedure or spec is missing is skipped. Idempotent (work order + title).
import { and, asc, eq } from "drizzle-orm";
import type { NodePgDatabase } from "drizzle-orm/node-postgres";
import { auditLog, procedureRevisions, procedures, procedureSpecs, testRecordReadings, testRecords } from "../../app/db/schema";
import { toSI, type UnitCode } from "../../app/lib/calc";
import { positionFieldsForSpec, positionFromLabel } from "../../app/lib/recordings/positions";
import { evaluateRecord, readingVerdict } from "../../app/lib/test-records/verdict";

type Db = NodePgDatabase<Record<string, unknown>>;
type R = [value: number, unit: string, note?: string];
type Demo = {
  slug: string;
  workOrder: string;
  title: string;
  engineSerial: string;
  daysAgo: number;
  by: string;
  notes: string;
  readings: Record<string, R[]>;
};

/** One cylinder as the honing procedure asks it measured: at 10, 50 and 90 mm down, each at 0°, 45°, 90° and 135°. */
const bores = (cyl: number, d: number[]): R[] =>
  [10, 50, 90].flatMap((depth, li) => [0, 45, 90, 135].map((a, ai): R => [d[li * 4 + ai], "mm", `cyl ${cyl}, ${depth} mm down, ${a}°`]));

/** A value per place, "stud 1" … or "main 1" …, in order. */
const each = (place: string, unit: string, values: number[]): R[] => values.map((v, i): R => [v, unit, `${place} ${i + 1}`]);

const DEMOS: Demo[] = [
  {
    slug: "torque-plate-honing-iron-lined-block",
    workOrder: "LEW-24-0117",
    title: "Bore finish after torque-plate honing, all four cylinders",
    engineSerial: "LX23-0412",
    daysAgo: 9,
    by: "demo-tomas",
    notes: "Plate torqued to the head stud figure, block at 21 °C. Two-point gauge zeroed on the 88.000 ring.",
    readings: {
      // Largest minus smallest at any depth is 0.003 mm in every cylinder: the out-of-round below.
      "bore-dia": [
        ...bores(1, [88.006, 88.004, 88.003, 88.005, 88.005, 88.004, 88.004, 88.005, 88.004, 88.003, 88.003, 88.004]),
        ...bores(2, [88.007, 88.005, 88.004, 88.005, 88.006, 88.005, 88.005, 88.006, 88.005, 88.004, 88.004, 88.005]),
        ...bores(3, [88.006, 88.005, 88.003, 88.004, 88.005, 88.004, 88.003, 88.004, 88.004, 88.004, 88.003, 88.003]),
        ...bores(4, [88.005, 88.004, 88.002, 88.004, 88.004, 88.004, 88.003, 88.004, 88.004, 88.003, 88.003, 88.003]),
      ],
      "bore-oor": each("cyl", "mm", [0.003, 0.003, 0.003, 0.003]),
    },
  },
  {
    slug: "main-bearing-oil-clearance",
    workOrder: "LEW-24-0117",
    title: "Main bearing oil clearance, all five journals",
    engineSerial: "LX23-0412",
    daysAgo: 7,
    by: "demo-tomas",
    notes: "Crank measured in two planes per journal; shells from the standard-size set.",
    readings: {
      "main-oil": each("main", "mm", [0.048, 0.051, 0.05, 0.049, 0.052]),
    },
  },
  {
    slug: "head-stud-installation-and-torque-sequence",
    workOrder: "LEW-24-0117",
    title: "Head studs: protrusion and final torque, all ten",
    engineSerial: "LX23-0412",
    daysAgo: 6,
    by: "demo-marcus",
    notes: "Moly on threads and washer faces; three passes in the spiral sequence, each nut paint-marked after its final pass.",
    readings: {
      "studs-protrusion": each("stud", "mm", [52.0, 52.1, 51.9, 52.0, 52.1, 52.0, 51.9, 52.0, 52.1, 52.0]),
      "studs-final": each("stud", "N.m", [110, 111, 109, 110, 112, 110, 109, 111, 110, 110]),
    },
  },
  {
    slug: "checking-piston-to-wall-on-forged-pistons",
    workOrder: "LEW-24-0117",
    title: "Piston-to-wall, forged 2618 set",
    engineSerial: "LX23-0412",
    daysAgo: 8,
    by: "demo-tomas",
    notes: "Skirt measured at the gauge point, 12 mm up from the bottom of the skirt.",
    readings: {
      "ptw-2618": [
        [0.068, "mm", "cyl 1"],
        [0.066, "mm", "cyl 2"],
        [0.071, "mm", "cyl 3"],
        [0.069, "mm", "cyl 4"],
      ],
    },
  },
  {
    slug: "head-stud-installation-and-torque-sequence",
    workOrder: "LEW-24-0118",
    title: "Head studs: protrusion and final torque",
    engineSerial: "LX23-0415",
    daysAgo: 7,
    by: "demo-tomas",
    notes: "Final pass checked with the click wrench after the third stage.",
    readings: {
      "studs-protrusion": [
        [52.1, "mm", "stud 1"],
        [52.0, "mm", "stud 4"],
        [51.9, "mm", "stud 7"],
        [52.2, "mm", "stud 10"],
      ],
      "studs-final": [
        [110, "N.m", "stud 4"],
        [111, "N.m", "stud 5"],
      ],
    },
  },
  {
    slug: "main-bearing-oil-clearance",
    workOrder: "LEW-24-0119",
    title: "Main bearing oil clearance before assembly",
    engineSerial: "LX23-0419",
    daysAgo: 5,
    by: "demo-tomas",
    notes: "Main 3 measured loose twice; the crank goes back to be checked for journal size and the shell set replaced.",
    readings: {
      "main-oil": [
        [0.052, "mm", "main 1"],
        [0.055, "mm", "main 2"],
        [0.071, "mm", "main 3"],
        [0.054, "mm", "main 4"],
        [0.05, "mm", "main 5"],
      ],
    },
  },
  {
    slug: "leak-down-test-after-break-in",
    workOrder: "LEW-24-0117",
    title: "Leak-down after the break-in run",
    engineSerial: "LX23-0412",
    daysAgo: 2,
    by: "demo-tomas",
    notes: "Engine at operating temperature, each cylinder at TDC on compression.",
    readings: {
      "leak-pct": [
        [0.35, "bar", "cyl 1"],
        [0.42, "bar", "cyl 2"],
        [0.38, "bar", "cyl 3"],
        [0.4, "bar", "cyl 4"],
      ],
    },
  },
];

const isoDay = (daysAgo: number) => new Date(Date.now() - daysAgo * 86_400_000).toISOString().slice(0, 10);

export async function seedTestRecords(db: Db): Promise<number | "skipped"> {
  let added = 0;
  let found = 0;
  for (const d of DEMOS) {
    const [p] = await db.select().from(procedures).where(eq(procedures.slug, d.slug));
    if (!p?.publishedRevisionId) continue;
    found++;
    const [dup] = await db
      .select({ id: testRecords.id })
      .from(testRecords)
      .where(and(eq(testRecords.workOrder, d.workOrder), eq(testRecords.title, d.title)));
    if (dup) continue;
    const [rev] = await db.select().from(procedureRevisions).where(eq(procedureRevisions.id, p.publishedRevisionId));
    const specs = await db.select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, rev.id)).orderBy(asc(procedureSpecs.position));
    const typed: Record<string, { value: number; unit: string; note: string }[]> = {};
    for (const s of specs) {
      const readings = d.readings[s.specKey];
      if (readings?.length) typed[s.id] = readings.map(([value, unit, note]) => ({ value, unit, note: note ?? "" }));
    }
    const limits = specs.map((s) => ({
      id: s.id,
      label: s.label,
      quantity: s.quantity,
      unit: s.unit,
      min: s.min,
      max: s.max,
      nominal: s.nominal,
    }));
    const evaluation = evaluateRecord(limits, typed);
    if (!evaluation.verdict) continue; // the procedure's specs changed: nothing of this demo fits
    const when = new Date(Date.now() - d.daysAgo * 86_400_000);
    await db.transaction(async (tx) => {
      const [rec] = await tx
        .insert(testRecords)
        .values({
          procedureId: p.id,
          revisionId: rev.id,
          title: d.title,
          workOrder: d.workOrder,
          engineSerial: d.engineSerial,
          testedOn: isoDay(d.daysAgo),
          notes: d.notes,
          verdict: evaluation.verdict!,
          createdBy: d.by,
          createdAt: when,
        })
        .returning({ id: testRecords.id });
      const rows = specs.flatMap((s) =>
        (typed[s.id] ?? []).map((r, i) => {
          const v = readingVerdict(limits.find((l) => l.id === s.id)!, r);
          // "cyl 2, 10 mm down, 45°" goes into the position fields that fit the spec; the rest stays a note.
          const where = positionFromLabel(positionFieldsForSpec(s), r.note);
          return {
            recordId: rec.id,
            version: 0,
            specId: s.id,
            specKey: s.specKey,
            position: i,
            valueEntered: r.value,
            unitEntered: r.unit,
            valueSi: toSI(r.value, r.unit as UnitCode),
            valueInSpecUnit: v.valueInSpecUnit,
            verdict: v.verdict,
            note: where.label,
            ...where.position,
            createdAt: when,
          };
        }),
      );
      await tx.insert(testRecordReadings).values(rows);
      await tx.insert(auditLog).values({
        actorId: d.by,
        action: "create",
        entity: "test_record",
        entityId: rec.id,
        detail: { workOrder: d.workOrder, revision: rev.number, verdict: evaluation.verdict, seeded: true },
      });
    });
    added++;
  }
  return found === 0 ? "skipped" : added;
}
