ALTER TABLE "readings" ADD COLUMN "fastener" integer;--> statement-breakpoint
ALTER TABLE "readings" ADD COLUMN "cylinder" integer;--> statement-breakpoint
ALTER TABLE "readings" ADD COLUMN "journal" integer;--> statement-breakpoint
ALTER TABLE "readings" ADD COLUMN "depth_m" double precision;--> statement-breakpoint
ALTER TABLE "readings" ADD COLUMN "depth_unit" text;--> statement-breakpoint
ALTER TABLE "readings" ADD COLUMN "angle_deg" double precision;--> statement-breakpoint
ALTER TABLE "test_record_readings" ADD COLUMN "fastener" integer;--> statement-breakpoint
ALTER TABLE "test_record_readings" ADD COLUMN "cylinder" integer;--> statement-breakpoint
ALTER TABLE "test_record_readings" ADD COLUMN "journal" integer;--> statement-breakpoint
ALTER TABLE "test_record_readings" ADD COLUMN "depth_m" double precision;--> statement-breakpoint
ALTER TABLE "test_record_readings" ADD COLUMN "depth_unit" text;--> statement-breakpoint
ALTER TABLE "test_record_readings" ADD COLUMN "angle_deg" double precision;