import { doublePrecision, index, integer, pgEnum, pgTable, serial, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { builds } from "./builds";
import { procedureRevisions, procedures, procedureSpecs } from "./procedures";
import { testRecords } from "./test-records";

// The runs area: a procedure worked step by step on a build, at the bench. The revision is
// pinned when the run starts and never changes; finishing files a test record against it.
// Entries are never updated: each value typed is a row of its own (with the device's
// idempotency key), and a spec's value at a position (cylinder, journal, stud) is its latest
// entry there (app/lib/runs/entries.ts; positions since migration 0033, a grid's depth and angle
// since 0035).

/**
 * Where an entry was measured: the one numbered place a spec is worked through on the run
 * screen (a cylinder for a bore or a ring gap, a journal for a bearing clearance, a stud for a
 * torque), as on test records' readings; all null for a spec measured once.
 */
const runPositionColumns = () => ({
  fastener: integer("fastener"),
  cylinder: integer("cylinder"),
  journal: integer("journal"),
});

/** open: being worked; finished: its test record is filed; abandoned: stopped with a reason, nothing filed. */
export const runStatusEnum = pgEnum("run_status", ["open", "finished", "abandoned"]);

export const runs = pgTable(
  "runs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    buildId: uuid("build_id")
      .notNull()
      .references(() => builds.id, { onDelete: "restrict" }),
    procedureId: uuid("procedure_id")
      .notNull()
      .references(() => procedures.id, { onDelete: "restrict" }),
    /** The revision published when the run started; kept even when a newer one is published. */
    revisionId: uuid("revision_id")
      .notNull()
      .references(() => procedureRevisions.id, { onDelete: "restrict" }),
    status: runStatusEnum("status").notNull().default("open"),
    /** The step the run was left on (0-based, app/lib/runs/steps.ts), so another device opens there. */
    currentStep: integer("current_step").notNull().default(0),
    startedBy: text("started_by").references(() => users.id, { onDelete: "set null" }),
    startedAt: timestamp("started_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    endedBy: text("ended_by").references(() => users.id, { onDelete: "set null" }),
    endedAt: timestamp("ended_at", { withTimezone: true }),
    abandonReason: text("abandon_reason"),
    testRecordId: uuid("test_record_id").references(() => testRecords.id, { onDelete: "set null" }),
  },
  (t) => [index("runs_build_idx").on(t.buildId, t.status), index("runs_status_idx").on(t.status, t.updatedAt)],
);

export const runEntries = pgTable(
  "run_entries",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    /** Arrival order, to break a tie between two entries typed in the same millisecond. */
    seq: serial("seq").notNull(),
    runId: uuid("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    specId: uuid("spec_id")
      .notNull()
      .references(() => procedureSpecs.id, { onDelete: "restrict" }),
    specKey: text("spec_key").notNull(),
    ...runPositionColumns(),
    /**
     * A bore read for a step's Bore distortion grid: its depth below the deck (metres, with the
     * unit typed) and angle, as on readings (migration 0035); null for every other entry.
     */
    depthM: doublePrecision("depth_m"),
    depthUnit: text("depth_unit"),
    angleDeg: doublePrecision("angle_deg"),
    /** null: the value was cleared. */
    valueEntered: doublePrecision("value_entered"),
    unitEntered: text("unit_entered").notNull(),
    /** Decimals typed (88.010 → 3), as on readings (migration 0026). */
    valueDecimals: integer("value_decimals"),
    valueSi: doublePrecision("value_si"),
    /** Made by the device per entry: the same key sent again is the same entry, stored once. */
    idempotencyKey: text("idempotency_key").notNull(),
    enteredBy: text("entered_by").references(() => users.id, { onDelete: "set null" }),
    /** On the device's clock, when it was typed (it may arrive much later, after an offline stretch). */
    typedAt: timestamp("typed_at", { withTimezone: true }).notNull(),
    receivedAt: timestamp("received_at", { withTimezone: true }).notNull().defaultNow(),
    device: text("device").notNull().default(""),
  },
  (t) => [uniqueIndex("run_entries_idempotency_key_idx").on(t.idempotencyKey), index("run_entries_run_idx").on(t.runId, t.specKey)],
);

/** A photo of a gauge or a wrench's display, taken for a spec's entry; the file is in the upload store. */
export const runPhotos = pgTable(
  "run_photos",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    runId: uuid("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    specId: uuid("spec_id")
      .notNull()
      .references(() => procedureSpecs.id, { onDelete: "restrict" }),
    specKey: text("spec_key").notNull(),
    ...runPositionColumns(),
    /** Made by the device per photo: a photo kept offline and sent again is stored once. */
    idempotencyKey: text("idempotency_key"),
    /** image/jpeg, image/png, image/webp, image/heic: from the file's bytes, not its name. */
    mime: text("mime").notNull(),
    bytes: integer("bytes").notNull(),
    takenBy: text("taken_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("run_photos_run_idx").on(t.runId, t.specKey), uniqueIndex("run_photos_idempotency_key_idx").on(t.idempotencyKey)],
);
