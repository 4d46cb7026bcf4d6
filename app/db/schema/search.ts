import { bigserial, index, integer, pgTable, text, timestamp } from "drizzle-orm/pg-core";

/**
 * Search outbox: one row per changed record, written in the same transaction as the change by
 * database triggers (drizzle/*_search_triggers.sql), drained by the worker to the search
 * service. A row is done only after the service reported its task succeeded.
 */
export const searchOutbox = pgTable(
  "search_outbox",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    /** procedure | revision | recording | mark | reading | test_record */
    kind: text("kind").notNull(),
    entityId: text("entity_id").notNull(),
    attempts: integer("attempts").notNull().default(0),
    lastError: text("last_error"),
    nextAttemptAt: timestamp("next_attempt_at", { withTimezone: true }).notNull().defaultNow(),
    doneAt: timestamp("done_at", { withTimezone: true }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("search_outbox_pending_idx").on(t.doneAt, t.nextAttemptAt)],
);
