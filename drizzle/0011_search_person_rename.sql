-- A person's name is written into the search documents of what they authored, uploaded,
-- marked, read or filed; renaming them queues a 'person' change that rebuilds those
-- documents (app/lib/search/documents.server.ts, personDocs).
CREATE TRIGGER search_people_renamed AFTER UPDATE OF name ON users FOR EACH ROW
  WHEN (OLD.name IS DISTINCT FROM NEW.name)
  EXECUTE FUNCTION search_enqueue('person');
