-- The change notifications of migrations 0008–0010 and 0012 fed two in-process caches, the
-- read-page cache and the kept sessions; both are gone (docs/decisions/011), so nothing listens.
-- Dropping the functions drops every trigger that calls them.
DROP FUNCTION IF EXISTS content_changed_unless_draft() CASCADE;
--> statement-breakpoint
DROP FUNCTION IF EXISTS content_changed() CASCADE;
--> statement-breakpoint
DROP FUNCTION IF EXISTS sessions_changed() CASCADE;
