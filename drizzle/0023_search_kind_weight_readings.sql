-- Search documents changed shape (issue 14): every document carries `kindWeight` (the ranking
-- rule `kindWeight:desc`), and a recording's readings are one document listing them instead of
-- one document per reading. A reading's change now queues its recording, whose rebuild also
-- removes the per-reading documents of the earlier shape (same group), and the reading row's
-- DELETE still names the recording (OLD.recording_id).
DROP TRIGGER IF EXISTS search_readings ON readings;
--> statement-breakpoint
CREATE TRIGGER search_readings AFTER INSERT OR UPDATE OR DELETE ON readings FOR EACH ROW EXECUTE FUNCTION search_enqueue('recording', 'recording_id');
--> statement-breakpoint
-- Queue every record once so that the worker rewrites its documents in the new shape.
INSERT INTO search_outbox (kind, entity_id) SELECT 'revision', id::text FROM procedure_revisions;
--> statement-breakpoint
INSERT INTO search_outbox (kind, entity_id) SELECT 'recording', id::text FROM recordings;
--> statement-breakpoint
INSERT INTO search_outbox (kind, entity_id) SELECT 'test_record', id::text FROM test_records;
