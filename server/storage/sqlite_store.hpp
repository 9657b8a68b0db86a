// SQLite implementation of the Store.
//
// Durability: WAL journal with synchronous=FULL. An acknowledged reading
// must survive a process crash AND a power loss; NORMAL would survive a
// crash but may lose the last commits on power loss, because the WAL is not
// synced at each commit. FULL costs an fsync per commit, which group commit
// (append_reading_batches) spreads over many requests. foreign_keys=ON and a
// busy_timeout are set on every connection; open() refuses a database where
// any of these cannot be set.
//
// Threading: one writer connection, guarded by a mutex, runs every write
// transaction (BEGIN IMMEDIATE ... COMMIT), so writers never meet
// SQLITE_BUSY from each other. Reads take a connection from a small pool of
// read-only connections (WAL lets them run beside the writer and see the
// last committed state); the pool grows up to `max_readers` and callers wait
// for a free one beyond that. All members are safe to call from any thread.
#pragma once

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <memory>

#include "server/storage/store.hpp"

namespace pbfleet::storage {

struct SqliteOptions {
  std::filesystem::path file;  // the database file; created if missing
  std::chrono::milliseconds busy_timeout{5000};
  std::size_t max_readers = 8;
  bool read_only = false;  // open for reads only (no migration)
  // Cap on the database size; 0 = none. A write that would grow the file
  // beyond it fails with disk_full and stores nothing, as on a full disk.
  std::uint64_t max_size_bytes = 0;
  // Memory-mapped reads on the reader connections (0 = off). Report queries
  // then touch pages in the shared OS page cache instead of copying each
  // into a per-connection cache. Writes never use the map (WAL).
  std::uint64_t reader_mmap_bytes = 256ull << 20;
};

// Opens (creating if needed) and migrates the database to the schema this
// binary knows. Errors: unavailable (cannot open or set the durability
// pragmas), invalid (database newer than this binary: detail says which
// versions), internal (a migration failed; the database keeps its old version).
StoreResult<std::unique_ptr<Store>> open_sqlite_store(const SqliteOptions& options);

// The schema version this binary migrates to (the highest schema/NNNN_*.sql).
int known_schema_version();

}  // namespace pbfleet::storage
