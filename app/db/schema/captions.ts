import { index, integer, numeric, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { recordings } from "./recordings";

// What is said in a recording (issue 17): its captions as cues, where they came from, and every
// correction of a cue with who made it and when.

/** Where a recording's captions came from: one row per recording (attaching again replaces them). */
export const captionSources = pgTable("caption_sources", {
  recordingId: uuid("recording_id")
    .primaryKey()
    .references(() => recordings.id, { onDelete: "cascade" }),
  /** "file" (a WebVTT or SRT file someone attached) or "embedded" (a subtitle track inside the video). */
  kind: text("kind").notNull(),
  /** The file's name, or the track's description ("subtitle track 1 (mov_text)"). */
  name: text("name").notNull(),
  /** "vtt" or "srt": the format the cues were read from. */
  format: text("format").notNull(),
  attachedBy: text("attached_by").references(() => users.id, { onDelete: "set null" }),
  attachedAt: timestamp("attached_at", { withTimezone: true }).notNull().defaultNow(),
});

/**
 * One caption cue. Times are exact decimals of seconds (milliseconds, as both file formats
 * write them), so an export gives back the times that were imported.
 */
export const captionCues = pgTable(
  "caption_cues",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    recordingId: uuid("recording_id")
      .notNull()
      .references(() => recordings.id, { onDelete: "cascade" }),
    /** Order in the file, from 1. */
    position: integer("position").notNull(),
    startS: numeric("start_s", { precision: 10, scale: 3, mode: "number" }).notNull(),
    endS: numeric("end_s", { precision: 10, scale: 3, mode: "number" }).notNull(),
    text: text("text").notNull(),
    /** 1 as imported; each correction adds one (a PATCH names the version it corrects). */
    version: integer("version").notNull().default(1),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("caption_cues_position_idx").on(t.recordingId, t.position),
    index("caption_cues_start_idx").on(t.recordingId, t.startS),
  ],
);

/** Every correction of a cue's text: before, after, who and when. */
export const captionEdits = pgTable(
  "caption_edits",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    cueId: uuid("cue_id")
      .notNull()
      .references(() => captionCues.id, { onDelete: "cascade" }),
    /** The version the correction made. */
    version: integer("version").notNull(),
    textBefore: text("text_before").notNull(),
    textAfter: text("text_after").notNull(),
    editedBy: text("edited_by").references(() => users.id, { onDelete: "set null" }),
    editedAt: timestamp("edited_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("caption_edits_cue_idx").on(t.cueId, t.version)],
);
