CREATE TYPE "public"."shop_area" AS ENUM('block', 'heads', 'fasteners', 'rotating-assembly', 'assembly', 'qc');--> statement-breakpoint
CREATE TABLE "procedures" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"slug" text NOT NULL,
	"title" text NOT NULL,
	"area" "shop_area" NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "procedures" ADD CONSTRAINT "procedures_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "procedures_slug_idx" ON "procedures" USING btree ("slug");--> statement-breakpoint
CREATE INDEX "procedures_area_idx" ON "procedures" USING btree ("area");