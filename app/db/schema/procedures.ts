import { sql } from "drizzle-orm";
import {
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import { users } from "./auth";

// The procedures area owns this file; other areas may reference procedures.id,
// procedure_revisions.id and procedure_specs.id.
export const shopAreaEnum = pgEnum("shop_area", ["block", "heads", "fasteners", "rotating-assembly", "assembly", "qc"]);
export const revisionStateEnum = pgEnum("procedure_revision_state", ["draft", "in_review", "published", "superseded"]);

export const procedures = pgTable(
  "procedures",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    slug: text("slug").notNull(),
    /** The published title (or the first draft's, before anything is published). */
    title: text("title").notNull(),
    area: shopAreaEnum("area").notNull(),
    summary: text("summary").notNull().default(""),
    tags: text("tags").array().notNull().default(sql`'{}'::text[]`),
    /** The revision readers see; null until the first publish. */
    publishedRevisionId: uuid("published_revision_id"),
    publishedAt: timestamp("published_at", { withTimezone: true }),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("procedures_slug_idx").on(t.slug), index("procedures_area_idx").on(t.area)],
);

/** Old slugs keep redirecting to the procedure after a rename. */
export const procedureSlugs = pgTable("procedure_slugs", {
  slug: text("slug").primaryKey(),
  procedureId: uuid("procedure_id")
    .notNull()
    .references(() => procedures.id, { onDelete: "cascade" }),
  retiredAt: timestamp("retired_at", { withTimezone: true }).notNull().defaultNow(),
});

export const procedureRevisions = pgTable(
  "procedure_revisions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    procedureId: uuid("procedure_id")
      .notNull()
      .references(() => procedures.id, { onDelete: "cascade" }),
    /** 1, 2, 3 … per procedure, in order of creation. */
    number: integer("number").notNull(),
    state: revisionStateEnum("state").notNull().default("draft"),
    title: text("title").notNull(),
    summary: text("summary").notNull().default(""),
    area: shopAreaEnum("area").notNull(),
    tags: text("tags").array().notNull().default(sql`'{}'::text[]`),
    /** TipTap JSON, validated and sanitized by app/lib/procedures/document.ts before it is stored. */
    doc: jsonb("doc").notNull(),
    wordCount: integer("word_count").notNull().default(0),
    /** Optimistic concurrency: every save must name the version it started from. */
    version: integer("version").notNull().default(1),
    basedOnRevisionId: uuid("based_on_revision_id"),
    authorId: text("author_id").references(() => users.id, { onDelete: "set null" }),
    lastSavedBy: text("last_saved_by").references(() => users.id, { onDelete: "set null" }),
    changeNote: text("change_note"),
    reviewedBy: text("reviewed_by").references(() => users.id, { onDelete: "set null" }),
    /** The editor who published this revision (reviewed_by is overwritten by each review step). */
    publishedBy: text("published_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    submittedAt: timestamp("submitted_at", { withTimezone: true }),
    publishedAt: timestamp("published_at", { withTimezone: true }),
    supersededAt: timestamp("superseded_at", { withTimezone: true }),
  },
  (t) => [
    uniqueIndex("procedure_revisions_number_idx").on(t.procedureId, t.number),
    index("procedure_revisions_state_idx").on(t.state),
    // At most one open (draft or in review) revision per procedure.
    uniqueIndex("procedure_revisions_one_open_idx").on(t.procedureId).where(sql`state in ('draft', 'in_review')`),
    // At most one published revision per procedure.
    uniqueIndex("procedure_revisions_one_published_idx").on(t.procedureId).where(sql`state = 'published'`),
  ],
);

/**
 * Every return of a revision to Draft: who, when and why, kept in order (a revision may be returned,
 * submitted again and returned again). The latest return after the latest submission is the one
 * still waiting on the author.
 */
