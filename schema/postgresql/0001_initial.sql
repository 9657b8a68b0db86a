-- pbfleet schema for PostgreSQL, version 1: depots, vehicles, batteries and
-- their events, readings, API tokens. Same meaning as schema/0001_initial.sql.
--
-- Conventions: times are BIGINT seconds since 1970-01-01 UTC; dates
-- (installed_on) BIGINT days since 1970-01-01; units in column names.
-- Readings hold raw values only: derived values are computed by the models.
-- Ids come from identity columns; the store takes one advisory lock for every
-- write transaction, so ids are handed out in commit order and keyset pages
-- stay stable while other instances insert.

CREATE TABLE depots (
  id           BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
  name         TEXT NOT NULL UNIQUE CHECK (length(name) > 0),
  time_zone    TEXT NOT NULL,
  design_low_c DOUBLE PRECISION NOT NULL
);

CREATE TABLE vehicles (
  id             BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
  code           TEXT NOT NULL UNIQUE CHECK (length(code) > 0),
  depot_id       BIGINT NOT NULL REFERENCES depots (id),
  engine         TEXT NOT NULL CHECK (engine IN ('gasoline', 'diesel')),
  displacement_l DOUBLE PRECISION,
  required_cca_a DOUBLE PRECISION
);
CREATE INDEX vehicles_by_depot ON vehicles (depot_id);

CREATE TABLE batteries (
  id                   BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
  serial               TEXT NOT NULL UNIQUE CHECK (length(serial) > 0),
  chemistry            TEXT NOT NULL CHECK (chemistry IN ('flooded', 'efb', 'agm', 'gel')),
  nominal_v            DOUBLE PRECISION NOT NULL,
  cells                INTEGER NOT NULL CHECK (cells BETWEEN 1 AND 24),
  rated_cca_a          DOUBLE PRECISION NOT NULL,
  reserve_capacity_min DOUBLE PRECISION,
  capacity_ah          DOUBLE PRECISION,
  full_charge_sg       DOUBLE PRECISION,
  installed_on         BIGINT NOT NULL,
  vehicle_id           BIGINT REFERENCES vehicles (id),
  status               TEXT NOT NULL DEFAULT 'in_service' CHECK (status IN ('in_service', 'retired')),
  retired_at           BIGINT,
  retire_reason        TEXT NOT NULL DEFAULT ''
);
CREATE INDEX batteries_by_vehicle ON batteries (vehicle_id);

CREATE TABLE battery_events (
  id         BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
  battery_id BIGINT NOT NULL REFERENCES batteries (id),
  at         BIGINT NOT NULL,
  kind       TEXT NOT NULL CHECK (kind IN ('fitted', 'retired')),
  vehicle_id BIGINT REFERENCES vehicles (id),
  detail     TEXT NOT NULL DEFAULT ''
);
CREATE INDEX battery_events_by_battery ON battery_events (battery_id, at);

-- One row per reading as logged; cell_sg as in the SQLite schema (raw
-- hydrometer values, cell 1 first, shortest decimals joined by ';').
-- content_hash (first 16 bytes of SHA-256 over the canonical content)
-- decides whether a reused reading_id is a replay or a conflict.
CREATE TABLE readings (
  id                 BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
  reading_id         TEXT NOT NULL UNIQUE,
  battery_id         BIGINT NOT NULL REFERENCES batteries (id),
  taken_at           BIGINT NOT NULL,
  received_at        BIGINT NOT NULL,
  ocv_v              DOUBLE PRECISION,
  cell_sg            TEXT NOT NULL DEFAULT '',
  electrolyte_temp_c DOUBLE PRECISION,
  electrolyte_unit   TEXT CHECK (electrolyte_unit IN ('C', 'F')),
  ambient_temp_c     DOUBLE PRECISION,
  ambient_unit       TEXT CHECK (ambient_unit IN ('C', 'F')),
  rest_h             DOUBLE PRECISION,
  load_test_a        DOUBLE PRECISION,
  load_test_end_v    DOUBLE PRECISION,
  logged_by          TEXT NOT NULL DEFAULT '',
  source             TEXT NOT NULL DEFAULT '',
  note               TEXT NOT NULL DEFAULT '',
  after_charge       BOOLEAN NOT NULL DEFAULT false,
  water_added        BOOLEAN NOT NULL DEFAULT false,
  content_hash       BYTEA NOT NULL CHECK (length(content_hash) = 16)
);
-- History and "last N per battery" are one range lookup on this index.
CREATE INDEX readings_by_battery_time ON readings (battery_id, taken_at);

-- Counts kept up to date by the store in the transaction that inserts
-- (one update per transaction, not per row), so /metrics never scans.
CREATE TABLE counters (
  name  TEXT PRIMARY KEY,
  value BIGINT NOT NULL
);
INSERT INTO counters (name, value) VALUES ('readings', 0);

-- API tokens: only the SHA-256 of the token is kept.
CREATE TABLE api_tokens (
  id         BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
  name       TEXT NOT NULL,
  role       TEXT NOT NULL CHECK (role IN ('crew', 'technician', 'manager', 'admin')),
  depot_id   BIGINT REFERENCES depots (id),
  hash       BYTEA NOT NULL UNIQUE CHECK (length(hash) = 32),
  created_at BIGINT NOT NULL,
  revoked_at BIGINT
);
