// Migration 0034 parses the notes line finishRun used to write ("Not measured on the run:
// Head stud final torque: Stud 2.") back into test_record_missing_places, version by version,
// and sets a record Incomplete again where an old amendment had read it Within spec though
// the place was still empty. Run on rows made here, inside a transaction that is rolled back.
import fs from "node:fs";
import path from "node:path";
import { asc, eq, sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { procedures, procedureSpecs, testRecordMissingPlaces, testRecordReadings, testRecords } from "~/db/schema";
import { db } from "~/lib/db.server";

/** The hand-written statements of migration 0034: the backfill and the verdict it corrects. */
function backfillStatements(): string[] {
  const file = fs.readFileSync(path.resolve(import.meta.dirname, "../../drizzle/0034_test_record_missing_places.sql"), "utf8");
  const parts = file.split("--> statement-breakpoint").map((s) => s.trim());
  const first = parts.findIndex((s) => s.startsWith("-- Records a run filed before this migration"));
  expect(first).toBeGreaterThan(0);
  return parts.slice(first);
}

describe("migration 0034", () => {
  it("parses the old notes line back into places per version, keeps what a version fills, and makes the record Incomplete again", async () => {
    const [proc] = await db().select().from(procedures).where(eq(procedures.slug, "head-stud-installation-and-torque-sequence"));
    const specs = await db().select().from(procedureSpecs).where(eq(procedureSpecs.revisionId, proc.publishedRevisionId!));
    const torque = specs.find((s) => s.label === "Head stud final torque")!;
    const reading = (recordId: string, version: number, fastener: number, position: number) => ({
      recordId,
      version,
      specId: torque.id,
      specKey: torque.specKey,
      position,
      valueEntered: 110,
      unitEntered: "N.m",
      valueSi: 110,
      valueInSpecUnit: 110,
      verdict: "within" as const,
      fastener,
    });
    const header = {
      procedureId: proc.id,
      revisionId: proc.publishedRevisionId!,
      workOrder: "LEW-26-00034",
      testedOn: "2026-11-30",
      verdict: "within" as const,
    };
    const rolledBack = new Error("roll back");
    let seen: unknown[] = [];
    await db()
      .transaction(async (tx) => {
        // Filed with studs 2 and 4 empty; amended once (stud 2 filled) and read Within spec since.
        const [amended] = await tx
          .insert(testRecords)
          .values({
            ...header,
            title: "old run, amended",
            notes: "Torqued in three passes.\n\nNot measured on the run: Head stud final torque: Stud 2, Stud 4.",
            currentVersion: 1,
          })
          .returning({ id: testRecords.id });
        // Filed Incomplete and never amended; a label that is no spec of the revision is left to the notes.
        const [filed] = await tx
          .insert(testRecords)
          .values({
            ...header,
            title: "old run",
            verdict: "incomplete",
            notes: "Not measured on the run: Head stud final torque: Stud 3; Not a spec here: Stud 1.",
          })
          .returning({ id: testRecords.id });
        // Notes that only look alike (the line was typed in the middle of other words) are left alone.
        const [typed] = await tx
          .insert(testRecords)
          .values({ ...header, title: "typed notes", notes: "Not measured on the run: Head stud final torque: Stud 2. Re-torqued later." })
          .returning({ id: testRecords.id });
        await tx
          .insert(testRecordReadings)
          .values([
            reading(amended.id, 0, 1, 0),
            reading(amended.id, 0, 3, 1),
            reading(amended.id, 1, 1, 0),
            reading(amended.id, 1, 2, 1),
            reading(amended.id, 1, 3, 2),
            reading(filed.id, 0, 1, 0),
            reading(filed.id, 0, 2, 1),
            reading(typed.id, 0, 1, 0),
          ]);
        for (const stmt of backfillStatements()) await tx.execute(sql.raw(stmt));
        const places = async (id: string) =>
          (
            await tx
              .select()
              .from(testRecordMissingPlaces)
              .where(eq(testRecordMissingPlaces.recordId, id))
              .orderBy(asc(testRecordMissingPlaces.version), asc(testRecordMissingPlaces.fastener))
          ).map((p) => [p.version, p.specKey, p.fastener, p.cylinder, p.journal]);
        const verdict = async (id: string) => (await tx.select().from(testRecords).where(eq(testRecords.id, id)))[0].verdict;
        seen = [
          await places(amended.id),
          await verdict(amended.id),
          await places(filed.id),
          await verdict(filed.id),
          await places(typed.id),
          await verdict(typed.id),
        ];
        throw rolledBack;
      })
      .catch((err) => {
        if (err !== rolledBack) throw err;
      });
    expect(seen).toEqual([
      [
        [0, torque.specKey, 2, null, null],
        [0, torque.specKey, 4, null, null],
        [1, torque.specKey, 4, null, null],
      ],
      "incomplete",
      [[0, torque.specKey, 3, null, null]],
      "incomplete",
      [],
      "within",
    ]);
  });
});
