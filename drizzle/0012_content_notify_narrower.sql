-- Narrower content notifications (see 0008): the read page shows marks only when they point
-- at a procedure, and shows no readings, no test-record readings, calculations or amendment
-- rows (an amendment changes its test record's verdict and version, which notify). Every
-- notification empties the whole read-page cache, so a builder marking a recording or
-- logging readings at the bench no longer does.
DROP TRIGGER IF EXISTS content_changed ON readings;
--> statement-breakpoint
DROP TRIGGER IF EXISTS content_changed ON test_record_readings;
--> statement-breakpoint
DROP TRIGGER IF EXISTS content_changed ON test_record_calcs;
--> statement-breakpoint
DROP TRIGGER IF EXISTS content_changed ON test_record_amendments;
--> statement-breakpoint
DROP TRIGGER IF EXISTS content_changed ON marks;
--> statement-breakpoint
CREATE TRIGGER content_changed_insert AFTER INSERT ON marks FOR EACH ROW
  WHEN (NEW.procedure_id IS NOT NULL) EXECUTE FUNCTION content_changed();
--> statement-breakpoint
CREATE TRIGGER content_changed_update AFTER UPDATE ON marks FOR EACH ROW
  WHEN (OLD.procedure_id IS NOT NULL OR NEW.procedure_id IS NOT NULL) EXECUTE FUNCTION content_changed();
--> statement-breakpoint
CREATE TRIGGER content_changed_delete AFTER DELETE ON marks FOR EACH ROW
  WHEN (OLD.procedure_id IS NOT NULL) EXECUTE FUNCTION content_changed();
--> statement-breakpoint
CREATE TRIGGER content_changed_truncate AFTER TRUNCATE ON marks FOR EACH STATEMENT EXECUTE FUNCTION content_changed();
