-- Every change to an indexed table writes a search outbox row in the same transaction.
-- TG_ARGV[0] is the outbox kind; TG_ARGV[1] (default "id") the column naming the entity.
CREATE OR REPLACE FUNCTION search_enqueue() RETURNS trigger AS $$
DECLARE
  col text := coalesce(TG_ARGV[1], 'id');
  cur jsonb;
BEGIN
  IF TG_OP = 'DELETE' THEN cur := to_jsonb(OLD); ELSE cur := to_jsonb(NEW); END IF;
  INSERT INTO search_outbox (kind, entity_id) VALUES (TG_ARGV[0], cur ->> col);
  IF TG_OP = 'UPDATE' AND (to_jsonb(OLD) ->> col) IS DISTINCT FROM (cur ->> col) THEN
    INSERT INTO search_outbox (kind, entity_id) VALUES (TG_ARGV[0], to_jsonb(OLD) ->> col);
  END IF;
  RETURN NULL;
END
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER search_procedures AFTER INSERT OR UPDATE OR DELETE ON procedures FOR EACH ROW EXECUTE FUNCTION search_enqueue('procedure');
--> statement-breakpoint
CREATE TRIGGER search_revisions AFTER INSERT OR UPDATE OR DELETE ON procedure_revisions FOR EACH ROW EXECUTE FUNCTION search_enqueue('revision');
--> statement-breakpoint
CREATE TRIGGER search_specs AFTER INSERT OR UPDATE OR DELETE ON procedure_specs FOR EACH ROW EXECUTE FUNCTION search_enqueue('revision', 'revision_id');
--> statement-breakpoint
CREATE TRIGGER search_recordings AFTER INSERT OR UPDATE OR DELETE ON recordings FOR EACH ROW EXECUTE FUNCTION search_enqueue('recording');
--> statement-breakpoint
CREATE TRIGGER search_marks AFTER INSERT OR UPDATE OR DELETE ON marks FOR EACH ROW EXECUTE FUNCTION search_enqueue('mark');
--> statement-breakpoint
CREATE TRIGGER search_readings AFTER INSERT OR UPDATE OR DELETE ON readings FOR EACH ROW EXECUTE FUNCTION search_enqueue('reading');
