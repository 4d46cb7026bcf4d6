ALTER TABLE "builds" ADD COLUMN "cylinders" integer;--> statement-breakpoint
ALTER TABLE "builds" ADD COLUMN "main_journals" integer;--> statement-breakpoint
ALTER TABLE "run_entries" ADD COLUMN "fastener" integer;--> statement-breakpoint
ALTER TABLE "run_entries" ADD COLUMN "cylinder" integer;--> statement-breakpoint
ALTER TABLE "run_entries" ADD COLUMN "journal" integer;--> statement-breakpoint
ALTER TABLE "run_photos" ADD COLUMN "fastener" integer;--> statement-breakpoint
ALTER TABLE "run_photos" ADD COLUMN "cylinder" integer;--> statement-breakpoint
ALTER TABLE "run_photos" ADD COLUMN "journal" integer;--> statement-breakpoint
ALTER TABLE "run_photos" ADD COLUMN "idempotency_key" text;--> statement-breakpoint
CREATE UNIQUE INDEX "run_photos_idempotency_key_idx" ON "run_photos" USING btree ("idempotency_key");--> statement-breakpoint
-- Hand-written: the counts a build form accepts, held by the database too (the run screen offers a row per cylinder and journal).
ALTER TABLE "builds" ADD CONSTRAINT "builds_cylinders_range" CHECK ("cylinders" IS NULL OR "cylinders" BETWEEN 1 AND 16);--> statement-breakpoint
ALTER TABLE "builds" ADD CONSTRAINT "builds_main_journals_range" CHECK ("main_journals" IS NULL OR "main_journals" BETWEEN 1 AND 12);
