-- Every change to what a page shows sends a notification on the 'benchreel_content' channel
-- (PostgreSQL folds repeats within a transaction and delivers them at commit). The app's
-- rendered-page cache listens and drops what it holds (app/lib/page-cache.server.ts,
-- docs/decisions/006). Sessions, outboxes, audit rows and upload bookkeeping do not notify:
-- no cached page shows them. Autosaves of a draft do not notify either: a draft's text and
-- its extracted rows appear on no cached page (its number and state do, and changing those
-- notifies).
CREATE OR REPLACE FUNCTION content_changed() RETURNS trigger AS $$
BEGIN
  PERFORM pg_notify('benchreel_content', TG_TABLE_NAME);
  RETURN NULL;
END
$$ LANGUAGE plpgsql;
--> statement-breakpoint
-- For the rows extracted from a revision (specs, links, moments): notify unless the revision
-- is a draft (or already gone, in which case deleting the revision has notified).
CREATE OR REPLACE FUNCTION content_changed_unless_draft() RETURNS trigger AS $$
DECLARE rev uuid;
BEGIN
  IF TG_OP = 'DELETE' THEN rev := OLD.revision_id; ELSE rev := NEW.revision_id; END IF;
  IF EXISTS (SELECT 1 FROM procedure_revisions WHERE id = rev AND state <> 'draft') THEN
    PERFORM pg_notify('benchreel_content', TG_TABLE_NAME);
  END IF;
  RETURN NULL;
END
$$ LANGUAGE plpgsql;
--> statement-breakpoint
DO $$
DECLARE t text;
BEGIN
  FOREACH t IN ARRAY ARRAY[
    'users', 'procedures', 'procedure_slugs', 'procedure_watchers', 'recordings', 'marks',
    'readings', 'test_records', 'test_record_readings', 'test_record_calcs', 'test_record_amendments'
  ] LOOP
    EXECUTE format(
      'CREATE TRIGGER content_changed AFTER INSERT OR UPDATE OR DELETE OR TRUNCATE ON %I FOR EACH STATEMENT EXECUTE FUNCTION content_changed()',
      t
    );
  END LOOP;
  FOREACH t IN ARRAY ARRAY['procedure_specs', 'procedure_links', 'procedure_moments'] LOOP
    EXECUTE format(
      'CREATE TRIGGER content_changed AFTER INSERT OR UPDATE OR DELETE ON %I FOR EACH ROW EXECUTE FUNCTION content_changed_unless_draft()',
      t
    );
    EXECUTE format(
      'CREATE TRIGGER content_changed_truncate AFTER TRUNCATE ON %I FOR EACH STATEMENT EXECUTE FUNCTION content_changed()',
      t
    );
  END LOOP;
END
$$;
--> statement-breakpoint
CREATE TRIGGER content_changed AFTER INSERT OR DELETE OR TRUNCATE ON procedure_revisions FOR EACH STATEMENT EXECUTE FUNCTION content_changed();
--> statement-breakpoint
CREATE TRIGGER content_changed_update AFTER UPDATE ON procedure_revisions FOR EACH ROW
  WHEN (NOT (OLD.state = 'draft' AND NEW.state = 'draft' AND OLD.number = NEW.number AND OLD.author_id IS NOT DISTINCT FROM NEW.author_id))
  EXECUTE FUNCTION content_changed();
