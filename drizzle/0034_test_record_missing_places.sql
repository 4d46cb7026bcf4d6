CREATE TABLE "test_record_missing_places" (
	"record_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"spec_id" uuid NOT NULL,
	"spec_key" text NOT NULL,
	"fastener" integer,
	"cylinder" integer,
	"journal" integer,
	CONSTRAINT "test_record_missing_places_place_key" UNIQUE NULLS NOT DISTINCT("record_id","version","spec_id","fastener","cylinder","journal"),
	CONSTRAINT "test_record_missing_places_one_place" CHECK (num_nonnulls("test_record_missing_places"."fastener", "test_record_missing_places"."cylinder", "test_record_missing_places"."journal") = 1)
);
--> statement-breakpoint
ALTER TABLE "test_record_missing_places" ADD CONSTRAINT "test_record_missing_places_record_id_test_records_id_fk" FOREIGN KEY ("record_id") REFERENCES "public"."test_records"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_record_missing_places" ADD CONSTRAINT "test_record_missing_places_spec_id_procedure_specs_id_fk" FOREIGN KEY ("spec_id") REFERENCES "public"."procedure_specs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "test_record_missing_places_record_idx" ON "test_record_missing_places" USING btree ("record_id","version");--> statement-breakpoint
-- Records a run filed before this migration name their empty places only in the notes line
-- finishRun wrote, whose shape is fixed ("Not measured on the run: Bore diameter: Cyl 3, Cyl 4;
-- Main bearing clearance: Main 2."): they are parsed back, so that such a record reads
-- Incomplete from its data like a new one. Every version gets the places its own readings do
-- not fill (amendments made before this migration could not see them); a label matching no
-- spec of the record's revision, or a line edited out of shape, is left to the notes.
INSERT INTO "test_record_missing_places" ("record_id", "version", "spec_id", "spec_key", "fastener", "cylinder", "journal")
SELECT DISTINCT t."id", v."version", ps."id", ps."spec_key",
  CASE WHEN pl.m[1] = 'Stud' THEN pl.m[2]::int END,
  CASE WHEN pl.m[1] = 'Cyl' THEN pl.m[2]::int END,
  CASE WHEN pl.m[1] = 'Main' THEN pl.m[2]::int END
FROM "test_records" t
CROSS JOIN LATERAL regexp_match(t."notes", 'Not measured on the run: (.*)\.$', 'n') AS line(m)
CROSS JOIN LATERAL regexp_split_to_table(line.m[1], '; ') AS part(s)
CROSS JOIN LATERAL regexp_match(part.s, '^(.*): ((?:Cyl|Main|Stud) \d+(?:, (?:Cyl|Main|Stud) \d+)*)$') AS sp(m)
CROSS JOIN LATERAL regexp_matches(sp.m[2], '(Cyl|Main|Stud) (\d+)', 'g') AS pl(m)
JOIN "procedure_specs" ps ON ps."revision_id" = t."revision_id" AND ps."label" = sp.m[1]
CROSS JOIN LATERAL generate_series(0, t."current_version") AS v("version")
WHERE sp.m IS NOT NULL
  AND NOT EXISTS (
    SELECT 1 FROM "test_record_readings" r
    WHERE r."record_id" = t."id" AND r."version" = v."version" AND r."spec_id" = ps."id"
      AND CASE pl.m[1] WHEN 'Stud' THEN r."fastener" WHEN 'Cyl' THEN r."cylinder" ELSE r."journal" END = pl.m[2]::int
  );
--> statement-breakpoint
-- An amendment made before this migration re-read such a record Within spec: the place it left
-- empty is still empty, so the record in force is Incomplete again.
UPDATE "test_records" t SET "verdict" = 'incomplete'
WHERE t."verdict" = 'within' AND EXISTS (
  SELECT 1 FROM "test_record_missing_places" mp
  WHERE mp."record_id" = t."id" AND mp."version" = t."current_version"
    AND EXISTS (
      SELECT 1 FROM "test_record_readings" r
      WHERE r."record_id" = t."id" AND r."version" = t."current_version" AND r."spec_id" = mp."spec_id"
    )
);
