CREATE TYPE "public"."build_status" AS ENUM('open', 'on_bench', 'finished', 'delivered');--> statement-breakpoint
CREATE TABLE "build_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"build_id" uuid NOT NULL,
	"kind" text NOT NULL,
	"detail" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"actor_id" text,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "builds" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"number" text NOT NULL,
	"customer_name" text NOT NULL,
	"customer_contact" text DEFAULT '' NOT NULL,
	"engine" text DEFAULT '' NOT NULL,
	"engine_serial" text DEFAULT '' NOT NULL,
	"bore_m" double precision,
	"bore_unit" text,
	"bore_decimals" integer,
	"stroke_m" double precision,
	"stroke_unit" text,
	"stroke_decimals" integer,
	"notes" text DEFAULT '' NOT NULL,
	"lead_builder_id" text,
	"status" "build_status" DEFAULT 'open' NOT NULL,
	"received_on" date,
	"promised_on" date,
	"finished_at" timestamp with time zone,
	"delivered_at" timestamp with time zone,
	"reopen_reason" text,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "builds_number_unique" UNIQUE("number")
);
--> statement-breakpoint
ALTER TABLE "marks" ADD COLUMN "build_id" uuid;--> statement-breakpoint
ALTER TABLE "recordings" ADD COLUMN "build_id" uuid;--> statement-breakpoint
ALTER TABLE "test_records" ADD COLUMN "build_id" uuid;--> statement-breakpoint
ALTER TABLE "build_events" ADD CONSTRAINT "build_events_build_id_builds_id_fk" FOREIGN KEY ("build_id") REFERENCES "public"."builds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "build_events" ADD CONSTRAINT "build_events_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "builds" ADD CONSTRAINT "builds_lead_builder_id_users_id_fk" FOREIGN KEY ("lead_builder_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "builds" ADD CONSTRAINT "builds_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "build_events_build_idx" ON "build_events" USING btree ("build_id","at");--> statement-breakpoint
CREATE INDEX "builds_status_idx" ON "builds" USING btree ("status","updated_at");--> statement-breakpoint
ALTER TABLE "marks" ADD CONSTRAINT "marks_build_id_builds_id_fk" FOREIGN KEY ("build_id") REFERENCES "public"."builds"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "recordings" ADD CONSTRAINT "recordings_build_id_builds_id_fk" FOREIGN KEY ("build_id") REFERENCES "public"."builds"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_records" ADD CONSTRAINT "test_records_build_id_builds_id_fk" FOREIGN KEY ("build_id") REFERENCES "public"."builds"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "marks_build_idx" ON "marks" USING btree ("build_id");--> statement-breakpoint
CREATE INDEX "recordings_build_idx" ON "recordings" USING btree ("build_id");--> statement-breakpoint
CREATE INDEX "test_records_build_idx" ON "test_records" USING btree ("build_id");--> statement-breakpoint
-- Builds are searchable by number, customer, serial and engine (app/lib/search/documents.server.ts).
CREATE TRIGGER search_builds AFTER INSERT OR UPDATE OR DELETE ON builds FOR EACH ROW EXECUTE FUNCTION search_enqueue('build');--> statement-breakpoint
-- One build per distinct work order named before builds existed: the test records' work_order
-- text and a recording title's "(WO LEW-24-0130)" or "(LEW-24-0130)". The customer was never
-- recorded; the engine serial is the one most often filed for the number; the build counts as
-- received on its earliest test or recording. work_order stays on test_records as it was.
WITH named AS (
  SELECT upper(trim(work_order)) AS number, engine_serial AS serial, tested_on AS day FROM "test_records" WHERE trim(work_order) <> ''
  UNION ALL
  SELECT upper(m[1]), '', created_at::date FROM "recordings", regexp_match(title, '\((?:WO\s+)?([A-Za-z]{2,5}-\d{2}-\d{3,5})\)') AS m WHERE m[1] IS NOT NULL
),
numbers AS (
  SELECT number, min(day) AS received_on,
    coalesce((SELECT n2.serial FROM named n2 WHERE n2.number = n.number AND n2.serial <> '' GROUP BY n2.serial ORDER BY count(*) DESC, n2.serial LIMIT 1), '') AS serial
  FROM named n GROUP BY number
)
INSERT INTO "builds" ("number", "customer_name", "engine_serial", "received_on")
SELECT number, 'Customer not recorded', serial, received_on FROM numbers
ON CONFLICT ("number") DO NOTHING;--> statement-breakpoint
UPDATE "test_records" t SET "build_id" = b.id FROM "builds" b WHERE t.build_id IS NULL AND b.number = upper(trim(t.work_order));--> statement-breakpoint
UPDATE "recordings" r SET "build_id" = b.id FROM "builds" b
WHERE r.build_id IS NULL AND b.number = upper((regexp_match(r.title, '\((?:WO\s+)?([A-Za-z]{2,5}-\d{2}-\d{3,5})\)'))[1]);--> statement-breakpoint
-- A mark is about its recording's engine unless said otherwise.
UPDATE "marks" k SET "build_id" = r.build_id FROM "recordings" r WHERE k.build_id IS NULL AND k.recording_id = r.id AND r.build_id IS NOT NULL;--> statement-breakpoint
INSERT INTO "build_events" ("build_id", "kind", "detail", "at")
SELECT b.id, 'linked', jsonb_build_object(
  'testRecords', (SELECT count(*) FROM "test_records" t WHERE t.build_id = b.id),
  'recordings', (SELECT count(*) FROM "recordings" r WHERE r.build_id = b.id)), now()
FROM "builds" b;