-- Test records go to search like the other areas (kind 'test_record').
CREATE TRIGGER search_test_records AFTER INSERT OR UPDATE OR DELETE ON test_records FOR EACH ROW EXECUTE FUNCTION search_enqueue('test_record');
--> statement-breakpoint
-- A filed reading never changes: corrections are a new version written by an amendment.
CREATE OR REPLACE FUNCTION test_record_readings_immutable() RETURNS trigger AS $$
BEGIN
  RAISE EXCEPTION 'test record readings are immutable; file an amendment instead' USING ERRCODE = 'check_violation';
END
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER test_record_readings_no_update BEFORE UPDATE ON test_record_readings FOR EACH ROW EXECUTE FUNCTION test_record_readings_immutable();
--> statement-breakpoint
-- The revision a record was filed against is pinned for good.
CREATE OR REPLACE FUNCTION test_records_pinned_revision() RETURNS trigger AS $$
BEGIN
  IF NEW.revision_id IS DISTINCT FROM OLD.revision_id OR NEW.procedure_id IS DISTINCT FROM OLD.procedure_id THEN
    RAISE EXCEPTION 'a test record stays pinned to the revision it was filed against' USING ERRCODE = 'check_violation';
  END IF;
  RETURN NEW;
END
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER test_records_pin BEFORE UPDATE ON test_records FOR EACH ROW EXECUTE FUNCTION test_records_pinned_revision();
