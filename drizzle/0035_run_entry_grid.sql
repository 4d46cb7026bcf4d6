ALTER TABLE "run_entries" ADD COLUMN "depth_m" double precision;--> statement-breakpoint
ALTER TABLE "run_entries" ADD COLUMN "depth_unit" text;--> statement-breakpoint
ALTER TABLE "run_entries" ADD COLUMN "angle_deg" double precision;--> statement-breakpoint
-- Hand-written: a grid reading names its depth and angle together, in a cylinder, as the entry schema does.
ALTER TABLE "run_entries" ADD CONSTRAINT "run_entries_grid_place" CHECK (
  ("depth_m" IS NULL AND "depth_unit" IS NULL AND "angle_deg" IS NULL)
  OR ("depth_m" BETWEEN 0 AND 1 AND "depth_unit" IN ('mm', 'in') AND "angle_deg" BETWEEN 0 AND 360 AND "cylinder" IS NOT NULL)
);
