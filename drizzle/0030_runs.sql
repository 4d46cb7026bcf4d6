CREATE TYPE "public"."run_status" AS ENUM('open', 'finished', 'abandoned');--> statement-breakpoint
CREATE TABLE "run_entries" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"seq" serial NOT NULL,
	"run_id" uuid NOT NULL,
	"spec_id" uuid NOT NULL,
	"spec_key" text NOT NULL,
	"value_entered" double precision,
	"unit_entered" text NOT NULL,
	"value_decimals" integer,
	"value_si" double precision,
	"idempotency_key" text NOT NULL,
	"entered_by" text,
	"typed_at" timestamp with time zone NOT NULL,
	"received_at" timestamp with time zone DEFAULT now() NOT NULL,
	"device" text DEFAULT '' NOT NULL
);
--> statement-breakpoint
CREATE TABLE "run_photos" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"run_id" uuid NOT NULL,
	"spec_id" uuid NOT NULL,
	"spec_key" text NOT NULL,
	"mime" text NOT NULL,
	"bytes" integer NOT NULL,
	"taken_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "runs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"build_id" uuid NOT NULL,
	"procedure_id" uuid NOT NULL,
	"revision_id" uuid NOT NULL,
	"status" "run_status" DEFAULT 'open' NOT NULL,
	"current_step" integer DEFAULT 0 NOT NULL,
	"started_by" text,
	"started_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"ended_by" text,
	"ended_at" timestamp with time zone,
	"abandon_reason" text,
	"test_record_id" uuid
);
--> statement-breakpoint
ALTER TABLE "run_entries" ADD CONSTRAINT "run_entries_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_entries" ADD CONSTRAINT "run_entries_spec_id_procedure_specs_id_fk" FOREIGN KEY ("spec_id") REFERENCES "public"."procedure_specs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_entries" ADD CONSTRAINT "run_entries_entered_by_users_id_fk" FOREIGN KEY ("entered_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_photos" ADD CONSTRAINT "run_photos_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_photos" ADD CONSTRAINT "run_photos_spec_id_procedure_specs_id_fk" FOREIGN KEY ("spec_id") REFERENCES "public"."procedure_specs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_photos" ADD CONSTRAINT "run_photos_taken_by_users_id_fk" FOREIGN KEY ("taken_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_build_id_builds_id_fk" FOREIGN KEY ("build_id") REFERENCES "public"."builds"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_procedure_id_procedures_id_fk" FOREIGN KEY ("procedure_id") REFERENCES "public"."procedures"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_revision_id_procedure_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."procedure_revisions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_started_by_users_id_fk" FOREIGN KEY ("started_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_ended_by_users_id_fk" FOREIGN KEY ("ended_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_test_record_id_test_records_id_fk" FOREIGN KEY ("test_record_id") REFERENCES "public"."test_records"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "run_entries_idempotency_key_idx" ON "run_entries" USING btree ("idempotency_key");--> statement-breakpoint
CREATE INDEX "run_entries_run_idx" ON "run_entries" USING btree ("run_id","spec_key");--> statement-breakpoint
CREATE INDEX "run_photos_run_idx" ON "run_photos" USING btree ("run_id","spec_key");--> statement-breakpoint
CREATE INDEX "runs_build_idx" ON "runs" USING btree ("build_id","status");--> statement-breakpoint
CREATE INDEX "runs_status_idx" ON "runs" USING btree ("status","updated_at");