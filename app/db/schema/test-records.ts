import { doublePrecision, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid, date } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { builds } from "./builds";
import { procedureRevisions, procedures, procedureSpecs } from "./procedures";
import { positionColumns, readings, recordings } from "./recordings";

// The test records area: a QC result filed against the procedure revision in force.
// Readings are never updated: an amendment writes a new version of the whole reading set and
// keeps every earlier one (version 0 is the original filing).

// "incomplete": nothing out of spec, but a spec of the revision has no reading (migration 0024).
export const recordVerdictEnum = pgEnum("test_record_verdict", ["within", "out", "incomplete"]);
export const readingVerdictEnum = pgEnum("test_record_reading_verdict", ["within", "below", "above", "unchecked"]);

export const testRecords = pgTable(
  "test_records",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    procedureId: uuid("procedure_id")
      .notNull()
      .references(() => procedures.id, { onDelete: "restrict" }),
    /** The revision published when the record was filed; never changes afterwards. */
    revisionId: uuid("revision_id")
      .notNull()
      .references(() => procedureRevisions.id, { onDelete: "restrict" }),
    title: text("title").notNull(),
    workOrder: text("work_order").notNull(),
    /** The build it was filed for (migration 0029); work_order keeps the build's number as text. */
    buildId: uuid("build_id").references(() => builds.id, { onDelete: "restrict" }),
    engineSerial: text("engine_serial").notNull().default(""),
    testedOn: date("tested_on", { mode: "string" }).notNull(),
    recordingId: uuid("recording_id").references(() => recordings.id, { onDelete: "set null" }),
    recordingStartS: doublePrecision("recording_start_s"),
    recordingEndS: doublePrecision("recording_end_s"),
    notes: text("notes").notNull().default(""),
    /** Verdict of the current reading set (the latest version). */
    verdict: recordVerdictEnum("verdict").notNull(),
    /** 0 = as filed; n = after the n-th amendment. */
    currentVersion: integer("current_version").notNull().default(0),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    amendedAt: timestamp("amended_at", { withTimezone: true }),
  },
  (t) => [
    index("test_records_procedure_idx").on(t.procedureId, t.testedOn),
    index("test_records_work_order_idx").on(t.workOrder),
    index("test_records_build_idx").on(t.buildId),
    index("test_records_tested_on_idx").on(t.testedOn),
  ],
);

export const testRecordReadings = pgTable(
  "test_record_readings",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    recordId: uuid("record_id")
      .notNull()
      .references(() => testRecords.id, { onDelete: "cascade" }),
    /** Which version of the record's readings this row belongs to. */
    version: integer("version").notNull(),
    specId: uuid("spec_id")
      .notNull()
      .references(() => procedureSpecs.id, { onDelete: "restrict" }),
    specKey: text("spec_key").notNull(),
    position: integer("position").notNull(),
    valueEntered: doublePrecision("value_entered").notNull(),
    unitEntered: text("unit_entered").notNull(),
    /** Decimals typed (88.010 → 3: the double keeps 88.01); null when not known (shown as the value reads). Migration 0026. */
    valueDecimals: integer("value_decimals"),
    valueSi: doublePrecision("value_si").notNull(),
    /** The value in the spec's own unit, as compared with its limits. */
    valueInSpecUnit: doublePrecision("value_in_spec_unit").notNull(),
    verdict: readingVerdictEnum("verdict").notNull(),
    /** Anything else about the reading ("plate on"); where it was measured is in the position fields. */
    note: text("note").notNull().default(""),
    // Where it was measured, as on a recording's readings.
    ...positionColumns(),
    /** Pulled in from a reading typed on the linked recording. */
    sourceReadingId: uuid("source_reading_id").references(() => readings.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("test_record_readings_record_idx").on(t.recordId, t.version)],
);

/** A correction: who changed what and why; the earlier version stays. */
export const testRecordAmendments = pgTable(
  "test_record_amendments",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    recordId: uuid("record_id")
      .notNull()
      .references(() => testRecords.id, { onDelete: "cascade" }),
    /** The version this amendment created (1, 2, …). */
    version: integer("version").notNull(),
    reason: text("reason").notNull(),
    /** [{ field | spec, label, before, after }] */
    changes: jsonb("changes").$type<AmendmentChange[]>().notNull(),
    verdictBefore: recordVerdictEnum("verdict_before").notNull(),
    verdictAfter: recordVerdictEnum("verdict_after").notNull(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("test_record_amendments_version_idx").on(t.recordId, t.version)],
);

export type AmendmentChange = { kind: "field" | "spec"; key: string; label: string; before: string; after: string };

/** A calculator run on the record's readings, kept with the record. */
export const testRecordCalcs = pgTable(
  "test_record_calcs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    recordId: uuid("record_id")
      .notNull()
      .references(() => testRecords.id, { onDelete: "cascade" }),
    /** The reading version it was computed from. */
    version: integer("version").notNull(),
    /** "distortion" | "piston-to-wall" */
    kind: text("kind").notNull(),
    label: text("label").notNull(),
    input: jsonb("input").notNull(),
    result: jsonb("result").notNull(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("test_record_calcs_record_idx").on(t.recordId)],
);
