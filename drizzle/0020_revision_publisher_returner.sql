ALTER TABLE "procedure_revisions" ADD COLUMN "published_by" text;--> statement-breakpoint
ALTER TABLE "procedure_revisions" ADD COLUMN "returned_by" text;--> statement-breakpoint
ALTER TABLE "procedure_revisions" ADD CONSTRAINT "procedure_revisions_published_by_users_id_fk" FOREIGN KEY ("published_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "procedure_revisions" ADD CONSTRAINT "procedure_revisions_returned_by_users_id_fk" FOREIGN KEY ("returned_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
-- Backfill: the audit log holds who published and who returned each revision (its latest such entry).
UPDATE "procedure_revisions" r SET "published_by" = a.actor_id
FROM (SELECT DISTINCT ON (entity_id) entity_id, actor_id FROM "audit_log" WHERE entity = 'procedure_revision' AND action = 'publish' ORDER BY entity_id, at DESC, id DESC) a
WHERE a.entity_id = r.id::text AND r.published_at IS NOT NULL AND r.published_by IS NULL AND a.actor_id IS NOT NULL;--> statement-breakpoint
UPDATE "procedure_revisions" r SET "returned_by" = a.actor_id
FROM (SELECT DISTINCT ON (entity_id) entity_id, actor_id FROM "audit_log" WHERE entity = 'procedure_revision' AND action = 'return' ORDER BY entity_id, at DESC, id DESC) a
WHERE a.entity_id = r.id::text AND r.returned_at IS NOT NULL AND r.returned_by IS NULL AND a.actor_id IS NOT NULL;--> statement-breakpoint
-- Without an audit entry, reviewed_by is the last reviewer: the publisher of a published or superseded revision, the returner of a returned draft.
UPDATE "procedure_revisions" SET "published_by" = "reviewed_by" WHERE "published_by" IS NULL AND "state" IN ('published', 'superseded') AND "reviewed_by" IS NOT NULL;--> statement-breakpoint
UPDATE "procedure_revisions" SET "returned_by" = "reviewed_by" WHERE "returned_by" IS NULL AND "state" = 'draft' AND "return_reason" IS NOT NULL AND "reviewed_by" IS NOT NULL;
