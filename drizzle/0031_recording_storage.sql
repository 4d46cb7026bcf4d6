CREATE TABLE "recording_storage" (
	"recording_id" uuid PRIMARY KEY NOT NULL,
	"backend" text NOT NULL,
	"original_key" text NOT NULL,
	"moved_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "upload_activity" (
	"upload_id" text PRIMARY KEY NOT NULL,
	"last_byte_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "recording_storage" ADD CONSTRAINT "recording_storage_recording_id_recordings_id_fk" FOREIGN KEY ("recording_id") REFERENCES "public"."recordings"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "upload_activity" ADD CONSTRAINT "upload_activity_upload_id_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."uploads"("id") ON DELETE cascade ON UPDATE no action;