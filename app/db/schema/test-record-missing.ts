import { check, index, integer, pgTable, text, unique, uuid } from "drizzle-orm/pg-core";
import { sql } from "drizzle-orm";
import { procedureSpecs } from "./procedures";
import { testRecords } from "./test-records";

/**
 * The places a run offered for a spec (a cylinder, a main journal, a stud) and left without a
 * value, per version of the record's readings (migration 0034). A table of its own rather than
 * a jsonb column on test_records because, like the readings, every version keeps its own set
 * (an amendment that fills a place leaves the earlier version's row where it was), and each
 * place is a spec and a number the build page, sheet and exports join on, as the readings are.
 * Exactly one place column is set, as the run's place of that spec is one of them.
 */
export const testRecordMissingPlaces = pgTable(
  "test_record_missing_places",
  {
    recordId: uuid("record_id")
      .notNull()
      .references(() => testRecords.id, { onDelete: "cascade" }),
    version: integer("version").notNull(),
    specId: uuid("spec_id")
      .notNull()
      .references(() => procedureSpecs.id, { onDelete: "restrict" }),
    specKey: text("spec_key").notNull(),
    fastener: integer("fastener"),
    cylinder: integer("cylinder"),
    journal: integer("journal"),
  },
  (t) => [
    index("test_record_missing_places_record_idx").on(t.recordId, t.version),
    unique("test_record_missing_places_place_key")
      .on(t.recordId, t.version, t.specId, t.fastener, t.cylinder, t.journal)
      .nullsNotDistinct(),
    check("test_record_missing_places_one_place", sql`num_nonnulls(${t.fastener}, ${t.cylinder}, ${t.journal}) = 1`),
  ],
);
