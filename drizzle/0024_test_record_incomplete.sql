-- A record with a spec left unmeasured was stored as 'within': it is 'incomplete' (issue 14).
-- The enum is made anew rather than given a value with ADD VALUE, because a value added that way
-- cannot be used until the migration's transaction commits, and the records are set right here.
ALTER TYPE "public"."test_record_verdict" RENAME TO "test_record_verdict_before_0024";--> statement-breakpoint
CREATE TYPE "public"."test_record_verdict" AS ENUM('within', 'out', 'incomplete');--> statement-breakpoint
ALTER TABLE "test_records" ALTER COLUMN "verdict" SET DATA TYPE "public"."test_record_verdict" USING "verdict"::text::"public"."test_record_verdict";--> statement-breakpoint
ALTER TABLE "test_record_amendments" ALTER COLUMN "verdict_before" SET DATA TYPE "public"."test_record_verdict" USING "verdict_before"::text::"public"."test_record_verdict";--> statement-breakpoint
ALTER TABLE "test_record_amendments" ALTER COLUMN "verdict_after" SET DATA TYPE "public"."test_record_verdict" USING "verdict_after"::text::"public"."test_record_verdict";--> statement-breakpoint
DROP TYPE "public"."test_record_verdict_before_0024";--> statement-breakpoint
-- Whether a record's readings at a version leave a spec of its revision without a reading. The
-- readings in force at a version are the latest stored set at or below it (as readingsAtVersion
-- in app/lib/test-records/history.ts).
CREATE OR REPLACE FUNCTION pg_temp.test_record_lacks_a_spec(rec uuid, rev uuid, at_version integer) RETURNS boolean AS $$
  SELECT EXISTS (
    SELECT 1 FROM procedure_specs ps
    WHERE ps.revision_id = rev
      AND NOT EXISTS (
        SELECT 1 FROM test_record_readings r
        WHERE r.record_id = rec AND r.spec_id = ps.id
          AND r.version = (SELECT max(r2.version) FROM test_record_readings r2 WHERE r2.record_id = rec AND r2.version <= at_version)
      )
  )
$$ LANGUAGE sql STABLE;--> statement-breakpoint
UPDATE "test_records" t SET "verdict" = 'incomplete'
WHERE t."verdict" = 'within' AND pg_temp.test_record_lacks_a_spec(t."id", t."revision_id", t."current_version");--> statement-breakpoint
UPDATE "test_record_amendments" a SET "verdict_after" = 'incomplete'
FROM "test_records" t
WHERE t."id" = a."record_id" AND a."verdict_after" = 'within' AND pg_temp.test_record_lacks_a_spec(t."id", t."revision_id", a."version");--> statement-breakpoint
UPDATE "test_record_amendments" a SET "verdict_before" = 'incomplete'
FROM "test_records" t
WHERE t."id" = a."record_id" AND a."verdict_before" = 'within' AND pg_temp.test_record_lacks_a_spec(t."id", t."revision_id", a."version" - 1);
