import { bigserial, index, integer, pgTable, primaryKey, text, timestamp, uuid } from "drizzle-orm/pg-core";
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
 * Records the worker could not index (their documents could not be built, e.g. data the
 * document builder cannot read), set aside with the reason so that they hold back no one
 * else's changes. Admins see them on /admin/search and /healthz counts them. An entry goes
 * when a later change of that record is indexed, or when an admin's "try again" succeeds.
 * `kind` and `entity_id` are those of the outbox (mark, reading, revision…).
 */
export const searchSetAside = pgTable(
  "search_set_aside",
  {
    kind: text("kind").notNull(),
    entityId: text("entity_id").notNull(),
    reason: text("reason").notNull(),
    /** How many times indexing it failed (each change or "try again" is one more). */
    attempts: integer("attempts").notNull().default(1),
    firstAt: timestamp("first_at", { withTimezone: true }).notNull().defaultNow(),
    lastAt: timestamp("last_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.kind, t.entityId] })],
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
