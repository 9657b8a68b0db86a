// PostgreSQL implementation of the Store, for several pbfleetd instances on
// one database (see README.md, "PostgreSQL").
//
// Durability: every connection sets synchronous_commit = on and reads it
// back; open refuses a server where it does not take. A write is
// acknowledged only after COMMIT returned, so an acknowledged reading is in
// the server's flushed WAL and survives a crash of pbfleetd or of the
// database server.
//
// Ordering across instances: every write transaction first takes one
// transaction-scoped advisory lock, so writes of all instances commit one
// after another and identity values are handed out in commit order. A
// reader that sees row id N therefore sees every committed row below N,
// which keeps keyset pages stable under concurrent inserts from any
// instance, and makes reading_id replays across instances a plain
// INSERT ... ON CONFLICT DO NOTHING followed by a compare.
//
// Threading inside one process: one writer connection behind a mutex (group
// commit: the reading writer hands it many requests' batches at once, which
// are stored set at a time, pg_append.cpp);
// reads borrow a connection from a pool (up to `max_readers`) and run in one
// REPEATABLE READ READ ONLY transaction, so a report sees one snapshot.
// Nothing is cached between calls except batteries by serial (get_battery,
// the look-up every posted reading makes): this process's own fleet writes
// drop the cache at once, another instance's are seen within
// kBatteryCacheTtl (1 s).
#pragma once

#include <chrono>
#include <cstddef>
#include <memory>
#include <string>
#include <string_view>

#include "server/storage/store.hpp"

namespace pbfleet::storage {

// How long get_battery may answer from this process's cache.
inline constexpr std::chrono::milliseconds kBatteryCacheTtl{1000};

struct PgOptions {
  std::size_t max_readers = 8;
  // How long a write waits for the write lock (or any row lock) before it
  // gives up with `unavailable`, like SQLite's busy timeout.
  std::chrono::milliseconds lock_timeout{5000};
  // Waiting for the server to answer a new connection (libpq connect_timeout).
  std::chrono::seconds connect_timeout{5};
};

// Connects (libpq: the URI or key=value string, PG* environment variables,
// ~/.pgpass), checks synchronous_commit and migrates to the schema this
// binary knows, under an advisory lock so two instances starting at once do
// not both migrate. Errors: unavailable (cannot connect, durability setting
// refused), invalid (database schema newer than this binary: detail names
// both versions), internal (a migration failed and was rolled back).
// Error details never contain the password.
StoreResult<std::unique_ptr<Store>> open_postgres_store(const std::string& conninfo,
                                                        const PgOptions& options = {});

// True when `database` names a PostgreSQL database (postgresql:// or
// postgres:// URI) rather than a SQLite file.
bool is_postgres_uri(std::string_view database);

// The connection string with any password replaced by "***" (URI userinfo,
// `password=` keyword, `?password=` parameter), for logs and messages.
std::string redact_conninfo(std::string_view conninfo);

// The schema version this binary migrates a PostgreSQL database to.
int known_pg_schema_version();

}  // namespace pbfleet::storage
