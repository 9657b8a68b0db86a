-- pbfleet schema, version 2: API tokens may carry an expiry.
--
-- expires_at: INTEGER seconds since 1970-01-01 UTC, or NULL for a token
-- that lasts until it is revoked (every token made before this version).
-- A token is refused from expires_at on; the row stays so the token list
-- shows what expired and when.

ALTER TABLE api_tokens ADD COLUMN expires_at INTEGER
  CHECK (expires_at IS NULL OR expires_at > created_at);
