CREATE TYPE "public"."test_record_reading_verdict" AS ENUM('within', 'below', 'above', 'unchecked');--> statement-breakpoint
CREATE TYPE "public"."test_record_verdict" AS ENUM('within', 'out');--> statement-breakpoint
CREATE TABLE "test_record_amendments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"record_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"reason" text NOT NULL,
	"changes" jsonb NOT NULL,
	"verdict_before" "test_record_verdict" NOT NULL,
	"verdict_after" "test_record_verdict" NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "test_record_calcs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"record_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"kind" text NOT NULL,
	"label" text NOT NULL,
	"input" jsonb NOT NULL,
	"result" jsonb NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "test_record_readings" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"record_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"spec_id" uuid NOT NULL,
	"spec_key" text NOT NULL,
	"position" integer NOT NULL,
	"value_entered" double precision NOT NULL,
	"unit_entered" text NOT NULL,
	"value_si" double precision NOT NULL,
	"value_in_spec_unit" double precision NOT NULL,
	"verdict" "test_record_reading_verdict" NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"source_reading_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "test_records" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"procedure_id" uuid NOT NULL,
	"revision_id" uuid NOT NULL,
	"title" text NOT NULL,
	"work_order" text NOT NULL,
	"engine_serial" text DEFAULT '' NOT NULL,
	"tested_on" date NOT NULL,
	"recording_id" uuid,
	"recording_start_s" double precision,
	"recording_end_s" double precision,
	"notes" text DEFAULT '' NOT NULL,
	"verdict" "test_record_verdict" NOT NULL,
	"current_version" integer DEFAULT 0 NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"amended_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "test_record_amendments" ADD CONSTRAINT "test_record_amendments_record_id_test_records_id_fk" FOREIGN KEY ("record_id") REFERENCES "public"."test_records"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_record_amendments" ADD CONSTRAINT "test_record_amendments_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_record_calcs" ADD CONSTRAINT "test_record_calcs_record_id_test_records_id_fk" FOREIGN KEY ("record_id") REFERENCES "public"."test_records"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_record_calcs" ADD CONSTRAINT "test_record_calcs_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_record_readings" ADD CONSTRAINT "test_record_readings_record_id_test_records_id_fk" FOREIGN KEY ("record_id") REFERENCES "public"."test_records"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_record_readings" ADD CONSTRAINT "test_record_readings_spec_id_procedure_specs_id_fk" FOREIGN KEY ("spec_id") REFERENCES "public"."procedure_specs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_record_readings" ADD CONSTRAINT "test_record_readings_source_reading_id_readings_id_fk" FOREIGN KEY ("source_reading_id") REFERENCES "public"."readings"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_records" ADD CONSTRAINT "test_records_procedure_id_procedures_id_fk" FOREIGN KEY ("procedure_id") REFERENCES "public"."procedures"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_records" ADD CONSTRAINT "test_records_revision_id_procedure_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."procedure_revisions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_records" ADD CONSTRAINT "test_records_recording_id_recordings_id_fk" FOREIGN KEY ("recording_id") REFERENCES "public"."recordings"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_records" ADD CONSTRAINT "test_records_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "test_record_amendments_version_idx" ON "test_record_amendments" USING btree ("record_id","version");--> statement-breakpoint
CREATE INDEX "test_record_calcs_record_idx" ON "test_record_calcs" USING btree ("record_id");--> statement-breakpoint
CREATE INDEX "test_record_readings_record_idx" ON "test_record_readings" USING btree ("record_id","version");--> statement-breakpoint
CREATE INDEX "test_records_procedure_idx" ON "test_records" USING btree ("procedure_id","tested_on");--> statement-breakpoint
CREATE INDEX "test_records_work_order_idx" ON "test_records" USING btree ("work_order");--> statement-breakpoint
CREATE INDEX "test_records_tested_on_idx" ON "test_records" USING btree ("tested_on");