export const procedureRevisionReturns = pgTable(
  "procedure_revision_returns",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    revisionId: uuid("revision_id")
      .notNull()
      .references(() => procedureRevisions.id, { onDelete: "cascade" }),
    returnedBy: text("returned_by").references(() => users.id, { onDelete: "set null" }),
    reason: text("reason").notNull(),
    returnedAt: timestamp("returned_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("procedure_revision_returns_revision_idx").on(t.revisionId, t.returnedAt)],
);

/** Specs extracted from a revision's document at save. Row ids are stable per revision (upserted by spec key). */
export const procedureSpecs = pgTable(
  "procedure_specs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    revisionId: uuid("revision_id")
      .notNull()
      .references(() => procedureRevisions.id, { onDelete: "cascade" }),
    procedureId: uuid("procedure_id")
      .notNull()
      .references(() => procedures.id, { onDelete: "cascade" }),
    /** The spec block's own id inside the document; kept across revisions, so a diff can match specs. */
    specKey: text("spec_key").notNull(),
    position: integer("position").notNull(),
    label: text("label").notNull(),
    /** length | force | torque | stress | temperature (docs/calculations.md unit kinds). */
    quantity: text("quantity").notNull(),
    /** The entered unit code (docs/calculations.md codes, e.g. "N.m", "mm"). */
    unit: text("unit").notNull(),
    nominal: doublePrecision("nominal"),
    min: doublePrecision("min"),
    max: doublePrecision("max"),
    /** The same limits in SI (m, N, N.m, Pa, K). */
    siUnit: text("si_unit").notNull(),
    nominalSi: doublePrecision("nominal_si"),
    minSi: doublePrecision("min_si"),
    maxSi: doublePrecision("max_si"),
    note: text("note").notNull().default(""),
  },
  (t) => [uniqueIndex("procedure_specs_key_idx").on(t.revisionId, t.specKey), index("procedure_specs_procedure_idx").on(t.procedureId)],
);

/** Procedure links in a revision's document (from → to). */
export const procedureLinks = pgTable(
  "procedure_links",
  {
    revisionId: uuid("revision_id")
      .notNull()
      .references(() => procedureRevisions.id, { onDelete: "cascade" }),
    fromProcedureId: uuid("from_procedure_id")
      .notNull()
      .references(() => procedures.id, { onDelete: "cascade" }),
    toProcedureId: uuid("to_procedure_id").notNull(),
  },
  (t) => [primaryKey({ columns: [t.revisionId, t.toProcedureId] }), index("procedure_links_to_idx").on(t.toProcedureId)],
);

/** Video moments embedded in a revision's document. recording_id has no FK: recordings is another area's table. */
export const procedureMoments = pgTable(
  "procedure_moments",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    revisionId: uuid("revision_id")
      .notNull()
      .references(() => procedureRevisions.id, { onDelete: "cascade" }),
    procedureId: uuid("procedure_id")
      .notNull()
      .references(() => procedures.id, { onDelete: "cascade" }),
    position: integer("position").notNull(),
    recordingId: uuid("recording_id").notNull(),
    startS: doublePrecision("start_s").notNull(),
    endS: doublePrecision("end_s"),
    caption: text("caption").notNull().default(""),
  },
  (t) => [index("procedure_moments_revision_idx").on(t.revisionId), index("procedure_moments_recording_idx").on(t.recordingId)],
);

export const procedureWatchers = pgTable(
  "procedure_watchers",
  {
    procedureId: uuid("procedure_id")
      .notNull()
      .references(() => procedures.id, { onDelete: "cascade" }),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.procedureId, t.userId] })],
);

/** A save that lost an optimistic-concurrency race: kept whole, so nobody's text is lost. */
export const procedureConflictCopies = pgTable("procedure_conflict_copies", {
  id: uuid("id").primaryKey().defaultRandom(),
  revisionId: uuid("revision_id")
    .notNull()
    .references(() => procedureRevisions.id, { onDelete: "cascade" }),
  userId: text("user_id").references(() => users.id, { onDelete: "set null" }),
  baseVersion: integer("base_version").notNull(),
  title: text("title").notNull(),
  summary: text("summary").notNull().default(""),
  tags: text("tags").array().notNull().default(sql`'{}'::text[]`),
  doc: jsonb("doc").notNull(),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
});
