-- Video processing updates a recording's row many times (state, progress, rendition); cached
-- pages show only its title. So an update notifies 'benchreel_content' only when the title
-- changes; adding or removing a recording still notifies as before (migration 0008).
DROP TRIGGER IF EXISTS content_changed ON recordings;
--> statement-breakpoint
CREATE TRIGGER content_changed AFTER INSERT OR DELETE OR TRUNCATE ON recordings FOR EACH STATEMENT EXECUTE FUNCTION content_changed();
--> statement-breakpoint
CREATE TRIGGER content_changed_update AFTER UPDATE ON recordings FOR EACH ROW
  WHEN (OLD.title IS DISTINCT FROM NEW.title)
  EXECUTE FUNCTION content_changed();
