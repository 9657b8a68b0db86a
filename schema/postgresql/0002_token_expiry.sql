-- pbfleet schema for PostgreSQL, version 2: API tokens may carry an expiry
-- (same meaning as schema/0002_token_expiry.sql).
--
-- expires_at: BIGINT seconds since 1970-01-01 UTC, or NULL for a token that
-- lasts until it is revoked (every token made before this version).

ALTER TABLE api_tokens ADD COLUMN expires_at BIGINT
  CHECK (expires_at IS NULL OR expires_at > created_at);
