-- pbfleet schema, version 1: depots, vehicles, batteries and their events,
-- readings, API tokens.
--
-- Conventions: times are INTEGER seconds since 1970-01-01 UTC; dates
-- (installed_on) INTEGER days since 1970-01-01; units in column names.
-- Readings hold raw values only: derived values (corrected SG, state of
-- charge, flags) are computed by the models when needed, never stored.
-- Tables are STRICT so a wrong type is refused, not silently kept.

CREATE TABLE depots (
  id           INTEGER PRIMARY KEY,
  name         TEXT NOT NULL UNIQUE CHECK (length(name) > 0),
  time_zone    TEXT NOT NULL,
  design_low_c REAL NOT NULL
) STRICT;

CREATE TABLE vehicles (
  id             INTEGER PRIMARY KEY,
  code           TEXT NOT NULL UNIQUE CHECK (length(code) > 0),
  depot_id       INTEGER NOT NULL REFERENCES depots (id),
  engine         TEXT NOT NULL CHECK (engine IN ('gasoline', 'diesel')),
  displacement_l REAL,
  required_cca_a REAL
) STRICT;
CREATE INDEX vehicles_by_depot ON vehicles (depot_id);

CREATE TABLE batteries (
  id                   INTEGER PRIMARY KEY,
  serial               TEXT NOT NULL UNIQUE CHECK (length(serial) > 0),
  chemistry            TEXT NOT NULL CHECK (chemistry IN ('flooded', 'efb', 'agm', 'gel')),
  nominal_v            REAL NOT NULL,
  cells                INTEGER NOT NULL CHECK (cells BETWEEN 1 AND 24),
  rated_cca_a          REAL NOT NULL,
  reserve_capacity_min REAL,
  capacity_ah          REAL,
  full_charge_sg       REAL,
  installed_on         INTEGER NOT NULL,
  vehicle_id           INTEGER REFERENCES vehicles (id),
  status               TEXT NOT NULL DEFAULT 'in_service' CHECK (status IN ('in_service', 'retired')),
  retired_at           INTEGER,
  retire_reason        TEXT NOT NULL DEFAULT ''
) STRICT;
CREATE INDEX batteries_by_vehicle ON batteries (vehicle_id);

CREATE TABLE battery_events (
  id         INTEGER PRIMARY KEY,
  battery_id INTEGER NOT NULL REFERENCES batteries (id),
  at         INTEGER NOT NULL,
  kind       TEXT NOT NULL CHECK (kind IN ('fitted', 'retired')),
  vehicle_id INTEGER REFERENCES vehicles (id),
  detail     TEXT NOT NULL DEFAULT ''
) STRICT;
CREATE INDEX battery_events_by_battery ON battery_events (battery_id, at);

-- One row per reading as logged. cell_sg holds the raw hydrometer values,
-- cell 1 first, as shortest round-trip decimals separated by ';'
-- ("1.265;1.262;..."), compact and lossless. Temperatures are Celsius with
-- the unit they were entered in ('C' or 'F') kept for display.
-- content_hash (first 16 bytes of SHA-256 over the canonical content)
-- decides whether a reused reading_id is a replay or a conflict.
CREATE TABLE readings (
  id                 INTEGER PRIMARY KEY,
  reading_id         TEXT NOT NULL UNIQUE,
  battery_id         INTEGER NOT NULL REFERENCES batteries (id),
  taken_at           INTEGER NOT NULL,
  received_at        INTEGER NOT NULL,
  ocv_v              REAL,
  cell_sg            TEXT NOT NULL DEFAULT '',
  electrolyte_temp_c REAL,
  electrolyte_unit   TEXT CHECK (electrolyte_unit IN ('C', 'F')),
  ambient_temp_c     REAL,
  ambient_unit       TEXT CHECK (ambient_unit IN ('C', 'F')),
  rest_h             REAL,
  load_test_a        REAL,
  load_test_end_v    REAL,
  logged_by          TEXT NOT NULL DEFAULT '',
  source             TEXT NOT NULL DEFAULT '',
  note               TEXT NOT NULL DEFAULT '',
  after_charge       INTEGER NOT NULL DEFAULT 0 CHECK (after_charge IN (0, 1)),
  water_added        INTEGER NOT NULL DEFAULT 0 CHECK (water_added IN (0, 1)),
  content_hash       BLOB NOT NULL CHECK (length(content_hash) = 16)
) STRICT;
-- History and "last N per battery" are one range lookup on this index.
CREATE INDEX readings_by_battery_time ON readings (battery_id, taken_at);

-- Counts kept up to date by triggers, so /metrics never scans readings.
CREATE TABLE counters (
  name  TEXT PRIMARY KEY,
  value INTEGER NOT NULL
) STRICT, WITHOUT ROWID;
INSERT INTO counters (name, value) VALUES ('readings', 0);
CREATE TRIGGER readings_count_up AFTER INSERT ON readings BEGIN
  UPDATE counters SET value = value + 1 WHERE name = 'readings';
END;
CREATE TRIGGER readings_count_down AFTER DELETE ON readings BEGIN
  UPDATE counters SET value = value - 1 WHERE name = 'readings';
END;

-- API tokens: only the SHA-256 of the token is kept.
CREATE TABLE api_tokens (
  id         INTEGER PRIMARY KEY,
  name       TEXT NOT NULL,
  role       TEXT NOT NULL CHECK (role IN ('crew', 'technician', 'manager', 'admin')),
  depot_id   INTEGER REFERENCES depots (id),
  hash       BLOB NOT NULL UNIQUE CHECK (length(hash) = 32),
  created_at INTEGER NOT NULL,
  revoked_at INTEGER
) STRICT;
