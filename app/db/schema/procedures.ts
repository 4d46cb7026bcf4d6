import { index, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { users } from "./auth";

// The procedures area owns this file; other areas may reference procedures.id.
export const shopAreaEnum = pgEnum("shop_area", ["block", "heads", "fasteners", "rotating-assembly", "assembly", "qc"]);

export const procedures = pgTable(
  "procedures",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    slug: text("slug").notNull(),
    title: text("title").notNull(),
    area: shopAreaEnum("area").notNull(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("procedures_slug_idx").on(t.slug), index("procedures_area_idx").on(t.area)],
);
