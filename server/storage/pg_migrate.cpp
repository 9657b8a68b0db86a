// Migrations of the PostgreSQL schema (schema/postgresql/NNNN_*.sql).
//
// Two instances may start at once on an empty database: the migration runs
// under a session advisory lock, and the version is read again once it is
// held, so only the first instance migrates and the second finds the work
// done. Each migration runs in its own transaction with its schema_version
// row, so a crash part-way leaves the old version.
#include <string>

#include "server/storage/pg_store_impl.hpp"

namespace pbfleet::storage::pg {
namespace {

constexpr const char* kCreateVersionTable =
    "CREATE TABLE IF NOT EXISTS schema_version ("
    " version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at BIGINT NOT NULL)";

void refuse_if_newer(int found, int known) {
  if (found <= known) return;
  fail(StoreErrc::invalid, "database schema version " + std::to_string(found) +
                               " is newer than this pbfleetd knows (" + std::to_string(known) +
                               "); upgrade pbfleetd or restore a backup made by this version");
}

// Holds the migration lock for its lifetime (session level, so it spans
// the migrations' own transactions).
class MigrationLock {
 public:
  explicit MigrationLock(pqxx::connection& c) : c_(c) {
    pqxx::nontransaction tx(c_);
    tx.exec("SELECT pg_advisory_lock(" + std::to_string(kMigrateLockKey) + ")");
  }
  ~MigrationLock() {
    try {
      pqxx::nontransaction tx(c_);
      tx.exec("SELECT pg_advisory_unlock(" + std::to_string(kMigrateLockKey) + ")");
    } catch (const std::exception&) {
      // The lock ends with the session anyway.
    }
  }
  MigrationLock(const MigrationLock&) = delete;
  MigrationLock& operator=(const MigrationLock&) = delete;

 private:
  pqxx::connection& c_;
};

int current_version(pqxx::connection& c) {
  pqxx::nontransaction tx(c);
  return schema_version(tx);
}

void apply(pqxx::connection& c, const Migration& m, std::chrono::sys_seconds now) {
  pqxx::work tx(c);
  try {
    tx.exec(std::string(m.sql));
  } catch (const pqxx::sql_error& e) {
    fail(StoreErrc::internal,
         "migration " + std::string(m.name) + " failed and was rolled back: " + e.what());
  }
  tx.exec_params("INSERT INTO schema_version (version, name, applied_at) VALUES ($1, $2, $3)",
                 m.version, std::string(m.name), to_db(now));
  tx.commit();
}

}  // namespace

int schema_version(pqxx::transaction_base& tx) {
  const auto exists = tx.exec1("SELECT to_regclass('schema_version') IS NOT NULL");
  if (!boolean(exists[0])) return 0;
  return tx.exec1("SELECT coalesce(max(version), 0) FROM schema_version")[0].as<int>();
}

int migrate(pqxx::connection& c, const std::vector<Migration>& migrations,
            std::chrono::sys_seconds now) {
  const int known = migrations.empty() ? 0 : migrations.back().version;
  refuse_if_newer(current_version(c), known);
  MigrationLock lock(c);
  const int found = current_version(c);  // another instance may have migrated meanwhile
  refuse_if_newer(found, known);
  if (found == known) return found;
  {
    pqxx::work tx(c);
    tx.exec(kCreateVersionTable);
    tx.commit();
  }
  int expected = 1;
  for (const Migration& m : migrations) {
    if (m.version != expected++) {
      fail(StoreErrc::internal, "migrations are not numbered 1..N: " + std::string(m.name));
    }
    if (m.version > found) apply(c, m, now);
  }
  return current_version(c);
}

}  // namespace pbfleet::storage::pg
