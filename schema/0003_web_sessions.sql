-- pbfleet schema, version 3: dashboard sign-in sessions.
--
-- A session is opened by presenting an API token once on the sign-in page;
-- the browser then holds only a random session id in an HttpOnly cookie.
-- hash: SHA-256 of that id (the id itself is never stored).
-- csrf: per-session secret put into every dashboard form (hex).
-- Times are INTEGER seconds since 1970-01-01 UTC. A session ends at
-- expires_at, at sign-out (row deleted) or when its token is revoked (rows
-- deleted with the revocation) or expires (checked on every request).

CREATE TABLE web_sessions (
  id         INTEGER PRIMARY KEY,
  hash       BLOB NOT NULL UNIQUE CHECK (length(hash) = 32),
  token_id   INTEGER NOT NULL REFERENCES api_tokens (id),
  csrf       TEXT NOT NULL CHECK (length(csrf) >= 32),
  created_at INTEGER NOT NULL,
  expires_at INTEGER NOT NULL CHECK (expires_at > created_at)
) STRICT;

CREATE INDEX web_sessions_by_token ON web_sessions (token_id);
