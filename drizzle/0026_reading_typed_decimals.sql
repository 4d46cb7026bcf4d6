-- How many decimals a reading was typed with (88.010 → 3): the double keeps 88.01, so the zero
-- that says the gauge read to a thousandth was lost. New readings store it as typed.
ALTER TABLE "readings" ADD COLUMN "value_decimals" integer;--> statement-breakpoint
ALTER TABLE "test_record_readings" ADD COLUMN "value_decimals" integer;--> statement-breakpoint
-- Readings stored before: the best guess is the stored value as it reads (float8 → numeric
-- takes 15 significant digits, so 88.00600000000001 reads 88.006): a trailing zero typed then is
-- gone for good.
UPDATE readings SET value_decimals = least(scale(value_entered::numeric), 12) WHERE value_decimals IS NULL;--> statement-breakpoint
-- A filed reading is never updated (trigger of migration 0007); adding how it was typed changes
-- how it is stored, not what was filed, so the trigger steps aside here as in 0022.
ALTER TABLE test_record_readings DISABLE TRIGGER test_record_readings_no_update;--> statement-breakpoint
UPDATE test_record_readings SET value_decimals = least(scale(value_entered::numeric), 12) WHERE value_decimals IS NULL;--> statement-breakpoint
ALTER TABLE test_record_readings ENABLE TRIGGER test_record_readings_no_update;
