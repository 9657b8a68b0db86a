-- pbfleet schema, version 5: the trusted-reading summary trigger of schema
-- 0004, with the usual case first.
--
-- A reading is nearly always logged after every other reading of its
-- battery. Then nothing is newer than it, so it becomes the battery's
-- trusted reading with none above it, and the summary takes one
-- primary-key update. Schema 0004 counted the newer readings (an index
-- range read, twice) for every trusted reading; now only a reading logged
-- out of order does. The result is the same row: the property tests in
-- tests/storage compare the summary with a rebuild from raw history.

DROP TRIGGER readings_summary_trusted;

CREATE TRIGGER readings_summary_trusted AFTER INSERT ON readings
WHEN NEW.trusted_soc_pct IS NOT NULL BEGIN
  -- Newest of its battery (no reading taken later): it is the trusted one.
  -- Every SET expression reads the row as it was before this update.
  UPDATE battery_summaries SET
    trusted_id = CASE WHEN latest_at IS NULL OR NEW.taken_at >= latest_at
      THEN NEW.id ELSE trusted_id END,
    trusted_at = CASE WHEN latest_at IS NULL OR NEW.taken_at >= latest_at
      THEN NEW.taken_at ELSE trusted_at END,
    trusted_soc_pct = CASE WHEN latest_at IS NULL OR NEW.taken_at >= latest_at
      THEN NEW.trusted_soc_pct ELSE trusted_soc_pct END,
    trusted_temp_c = CASE WHEN latest_at IS NULL OR NEW.taken_at >= latest_at
      THEN NEW.trusted_temp_c ELSE trusted_temp_c END,
    newer_than_trusted = CASE WHEN latest_at IS NULL OR NEW.taken_at >= latest_at
      THEN 0 ELSE newer_than_trusted END,
    latest_at = max(coalesce(latest_at, NEW.taken_at), NEW.taken_at),
    recent = min(recent + 1, 13),
    revision = revision + 1
  WHERE battery_id = NEW.battery_id;
  -- Logged out of order: as schema 0004, it becomes the trusted one when
  -- it is newer than that one and fewer than 13 readings are newer still.
  UPDATE battery_summaries SET
    trusted_id = NEW.id,
    trusted_at = NEW.taken_at,
    trusted_soc_pct = NEW.trusted_soc_pct,
    trusted_temp_c = NEW.trusted_temp_c,
    newer_than_trusted = (SELECT count(*) FROM (SELECT 1 FROM readings r
      WHERE r.battery_id = NEW.battery_id AND r.taken_at > NEW.taken_at LIMIT 13))
  WHERE battery_id = NEW.battery_id
    AND trusted_id IS NOT NEW.id
    AND (trusted_at IS NULL OR NEW.taken_at >= trusted_at)
    AND (SELECT count(*) FROM (SELECT 1 FROM readings r
      WHERE r.battery_id = NEW.battery_id AND r.taken_at > NEW.taken_at LIMIT 13)) < 13;
END;
