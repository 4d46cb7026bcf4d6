-- Any change to the search words queues one 'search_words' row in the outbox, in the same
-- transaction; the worker then sends the whole list as the search service's synonyms setting
-- (app/lib/search/indexer.server.ts).
CREATE OR REPLACE FUNCTION search_words_changed() RETURNS trigger AS $$
BEGIN
  INSERT INTO search_outbox (kind, entity_id) VALUES ('search_words', 'all');
  RETURN NULL;
END
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER search_words_changed AFTER INSERT OR UPDATE OR DELETE ON search_word_groups FOR EACH STATEMENT EXECUTE FUNCTION search_words_changed();
--> statement-breakpoint
-- The trade's own synonyms the shop starts with; editors change them on /search/words.
INSERT INTO search_word_groups (words) VALUES
  (ARRAY['ptw', 'piston to wall', 'piston-to-wall']),
  (ARRAY['clamp load', 'preload', 'clamping force']),
  (ARRAY['thou', '0.001 in', 'mil']),
  (ARRAY['moly', 'molybdenum disulfide', 'mos2']),
  (ARRAY['oil clearance', 'bearing clearance']),
  (ARRAY['ring gap', 'ring end gap', 'end gap']),
  (ARRAY['leak-down', 'leakdown', 'leak down']),
  (ARRAY['oor', 'out-of-round', 'out of round']),
  (ARRAY['torque plate', 'deck plate', 'honing plate']),
  (ARRAY['stud', 'studs']),
  (ARRAY['bore', 'cylinder bore']);
