import { pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { recordings, uploads } from "./recordings";

// Where a recording's bytes live (issue 18, docs/decisions/013). A recording with no row here
// is in the local folder, as every recording was before object storage.

export const recordingStorage = pgTable("recording_storage", {
  recordingId: uuid("recording_id")
    .primaryKey()
    .references(() => recordings.id, { onDelete: "cascade" }),
  /** "folder" or "s3". */
  backend: text("backend").notNull(),
  /** The original's key in that store (a finished tus upload stays where tus wrote it). */
  originalKey: text("original_key").notNull(),
  /** When `npm run storage:migrate` switched it over (its checksum verified), if it did. */
  movedAt: timestamp("moved_at", { withTimezone: true }),
});

/**
 * When the last bytes of an unfinished upload arrived, for uploads kept in an object store
 * (a file's mtime says it in the folder): an upload expires 14 days after it.
 */
export const uploadActivity = pgTable("upload_activity", {
  uploadId: text("upload_id")
    .primaryKey()
    .references(() => uploads.id, { onDelete: "cascade" }),
  lastByteAt: timestamp("last_byte_at", { withTimezone: true }).notNull().defaultNow(),
});
