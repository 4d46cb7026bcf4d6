-- Procedure revision documents now carry their blocks as one `body` (one block per line)
-- instead of a `blocks` list: queue every revision once so the worker rewrites its documents
-- in the new shape (an index built before this migration keeps working until then).
INSERT INTO search_outbox (kind, entity_id) SELECT 'revision', id::text FROM procedure_revisions;
