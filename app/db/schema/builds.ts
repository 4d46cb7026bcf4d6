import { date, doublePrecision, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";

// The builds area: one engine job (a work order), everything measured and filed for it hangs
// off the build by build_id (test_records, recordings, marks; a recording's readings through
// their recording). Migration 0029 made one build per work order text found before it.

/**
 * Open → On the bench → Finished → Delivered, forward only; a Finished or Delivered build can
 * be reopened (back to On the bench) with a reason, kept in reopen_reason and the timeline.
 */
export const buildStatusEnum = pgEnum("build_status", ["open", "on_bench", "finished", "delivered"]);

export const builds = pgTable(
  "builds",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    /** The work order number, the shop's own format (LEW-24-0117); unique, upper case. */
    number: text("number").notNull().unique(),
    customerName: text("customer_name").notNull(),
    /** A phone number or address, as the customer gave it; the sheet is mailed to an address found here. */
    customerContact: text("customer_contact").notNull().default(""),
    engine: text("engine").notNull().default(""),
    engineSerial: text("engine_serial").notNull().default(""),
    // Bore and stroke as readings keep a size: metres (SI) plus the unit and decimals typed,
    // so 86.00 mm shows as typed and converts at the equivalent resolution.
    boreM: doublePrecision("bore_m"),
    boreUnit: text("bore_unit"),
    boreDecimals: integer("bore_decimals"),
    strokeM: doublePrecision("stroke_m"),
    strokeUnit: text("stroke_unit"),
    strokeDecimals: integer("stroke_decimals"),
    /** How many cylinders and main journals the engine has: a run offers a row per cylinder and per journal (migration 0033). */
    cylinders: integer("cylinders"),
    mainJournals: integer("main_journals"),
    notes: text("notes").notNull().default(""),
    leadBuilderId: text("lead_builder_id").references(() => users.id, { onDelete: "set null" }),
    status: buildStatusEnum("status").notNull().default("open"),
    receivedOn: date("received_on", { mode: "string" }),
    promisedOn: date("promised_on", { mode: "string" }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
    deliveredAt: timestamp("delivered_at", { withTimezone: true }),
    /** Why it was last reopened; null when never reopened. */
    reopenReason: text("reopen_reason"),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("builds_status_idx").on(t.status, t.updatedAt)],
);

export type BuildEventDetail = Record<string, string | number | boolean | null>;

/**
 * The build's timeline: who did what, when. Kinds: created, edited, status, reopened,
 * sheet-mailed (detail: to, file), linked (migration 0029). Filed test records, recordings and
 * marks are read from their own tables for the timeline, not copied here.
 */
export const buildEvents = pgTable(
  "build_events",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    buildId: uuid("build_id")
      .notNull()
      .references(() => builds.id, { onDelete: "cascade" }),
    kind: text("kind").notNull(),
    detail: jsonb("detail").$type<BuildEventDetail>().notNull().default({}),
    actorId: text("actor_id").references(() => users.id, { onDelete: "set null" }),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("build_events_build_idx").on(t.buildId, t.at)],
);
