-- Procedure revision documents now carry their blocks as one `body` (one block per line)
-- instead of a `blocks` list: queue every revision once so the worker rewrites its documents
-- in the new shape. Until the worker has rewritten a revision, text that only its blocks held
-- is not found (the settings stop searching the old field first); the batch takes seconds.
INSERT INTO search_outbox (kind, entity_id) SELECT 'revision', id::text FROM procedure_revisions;
