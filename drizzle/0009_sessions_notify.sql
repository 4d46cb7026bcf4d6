-- Every change to the sessions table (sign-in, sign-out, extension, ending a person's
-- sessions) notifies 'benchreel_sessions'; each app process keeps recently validated
-- sessions for a few seconds and forgets them all on this notification
-- (app/lib/auth.server.ts, docs/decisions/006).
CREATE OR REPLACE FUNCTION sessions_changed() RETURNS trigger AS $$
BEGIN
  PERFORM pg_notify('benchreel_sessions', '');
  RETURN NULL;
END
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER sessions_changed AFTER INSERT OR UPDATE OR DELETE OR TRUNCATE ON sessions FOR EACH STATEMENT EXECUTE FUNCTION sessions_changed();
