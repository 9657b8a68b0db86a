#include "server/storage/sqlite_migrate.hpp"

#include <string>

namespace pbfleet::storage::sqlite {
namespace {

constexpr const char* kCreateVersionTable =
    "CREATE TABLE IF NOT EXISTS schema_version ("
    " version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at INTEGER NOT NULL) STRICT";

bool version_table_exists(Db& db) {
  return db.query_int(
             "SELECT count(*) FROM sqlite_schema WHERE type = 'table' AND name = "
             "'schema_version'") > 0;
}

void refuse_if_newer(int found, int known) {
  if (found <= known) return;
  fail(StoreErrc::invalid, "database schema version " + std::to_string(found) +
                               " is newer than this pbfleetd knows (" + std::to_string(known) +
                               "); upgrade pbfleetd or restore a backup made by this version");
}

// One migration and its record, atomically. Re-checks the version inside
// the write lock in case another process migrated meanwhile.
void apply(Db& db, const Migration& m, std::chrono::sys_seconds now) {
  Transaction tx(db);
  if (schema_version(db) >= m.version) return;
  try {
    db.exec(m.sql);
  } catch (const DbError& e) {
    fail(StoreErrc::internal,
         "migration " + std::string(m.name) + " failed and was rolled back: " + e.what());
  }
  db.prepare("INSERT INTO schema_version (version, name, applied_at) VALUES (?1, ?2, ?3)")
      .bind(1, m.version)
      .bind(2, m.name)
      .bind(3, to_db(now))
      .run();
  tx.commit();
}

}  // namespace

int schema_version(Db& db) {
  if (!version_table_exists(db)) return 0;
  return static_cast<int>(db.query_int("SELECT coalesce(max(version), 0) FROM schema_version"));
}

int migrate(Db& db, const std::vector<Migration>& migrations, std::chrono::sys_seconds now) {
  const int known = migrations.empty() ? 0 : migrations.back().version;
  refuse_if_newer(schema_version(db), known);
  {
    Transaction tx(db);
    db.exec(kCreateVersionTable);
    tx.commit();
  }
  int expected = 1;
  for (const Migration& m : migrations) {
    if (m.version != expected++) {
      fail(StoreErrc::internal, "migrations are not numbered 1..N: " + std::string(m.name));
    }
    if (m.version > schema_version(db)) apply(db, m, now);
  }
  return schema_version(db);
}

}  // namespace pbfleet::storage::sqlite
