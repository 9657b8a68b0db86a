// Schema migrations: numbered SQL files from schema/, embedded at build time.
//
// Forward-only. Each migration runs in its own transaction together with the
// bump of schema_version, so a crash mid-migration leaves the old version
// and the next start runs it again.
#pragma once

#include <string_view>
#include <vector>

namespace pbfleet::storage {

struct Migration {
  int version;            // the file's number, 1-based, no gaps
  std::string_view name;  // file name, e.g. "0001_initial.sql"
  std::string_view sql;
};

// Every migration this binary knows, in version order (generated source):
// schema/NNNN_*.sql for SQLite, schema/postgresql/NNNN_*.sql for PostgreSQL
// (the same numbers and meaning).
const std::vector<Migration>& embedded_migrations();
const std::vector<Migration>& embedded_pg_migrations();

}  // namespace pbfleet::storage
