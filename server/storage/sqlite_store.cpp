// Opening, connection pool and operations of the SQLite store.
#include "server/storage/sqlite_store.hpp"

#include <sqlite3.h>

#include <fcntl.h>
#include <unistd.h>

#include <system_error>

#include "server/storage/migrations.hpp"
#include "server/storage/sqlite_migrate.hpp"
#include "server/storage/sqlite_store_impl.hpp"

namespace pbfleet::storage {
namespace sqlite {
namespace {

constexpr int kWriterCacheKib = 32 * 1024;

// Sets a pragma and reads it back; refuses to go on if it did not take.
void require_pragma(Db& db, std::string_view set, std::string_view get, std::string_view want) {
  db.exec(set);
  const std::string got = db.query_text(get);
  if (got != want) {
    fail(StoreErrc::unavailable, "refusing to open the database: '" + std::string(set) +
                                     "' did not take effect (reads '" + got + "', needs '" +
                                     std::string(want) + "')");
  }
}

void set_busy_timeout(Db& db, std::chrono::milliseconds timeout) {
  const std::string ms = std::to_string(timeout.count());
  require_pragma(db, "PRAGMA busy_timeout = " + ms, "PRAGMA busy_timeout", ms);
}

// The durability settings of the writer (see sqlite_store.hpp for why FULL).
void configure_writer(Db& db, std::chrono::milliseconds busy_timeout) {
  set_busy_timeout(db, busy_timeout);
  require_pragma(db, "PRAGMA journal_mode = WAL", "PRAGMA journal_mode", "wal");
  require_pragma(db, "PRAGMA synchronous = FULL", "PRAGMA synchronous", "2");
  require_pragma(db, "PRAGMA foreign_keys = ON", "PRAGMA foreign_keys", "1");
  // A larger page cache for the writer, so a big batch does not spill pages
  // into the WAL before it commits (KiB; SQLite's default is 2 MiB).
  db.exec("PRAGMA cache_size = -" + std::to_string(kWriterCacheKib));
  // Each batch of a group commit runs in its own savepoint, whose undo log
  // (the sub-journal) otherwise spills to a temporary file past 64 KiB:
  // a pwrite per touched page. It only lives until the batch is released,
  // so memory is the right place (bounded by the request body limit).
  require_pragma(db, "PRAGMA temp_store = MEMORY", "PRAGMA temp_store", "2");
}

// Forces a file's contents to stable storage.
void sync_file(const std::filesystem::path& path) {
  const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
  if (fd < 0 || ::fsync(fd) != 0) {
    if (fd >= 0) ::close(fd);
    fail(StoreErrc::unavailable, "cannot sync backup " + path.string());
  }
  ::close(fd);
}

}  // namespace

SqliteStore::SqliteStore(SqliteOptions options) : options_(std::move(options)) {
  // SQLite's allocation statistics take a process-wide mutex on every
  // malloc, which every connection thread then contends for; nothing here
  // reads them. Only possible before SQLite initialises; later calls are
  // refused (SQLITE_MISUSE) and change nothing.
  static const int memstatus_off = sqlite3_config(SQLITE_CONFIG_MEMSTATUS, 0);
  (void)memstatus_off;
  if (options_.max_readers == 0) options_.max_readers = 1;
  if (options_.read_only) {
    Lease probe = lease_reader();
    if (schema_version(probe.db()) != known_schema_version()) {
      fail(StoreErrc::invalid,
           "database schema version " + std::to_string(schema_version(probe.db())) +
               " differs from this binary's " + std::to_string(known_schema_version()) +
               "; open it read-write once");
    }
    return;
  }
  writer_ = std::make_unique<Db>(options_.file, Db::Mode::read_write_create);
  configure_writer(*writer_, options_.busy_timeout);
  if (options_.max_size_bytes > 0) {
    const auto page = static_cast<std::uint64_t>(writer_->query_int("PRAGMA page_size"));
    writer_->exec("PRAGMA max_page_count = " + std::to_string(options_.max_size_bytes / page));
  }
  migrate(*writer_, embedded_migrations(),
          std::chrono::time_point_cast<std::chrono::seconds>(std::chrono::system_clock::now()));
  refresh_summaries();
}

SqliteStore::~SqliteStore() {
  std::lock_guard lock(write_mutex_);
  if (writer_) {
    // Fold the WAL back into the main file on a clean shutdown (best effort).
    try {
      writer_->exec("PRAGMA wal_checkpoint(TRUNCATE)");
    } catch (const DbError&) {
    }
  }
}

// ---- reader pool --------------------------------------------------------------

std::unique_ptr<Db> SqliteStore::open_reader() {
  auto db = std::make_unique<Db>(options_.file, Db::Mode::read_only);
  set_busy_timeout(*db, options_.busy_timeout);
  db->exec("PRAGMA mmap_size = " + std::to_string(options_.reader_mmap_bytes));
  return db;
}

SqliteStore::Lease SqliteStore::lease_reader() {
  std::unique_lock lock(pool_mutex_);
  pool_free_.wait(lock,
                  [&] { return !idle_readers_.empty() || open_readers_ < options_.max_readers; });
  if (!idle_readers_.empty()) {
    auto db = std::move(idle_readers_.back());
    idle_readers_.pop_back();
    return Lease(*this, std::move(db));
  }
  ++open_readers_;
  lock.unlock();
  try {
    return Lease(*this, open_reader());
  } catch (...) {
    lock.lock();
    --open_readers_;
    pool_free_.notify_one();
    throw;
  }
}

void SqliteStore::give_back(std::unique_ptr<Db> db) {
  {
    std::lock_guard lock(pool_mutex_);
    if (db->in_transaction()) {
      try {
        db->exec("ROLLBACK");
      } catch (const DbError&) {
        db.reset();  // unusable: close it, a fresh one opens on demand
        --open_readers_;
      }
    }
    if (db) idle_readers_.push_back(std::move(db));
  }
  pool_free_.notify_one();
}

SqliteStore::Lease::~Lease() {
  if (db_) store_.give_back(std::move(db_));
}

// ---- operations ---------------------------------------------------------------

StoreResult<BackupReport> SqliteStore::backup_to(const std::filesystem::path& path) {
  try {
    if (std::filesystem::exists(path)) {
      fail(StoreErrc::conflict, "backup target " + path.string() + " already exists", "path");
    }
    {
      // VACUUM INTO writes a consistent snapshot and cannot run inside a
      // transaction, so it runs on a reader outside read().
      Lease lease = lease_reader();
      lease.db().prepare("VACUUM INTO ?1").bind(1, path.string()).run();
    }
    sync_file(path);
    Db copy(path, Db::Mode::read_only);
    BackupReport report{path, std::filesystem::file_size(path),
                        copy.query_text("PRAGMA integrity_check")};
    return report;
  } catch (const DbError& e) {
    return e.error();
  } catch (const std::filesystem::filesystem_error& e) {
    return StoreError{StoreErrc::unavailable, e.what(), "path"};
  }
}

StoreResult<DurabilitySettings> SqliteStore::durability() {
  try {
    std::lock_guard lock(write_mutex_);
    if (!writer_) fail(StoreErrc::unavailable, "the store was opened read-only");
    Db& db = *writer_;
    DurabilitySettings s;
    s.journal_mode = db.query_text("PRAGMA journal_mode");
    s.synchronous = static_cast<int>(db.query_int("PRAGMA synchronous"));
    s.foreign_keys = db.query_int("PRAGMA foreign_keys") == 1;
    s.busy_timeout_ms = static_cast<int>(db.query_int("PRAGMA busy_timeout"));
    s.schema_version = schema_version(db);
    return s;
  } catch (const DbError& e) {
    return e.error();
  }
}

StoreResult<Done> SqliteStore::ping() {
  // An open connection keeps answering from its file descriptor even when
  // the file's permissions change, so check that the file is still usable.
  const int need = options_.read_only ? R_OK : (R_OK | W_OK);
  if (::access(options_.file.c_str(), need) != 0) {
    return StoreError{StoreErrc::unavailable,
                      "database file " + options_.file.string() + " is not accessible", ""};
  }
  return read([](Db& db) {
    db.query_int("SELECT count(*) FROM schema_version");
    return Done{};
  });
}

}  // namespace sqlite

StoreResult<std::unique_ptr<Store>> open_sqlite_store(const SqliteOptions& options) {
  try {
    return std::unique_ptr<Store>(std::make_unique<sqlite::SqliteStore>(options));
  } catch (const sqlite::DbError& e) {
    return e.error();
  }
}

int known_schema_version() {
  const auto& migrations = embedded_migrations();
  return migrations.empty() ? 0 : migrations.back().version;
}

}  // namespace pbfleet::storage
