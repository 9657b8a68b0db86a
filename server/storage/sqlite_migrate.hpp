// Applies schema migrations to a SQLite database and records them.
//
// schema_version holds one row per applied migration (version, file name,
// applied_at). Each migration and its row are written in one BEGIN
// IMMEDIATE transaction: a crash part-way leaves the previous version, and
// the next open runs the migration again from the start.
#pragma once

#include <chrono>
#include <vector>

#include "server/storage/migrations.hpp"
#include "server/storage/sqlite_db.hpp"

namespace pbfleet::storage::sqlite {

// Highest applied version; 0 for a database never migrated.
int schema_version(Db& db);

// Brings the database to the newest of `migrations` (versions 1..N in
// order, no gaps) and returns that version. Throws DbError: invalid when the
// database is newer than this binary knows (it is left untouched);
// internal when a migration's SQL fails (that migration is rolled back).
int migrate(Db& db, const std::vector<Migration>& migrations, std::chrono::sys_seconds now);

}  // namespace pbfleet::storage::sqlite
