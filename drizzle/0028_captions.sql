CREATE TABLE "caption_cues" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"recording_id" uuid NOT NULL,
	"position" integer NOT NULL,
	"start_s" numeric(10, 3) NOT NULL,
	"end_s" numeric(10, 3) NOT NULL,
	"text" text NOT NULL,
	"version" integer DEFAULT 1 NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "caption_edits" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"cue_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"text_before" text NOT NULL,
	"text_after" text NOT NULL,
	"edited_by" text,
	"edited_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "caption_sources" (
	"recording_id" uuid PRIMARY KEY NOT NULL,
	"kind" text NOT NULL,
	"name" text NOT NULL,
	"format" text NOT NULL,
	"attached_by" text,
	"attached_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "caption_cues" ADD CONSTRAINT "caption_cues_recording_id_recordings_id_fk" FOREIGN KEY ("recording_id") REFERENCES "public"."recordings"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "caption_edits" ADD CONSTRAINT "caption_edits_cue_id_caption_cues_id_fk" FOREIGN KEY ("cue_id") REFERENCES "public"."caption_cues"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "caption_edits" ADD CONSTRAINT "caption_edits_edited_by_users_id_fk" FOREIGN KEY ("edited_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "caption_sources" ADD CONSTRAINT "caption_sources_recording_id_recordings_id_fk" FOREIGN KEY ("recording_id") REFERENCES "public"."recordings"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "caption_sources" ADD CONSTRAINT "caption_sources_attached_by_users_id_fk" FOREIGN KEY ("attached_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "caption_cues_position_idx" ON "caption_cues" USING btree ("recording_id","position");--> statement-breakpoint
CREATE INDEX "caption_cues_start_idx" ON "caption_cues" USING btree ("recording_id","start_s");--> statement-breakpoint
CREATE INDEX "caption_edits_cue_idx" ON "caption_edits" USING btree ("cue_id","version");--> statement-breakpoint
-- Search follows the captions: a statement that writes cues queues each recording it touched
-- once (kind "captions", the recording's id), not once per cue: attaching a file inserts
-- thousands of cues in one statement. Transition tables take one event per trigger.
CREATE OR REPLACE FUNCTION search_enqueue_captions() RETURNS trigger AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN
    INSERT INTO search_outbox (kind, entity_id) SELECT DISTINCT 'captions', recording_id::text FROM old_rows;
  ELSE
    INSERT INTO search_outbox (kind, entity_id) SELECT DISTINCT 'captions', recording_id::text FROM new_rows;
  END IF;
  RETURN NULL;
END
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER search_caption_cues_insert AFTER INSERT ON caption_cues REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION search_enqueue_captions();
--> statement-breakpoint
CREATE TRIGGER search_caption_cues_update AFTER UPDATE ON caption_cues REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION search_enqueue_captions();
--> statement-breakpoint
CREATE TRIGGER search_caption_cues_delete AFTER DELETE ON caption_cues REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION search_enqueue_captions();
--> statement-breakpoint
-- A caption line's document shows its recording's title and is hidden with a rejected recording.
CREATE OR REPLACE FUNCTION search_enqueue_recording_captions() RETURNS trigger AS $$
BEGIN
  IF NEW.title IS DISTINCT FROM OLD.title OR NEW.state IS DISTINCT FROM OLD.state THEN
    INSERT INTO search_outbox (kind, entity_id) SELECT 'captions', NEW.id::text WHERE EXISTS (SELECT 1 FROM caption_cues WHERE recording_id = NEW.id);
  END IF;
  RETURN NULL;
END
$$ LANGUAGE plpgsql;
--> statement-breakpoint
CREATE TRIGGER search_recording_captions AFTER UPDATE ON recordings FOR EACH ROW EXECUTE FUNCTION search_enqueue_recording_captions();
