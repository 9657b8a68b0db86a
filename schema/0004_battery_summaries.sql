-- pbfleet schema, version 4: per-battery summaries for the winter report,
-- and a count of fleet changes for the report cache.
--
-- Readings keep their raw values. Two derived columns sit beside them:
-- trusted_soc_pct and trusted_temp_c, the state of charge and the
-- electrolyte temperature used, set only when the models trust the reading
-- (settled OCV or hydrometer SG, no surface charge). The store fills them
-- as it inserts, from analytics::derive; when the derive rules change
-- (summary_state.facts_version) it fills them again from the raw values.
--
-- battery_summaries holds, per battery, what a look-back over its newest
-- 13 readings (analytics::kWinterLookback; order: taken_at, then id) finds:
-- the newest reading's time, how many readings were looked at, and the
-- newest trusted one among them with how many newer readings lie above it,
-- and a revision that moves on with every reading stored for the battery
-- (the server keeps trend results per battery and revision). The triggers
-- below keep it in the inserting transaction, one primary-key update per
-- reading.

ALTER TABLE readings ADD COLUMN trusted_soc_pct REAL;
ALTER TABLE readings ADD COLUMN trusted_temp_c REAL;

CREATE TABLE battery_summaries (
  battery_id         INTEGER PRIMARY KEY REFERENCES batteries (id),
  latest_at          INTEGER,
  recent             INTEGER NOT NULL DEFAULT 0 CHECK (recent BETWEEN 0 AND 13),
  trusted_id         INTEGER,
  trusted_at         INTEGER,
  trusted_soc_pct    REAL,
  trusted_temp_c     REAL,
  newer_than_trusted INTEGER NOT NULL DEFAULT 0 CHECK (newer_than_trusted BETWEEN 0 AND 12),
  revision           INTEGER NOT NULL DEFAULT 0
) STRICT;
INSERT INTO battery_summaries (battery_id) SELECT id FROM batteries;
CREATE TRIGGER batteries_summary AFTER INSERT ON batteries BEGIN
  INSERT INTO battery_summaries (battery_id) VALUES (NEW.id);
END;

-- Which derivation the facts and summaries were made with (empty: never
-- made; the store makes them when it opens).
CREATE TABLE summary_state (
  name  TEXT PRIMARY KEY,
  value TEXT NOT NULL
) STRICT, WITHOUT ROWID;
INSERT INTO summary_state (name, value) VALUES ('facts_version', '');

-- A new reading that is not trusted: when it is newer than the trusted one
-- it pushes that one a place down, out of the look-back at the 13th.
CREATE TRIGGER readings_summary_untrusted AFTER INSERT ON readings
WHEN NEW.trusted_soc_pct IS NULL BEGIN
  UPDATE battery_summaries SET
    latest_at = max(coalesce(latest_at, NEW.taken_at), NEW.taken_at),
    recent = min(recent + 1, 13),
    revision = revision + 1,
    newer_than_trusted = CASE
      WHEN trusted_at IS NULL OR NEW.taken_at < trusted_at THEN newer_than_trusted
      WHEN newer_than_trusted + 1 >= 13 THEN 0
      ELSE newer_than_trusted + 1 END,
    trusted_id = CASE WHEN trusted_at IS NOT NULL AND NEW.taken_at >= trusted_at
      AND newer_than_trusted + 1 >= 13 THEN NULL ELSE trusted_id END,
    trusted_soc_pct = CASE WHEN trusted_at IS NOT NULL AND NEW.taken_at >= trusted_at
      AND newer_than_trusted + 1 >= 13 THEN NULL ELSE trusted_soc_pct END,
    trusted_temp_c = CASE WHEN trusted_at IS NOT NULL AND NEW.taken_at >= trusted_at
      AND newer_than_trusted + 1 >= 13 THEN NULL ELSE trusted_temp_c END,
    trusted_at = CASE WHEN trusted_at IS NOT NULL AND NEW.taken_at >= trusted_at
      AND newer_than_trusted + 1 >= 13 THEN NULL ELSE trusted_at END
  WHERE battery_id = NEW.battery_id;
END;

-- A new trusted reading newer than the trusted one (or with none) becomes
-- it, when fewer than 13 readings are newer still.
CREATE TRIGGER readings_summary_trusted AFTER INSERT ON readings
WHEN NEW.trusted_soc_pct IS NOT NULL BEGIN
  UPDATE battery_summaries SET
    latest_at = max(coalesce(latest_at, NEW.taken_at), NEW.taken_at),
    recent = min(recent + 1, 13),
    revision = revision + 1
  WHERE battery_id = NEW.battery_id;
  UPDATE battery_summaries SET
    trusted_id = NEW.id,
    trusted_at = NEW.taken_at,
    trusted_soc_pct = NEW.trusted_soc_pct,
    trusted_temp_c = NEW.trusted_temp_c,
    newer_than_trusted = (SELECT count(*) FROM (SELECT 1 FROM readings r
      WHERE r.battery_id = NEW.battery_id AND r.taken_at > NEW.taken_at LIMIT 13))
  WHERE battery_id = NEW.battery_id
    AND (trusted_at IS NULL OR NEW.taken_at >= trusted_at)
    AND (SELECT count(*) FROM (SELECT 1 FROM readings r
      WHERE r.battery_id = NEW.battery_id AND r.taken_at > NEW.taken_at LIMIT 13)) < 13;
END;

-- Readings are never deleted by the store (a refused batch is rolled back
-- with its trigger work); a deletion by hand marks the summaries for a
-- rebuild at the next start.
CREATE TRIGGER readings_summary_deleted AFTER DELETE ON readings BEGIN
  UPDATE summary_state SET value = '' WHERE name = 'facts_version';
END;

-- Fleet changes (depots, vehicles, batteries, events): with the readings
-- count, the data version a cached report is keyed by.
INSERT INTO counters (name, value) VALUES ('fleet_changes', 0);
CREATE TRIGGER depots_changed_insert AFTER INSERT ON depots BEGIN
  UPDATE counters SET value = value + 1 WHERE name = 'fleet_changes'; END;
CREATE TRIGGER depots_changed_update AFTER UPDATE ON depots BEGIN
  UPDATE counters SET value = value + 1 WHERE name = 'fleet_changes'; END;
CREATE TRIGGER vehicles_changed_insert AFTER INSERT ON vehicles BEGIN
  UPDATE counters SET value = value + 1 WHERE name = 'fleet_changes'; END;
CREATE TRIGGER vehicles_changed_update AFTER UPDATE ON vehicles BEGIN
  UPDATE counters SET value = value + 1 WHERE name = 'fleet_changes'; END;
CREATE TRIGGER batteries_changed_insert AFTER INSERT ON batteries BEGIN
  UPDATE counters SET value = value + 1 WHERE name = 'fleet_changes'; END;
CREATE TRIGGER batteries_changed_update AFTER UPDATE ON batteries BEGIN
  UPDATE counters SET value = value + 1 WHERE name = 'fleet_changes'; END;
