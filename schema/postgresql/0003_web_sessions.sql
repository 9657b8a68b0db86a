-- pbfleet schema for PostgreSQL, version 3: dashboard sign-in sessions
-- (same meaning as schema/0003_web_sessions.sql).
--
-- hash: SHA-256 of the session cookie's value (the value is never stored).
-- csrf: per-session secret put into every dashboard form (hex).
-- Times are BIGINT seconds since 1970-01-01 UTC. Revoking a token deletes
-- its sessions in the same transaction.

CREATE TABLE web_sessions (
  id         BIGINT GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
  hash       BYTEA NOT NULL UNIQUE CHECK (length(hash) = 32),
  token_id   BIGINT NOT NULL REFERENCES api_tokens (id),
  csrf       TEXT NOT NULL CHECK (length(csrf) >= 32),
  created_at BIGINT NOT NULL,
  expires_at BIGINT NOT NULL CHECK (expires_at > created_at)
);

CREATE INDEX web_sessions_by_token ON web_sessions (token_id);
