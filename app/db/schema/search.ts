import { bigserial, index, integer, pgTable, text, timestamp, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";

/**
 * Search outbox: one row per changed record, written in the same transaction as the change by
 * database triggers (drizzle/*_search_triggers.sql), drained by the worker to the search
 * service. A row is done only after the service reported its task succeeded.
 */
export const searchOutbox = pgTable(
  "search_outbox",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    /** procedure | revision | recording | mark | reading | test_record | person | search_words */
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

/**
 * The shop's search words: each row is a group of words and phrases that mean the same on
 * this floor ("ptw", "piston to wall"). Editors keep the list on /search/words; the worker
 * applies it as the search service's synonyms setting (a trigger queues a 'search_words' row
 * in the outbox in the same transaction). The first groups come with migration 0014.
 */
export const searchWordGroups = pgTable("search_word_groups", {
  id: uuid("id").primaryKey().defaultRandom(),
  /** Lower-case, trimmed, 2–8 entries; a word belongs to at most one group (checked on save). */
  words: text("words").array().notNull(),
  updatedBy: text("updated_by").references(() => users.id, { onDelete: "set null" }),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});
