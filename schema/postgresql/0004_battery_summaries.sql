-- pbfleet schema for PostgreSQL, version 4: per-battery summaries for the
-- winter report, and a count of fleet changes for the report cache (same
-- meaning as schema/0004_battery_summaries.sql).
--
-- The derived columns trusted_soc_pct and trusted_temp_c are filled by the
-- store as it inserts. Here the summaries are kept by statement-level
-- triggers: after each INSERT or DELETE on readings, every battery it
-- touched gets its summary worked out again from its newest 13 readings
-- (one index range per battery), so a batch of many rows costs one pass.

ALTER TABLE readings ADD COLUMN trusted_soc_pct DOUBLE PRECISION;
ALTER TABLE readings ADD COLUMN trusted_temp_c DOUBLE PRECISION;

CREATE TABLE battery_summaries (
  battery_id         BIGINT PRIMARY KEY REFERENCES batteries (id),
  latest_at          BIGINT,
  recent             INTEGER NOT NULL DEFAULT 0 CHECK (recent BETWEEN 0 AND 13),
  trusted_id         BIGINT,
  trusted_at         BIGINT,
  trusted_soc_pct    DOUBLE PRECISION,
  trusted_temp_c     DOUBLE PRECISION,
  newer_than_trusted INTEGER NOT NULL DEFAULT 0 CHECK (newer_than_trusted BETWEEN 0 AND 12),
  revision           BIGINT NOT NULL DEFAULT 0
);
INSERT INTO battery_summaries (battery_id) SELECT id FROM batteries;

CREATE FUNCTION add_battery_summary() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO battery_summaries (battery_id) VALUES (NEW.id);
  RETURN NULL;
END $$;
CREATE TRIGGER batteries_summary AFTER INSERT ON batteries
  FOR EACH ROW EXECUTE FUNCTION add_battery_summary();

CREATE TABLE summary_state (
  name  TEXT PRIMARY KEY,
  value TEXT NOT NULL
);
INSERT INTO summary_state (name, value) VALUES ('facts_version', '');

-- Works out again the summaries of the batteries in `touched`.
CREATE FUNCTION refresh_battery_summaries(touched BIGINT[]) RETURNS void LANGUAGE sql AS $$
  WITH recent AS (
    SELECT t.battery_id, w.id, w.taken_at, w.trusted_soc_pct, w.trusted_temp_c,
           row_number() OVER (PARTITION BY t.battery_id ORDER BY w.taken_at DESC, w.id DESC) - 1 AS place
    FROM unnest(touched) AS t(battery_id)
    CROSS JOIN LATERAL (
      SELECT r.id, r.taken_at, r.trusted_soc_pct, r.trusted_temp_c FROM readings r
      WHERE r.battery_id = t.battery_id ORDER BY r.taken_at DESC, r.id DESC LIMIT 13) w),
  counted AS (
    SELECT battery_id, max(taken_at) AS latest_at, count(*) AS recent FROM recent GROUP BY battery_id),
  basis AS (
    SELECT DISTINCT ON (battery_id) battery_id, id, taken_at, trusted_soc_pct, trusted_temp_c, place
    FROM recent WHERE trusted_soc_pct IS NOT NULL ORDER BY battery_id, taken_at DESC, id DESC)
  UPDATE battery_summaries s SET
    latest_at = c.latest_at,
    recent = coalesce(c.recent, 0),
    trusted_id = b.id,
    trusted_at = b.taken_at,
    trusted_soc_pct = b.trusted_soc_pct,
    trusted_temp_c = b.trusted_temp_c,
    newer_than_trusted = coalesce(b.place, 0),
    revision = s.revision + 1
  FROM unnest(touched) AS t(battery_id)
  LEFT JOIN counted c ON c.battery_id = t.battery_id
  LEFT JOIN basis b ON b.battery_id = t.battery_id
  WHERE s.battery_id = t.battery_id
$$;

CREATE FUNCTION readings_summaries_changed() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM refresh_battery_summaries(ARRAY(SELECT DISTINCT battery_id FROM changed));
  RETURN NULL;
END $$;
CREATE TRIGGER readings_summaries_inserted AFTER INSERT ON readings
  REFERENCING NEW TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION readings_summaries_changed();
CREATE TRIGGER readings_summaries_deleted AFTER DELETE ON readings
  REFERENCING OLD TABLE AS changed FOR EACH STATEMENT EXECUTE FUNCTION readings_summaries_changed();

-- Fleet changes (depots, vehicles, batteries): with the readings count, the
-- data version a cached report is keyed by.
INSERT INTO counters (name, value) VALUES ('fleet_changes', 0);
CREATE FUNCTION count_fleet_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  UPDATE counters SET value = value + 1 WHERE name = 'fleet_changes';
  RETURN NULL;
END $$;
CREATE TRIGGER depots_changed AFTER INSERT OR UPDATE ON depots
  FOR EACH STATEMENT EXECUTE FUNCTION count_fleet_change();
CREATE TRIGGER vehicles_changed AFTER INSERT OR UPDATE ON vehicles
  FOR EACH STATEMENT EXECUTE FUNCTION count_fleet_change();
CREATE TRIGGER batteries_changed AFTER INSERT OR UPDATE ON batteries
  FOR EACH STATEMENT EXECUTE FUNCTION count_fleet_change();
