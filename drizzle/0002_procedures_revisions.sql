CREATE TYPE "public"."procedure_revision_state" AS ENUM('draft', 'in_review', 'published', 'superseded');--> statement-breakpoint
CREATE TABLE "procedure_conflict_copies" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"revision_id" uuid NOT NULL,
	"user_id" text,
	"base_version" integer NOT NULL,
	"title" text NOT NULL,
	"summary" text DEFAULT '' NOT NULL,
	"tags" text[] DEFAULT '{}'::text[] NOT NULL,
	"doc" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "procedure_links" (
	"revision_id" uuid NOT NULL,
	"from_procedure_id" uuid NOT NULL,
	"to_procedure_id" uuid NOT NULL,
	CONSTRAINT "procedure_links_revision_id_to_procedure_id_pk" PRIMARY KEY("revision_id","to_procedure_id")
);
--> statement-breakpoint
CREATE TABLE "procedure_moments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"revision_id" uuid NOT NULL,
	"procedure_id" uuid NOT NULL,
	"position" integer NOT NULL,
	"recording_id" uuid NOT NULL,
	"start_s" double precision NOT NULL,
	"end_s" double precision,
	"caption" text DEFAULT '' NOT NULL
);
--> statement-breakpoint
CREATE TABLE "procedure_revisions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"procedure_id" uuid NOT NULL,
	"number" integer NOT NULL,
	"state" "procedure_revision_state" DEFAULT 'draft' NOT NULL,
	"title" text NOT NULL,
	"summary" text DEFAULT '' NOT NULL,
	"area" "shop_area" NOT NULL,
	"tags" text[] DEFAULT '{}'::text[] NOT NULL,
	"doc" jsonb NOT NULL,
	"word_count" integer DEFAULT 0 NOT NULL,
	"version" integer DEFAULT 1 NOT NULL,
	"based_on_revision_id" uuid,
	"author_id" text,
	"last_saved_by" text,
	"change_note" text,
	"return_reason" text,
	"reviewed_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"submitted_at" timestamp with time zone,
	"returned_at" timestamp with time zone,
	"published_at" timestamp with time zone,
	"superseded_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "procedure_slugs" (
	"slug" text PRIMARY KEY NOT NULL,
	"procedure_id" uuid NOT NULL,
	"retired_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "procedure_specs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"revision_id" uuid NOT NULL,
	"procedure_id" uuid NOT NULL,
	"spec_key" text NOT NULL,
	"position" integer NOT NULL,
	"label" text NOT NULL,
	"quantity" text NOT NULL,
	"unit" text NOT NULL,
	"nominal" double precision,
	"min" double precision,
	"max" double precision,
	"si_unit" text NOT NULL,
	"nominal_si" double precision,
	"min_si" double precision,
	"max_si" double precision,
	"note" text DEFAULT '' NOT NULL
);
--> statement-breakpoint
CREATE TABLE "procedure_watchers" (
	"procedure_id" uuid NOT NULL,
	"user_id" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "procedure_watchers_procedure_id_user_id_pk" PRIMARY KEY("procedure_id","user_id")
);
--> statement-breakpoint
ALTER TABLE "procedures" ADD COLUMN "summary" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "procedures" ADD COLUMN "tags" text[] DEFAULT '{}'::text[] NOT NULL;--> statement-breakpoint
ALTER TABLE "procedures" ADD COLUMN "published_revision_id" uuid;--> statement-breakpoint
ALTER TABLE "procedures" ADD COLUMN "published_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "procedures" ADD COLUMN "updated_at" timestamp with time zone DEFAULT now() NOT NULL;--> statement-breakpoint
ALTER TABLE "procedure_conflict_copies" ADD CONSTRAINT "procedure_conflict_copies_revision_id_procedure_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."procedure_revisions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_conflict_copies" ADD CONSTRAINT "procedure_conflict_copies_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_links" ADD CONSTRAINT "procedure_links_revision_id_procedure_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."procedure_revisions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_links" ADD CONSTRAINT "procedure_links_from_procedure_id_procedures_id_fk" FOREIGN KEY ("from_procedure_id") REFERENCES "public"."procedures"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_moments" ADD CONSTRAINT "procedure_moments_revision_id_procedure_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."procedure_revisions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_moments" ADD CONSTRAINT "procedure_moments_procedure_id_procedures_id_fk" FOREIGN KEY ("procedure_id") REFERENCES "public"."procedures"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_revisions" ADD CONSTRAINT "procedure_revisions_procedure_id_procedures_id_fk" FOREIGN KEY ("procedure_id") REFERENCES "public"."procedures"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_revisions" ADD CONSTRAINT "procedure_revisions_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_revisions" ADD CONSTRAINT "procedure_revisions_last_saved_by_users_id_fk" FOREIGN KEY ("last_saved_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_revisions" ADD CONSTRAINT "procedure_revisions_reviewed_by_users_id_fk" FOREIGN KEY ("reviewed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_slugs" ADD CONSTRAINT "procedure_slugs_procedure_id_procedures_id_fk" FOREIGN KEY ("procedure_id") REFERENCES "public"."procedures"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_specs" ADD CONSTRAINT "procedure_specs_revision_id_procedure_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."procedure_revisions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_specs" ADD CONSTRAINT "procedure_specs_procedure_id_procedures_id_fk" FOREIGN KEY ("procedure_id") REFERENCES "public"."procedures"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_watchers" ADD CONSTRAINT "procedure_watchers_procedure_id_procedures_id_fk" FOREIGN KEY ("procedure_id") REFERENCES "public"."procedures"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_watchers" ADD CONSTRAINT "procedure_watchers_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "procedure_links_to_idx" ON "procedure_links" USING btree ("to_procedure_id");--> statement-breakpoint
CREATE INDEX "procedure_moments_revision_idx" ON "procedure_moments" USING btree ("revision_id");--> statement-breakpoint
CREATE INDEX "procedure_moments_recording_idx" ON "procedure_moments" USING btree ("recording_id");--> statement-breakpoint
CREATE UNIQUE INDEX "procedure_revisions_number_idx" ON "procedure_revisions" USING btree ("procedure_id","number");--> statement-breakpoint
CREATE INDEX "procedure_revisions_state_idx" ON "procedure_revisions" USING btree ("state");--> statement-breakpoint
CREATE UNIQUE INDEX "procedure_revisions_one_open_idx" ON "procedure_revisions" USING btree ("procedure_id") WHERE state in ('draft', 'in_review');--> statement-breakpoint
CREATE UNIQUE INDEX "procedure_revisions_one_published_idx" ON "procedure_revisions" USING btree ("procedure_id") WHERE state = 'published';--> statement-breakpoint
CREATE UNIQUE INDEX "procedure_specs_key_idx" ON "procedure_specs" USING btree ("revision_id","spec_key");--> statement-breakpoint
CREATE INDEX "procedure_specs_procedure_idx" ON "procedure_specs" USING btree ("procedure_id");