import { sql } from "drizzle-orm";
import { bigint, boolean, doublePrecision, index, integer, jsonb, pgEnum, pgTable, real, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { builds } from "./builds";
import { procedures } from "./procedures";

// The recordings area: uploads (tus), recordings, marks and readings.

export const recordingStateEnum = pgEnum("recording_state", ["processing", "ready", "rejected", "failed", "damaged"]);

/** One row per tus upload; the id is the tus upload id (random, never from the client). */
export const uploads = pgTable(
  "uploads",
  {
    id: text("id").primaryKey(),
    userId: text("user_id").references(() => users.id, { onDelete: "set null" }),
    fileName: text("file_name").notNull(),
    fileType: text("file_type"),
    size: bigint("size", { mode: "number" }).notNull(),
    title: text("title").notNull(),
    description: text("description").notNull().default(""),
    tags: text("tags").array().notNull().default(sql`'{}'::text[]`),
    recordingId: uuid("recording_id"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [index("uploads_user_idx").on(t.userId)],
);

export const recordings = pgTable(
  "recordings",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    title: text("title").notNull(),
    description: text("description").notNull().default(""),
    tags: text("tags").array().notNull().default(sql`'{}'::text[]`),
    state: recordingStateEnum("state").notNull().default("processing"),
    /** Why a recording was rejected, damaged or failed, in words for the page. */
    stateReason: text("state_reason"),
    /** Processing progress 0..1 while state is "processing". */
    progress: real("progress").notNull().default(0),
    attempts: integer("attempts").notNull().default(0),
    uploadId: text("upload_id"),
    originalName: text("original_name").notNull(),
    originalSize: bigint("original_size", { mode: "number" }).notNull(),
    /** Whether the original bytes are still stored (removed for a rejected file). */
    hasOriginal: boolean("has_original").notNull().default(true),
    hasRendition: boolean("has_rendition").notNull().default(false),
    hasPoster: boolean("has_poster").notNull().default(false),
    container: text("container"),
    videoCodec: text("video_codec"),
    audioCodec: text("audio_codec"),
    width: integer("width"),
    height: integer("height"),
    frameRate: doublePrecision("frame_rate"),
    durationS: doublePrecision("duration_s"),
    uploadedBy: text("uploaded_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    readyAt: timestamp("ready_at", { withTimezone: true }),
    /** The build (engine job) it was recorded for, if any (migration 0029). */
    buildId: uuid("build_id").references(() => builds.id, { onDelete: "set null" }),
  },
  (t) => [
    index("recordings_created_idx").on(t.createdAt),
    index("recordings_uploader_idx").on(t.uploadedBy),
    index("recordings_build_idx").on(t.buildId),
  ],
);

/** A time-stamped note: a point (t_end null) or a span. Procedures link to /recordings/:id?t=<t_start>. */
export const marks = pgTable(
  "marks",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    recordingId: uuid("recording_id")
      .notNull()
      .references(() => recordings.id, { onDelete: "cascade" }),
    procedureId: uuid("procedure_id").references(() => procedures.id, { onDelete: "set null" }),
    /** The build the mark is about, if any (migration 0029); a recording's build by default. */
    buildId: uuid("build_id").references(() => builds.id, { onDelete: "set null" }),
    tStart: doublePrecision("t_start").notNull(),
    tEnd: doublePrecision("t_end"),
    text: text("text").notNull(),
    tags: text("tags").array().notNull().default(sql`'{}'::text[]`),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("marks_recording_idx").on(t.recordingId, t.tStart),
    index("marks_procedure_idx").on(t.procedureId),
    index("marks_build_idx").on(t.buildId),
  ],
);

/**
 * Where a reading was taken (app/lib/recordings/positions.ts says which fit each quantity);
 * the same columns on a recording's readings and a test record's.
 */
export const positionColumns = () => ({
  /** Stud or bolt number, for torque and clamp load. */
  fastener: integer("fastener"),
  cylinder: integer("cylinder"),
  /** Main or rod journal, for bearing readings. */
  journal: integer("journal"),
  /** Depth below the deck in metres, and the unit it was typed in (mm, in). */
  depthM: doublePrecision("depth_m"),
  depthUnit: text("depth_unit"),
  /** Angle on the gauge, 0–360°. */
  angleDeg: doublePrecision("angle_deg"),
});

export type ReadingConditions = { lube?: string; tool?: string; pass?: string; note?: string };

/** A measured value at a moment: SI value plus what was typed, for display. */
export const readings = pgTable(
  "readings",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    recordingId: uuid("recording_id")
      .notNull()
      .references(() => recordings.id, { onDelete: "cascade" }),
    quantity: text("quantity").notNull(),
    label: text("label").notNull().default(""),
    valueSi: doublePrecision("value_si").notNull(),
    valueEntered: doublePrecision("value_entered").notNull(),
    unitEntered: text("unit_entered").notNull(),
    /** Decimals typed (88.010 → 3: the double keeps 88.01); null when not known (shown as the value reads). Migration 0026. */
    valueDecimals: integer("value_decimals"),
    conditions: jsonb("conditions").$type<ReadingConditions>().notNull().default({}),
    ...positionColumns(),
    t: doublePrecision("t"),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("readings_recording_idx").on(t.recordingId, t.t)],
);
