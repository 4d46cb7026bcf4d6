CREATE TABLE "procedure_revision_returns" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"revision_id" uuid NOT NULL,
	"returned_by" text,
	"reason" text NOT NULL,
	"returned_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "procedure_revisions" DROP CONSTRAINT "procedure_revisions_returned_by_users_id_fk";
--> statement-breakpoint
ALTER TABLE "procedure_revision_returns" ADD CONSTRAINT "procedure_revision_returns_revision_id_procedure_revisions_id_fk" FOREIGN KEY ("revision_id") REFERENCES "public"."procedure_revisions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_revision_returns" ADD CONSTRAINT "procedure_revision_returns_returned_by_users_id_fk" FOREIGN KEY ("returned_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "procedure_revision_returns_revision_idx" ON "procedure_revision_returns" USING btree ("revision_id","returned_at");--> statement-breakpoint
-- Every return so far, from the audit log (each "return" entry names the editor, the time and the reason).
INSERT INTO "procedure_revision_returns" ("revision_id", "returned_by", "reason", "returned_at")
SELECT r.id, a.actor_id, coalesce(a.detail->>'reason', ''), a.at
FROM "audit_log" a JOIN "procedure_revisions" r ON r.id::text = a.entity_id
WHERE a.entity = 'procedure_revision' AND a.action = 'return'
AND NOT EXISTS (SELECT 1 FROM "procedure_revision_returns" x WHERE x.revision_id = r.id AND x.returned_at = a.at);--> statement-breakpoint
-- A return the audit log does not hold keeps what the revision itself kept: the latest one.
INSERT INTO "procedure_revision_returns" ("revision_id", "returned_by", "reason", "returned_at")
SELECT r.id, r.returned_by, coalesce(r.return_reason, ''), r.returned_at
FROM "procedure_revisions" r
WHERE r.returned_at IS NOT NULL AND NOT EXISTS (SELECT 1 FROM "procedure_revision_returns" x WHERE x.revision_id = r.id);--> statement-breakpoint
ALTER TABLE "procedure_revisions" DROP COLUMN "return_reason";--> statement-breakpoint
ALTER TABLE "procedure_revisions" DROP COLUMN "returned_by";--> statement-breakpoint
ALTER TABLE "procedure_revisions" DROP COLUMN "returned_at";