// RAII wrappers over the SQLite C API: connection, statement, transaction.
//
// Internal to the storage library. The header only forward-declares the C
// types, so nothing outside server/storage/ includes sqlite3.h (tests may
// use these wrappers to inspect or damage a database).
//
// Failures throw DbError, which carries a StoreError already classified
// (busy/locked/read-only -> unavailable, full -> disk_full, unique ->
// conflict, foreign key/check -> constraint). The public Store methods
// catch it at their boundary and return it as a value.
#pragma once

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "server/storage/store.hpp"

struct sqlite3;
struct sqlite3_stmt;

namespace pbfleet::storage::sqlite {

class DbError : public std::runtime_error {
 public:
  explicit DbError(StoreError error);
  const StoreError& error() const { return error_; }

 private:
  StoreError error_;
};

// Throws DbError with `code` and `detail`.
[[noreturn]] void fail(StoreErrc code, std::string detail, std::string field = {});

class Statement;

class Db {
 public:
  enum class Mode { read_write_create, read_only };
  // Opens the file; throws DbError(unavailable) when it cannot.
  Db(const std::filesystem::path& file, Mode mode);
  ~Db();
  Db(const Db&) = delete;
  Db& operator=(const Db&) = delete;

  // Runs one or more statements with no results.
  void exec(std::string_view sql);
  // A prepared statement for `sql`. Statements are kept when their
  // Statement goes away (reset, bindings cleared) and handed out again for
  // the same text, so a query run on every request is compiled once per
  // connection.
  Statement prepare(std::string_view sql);
  // Integer or text result of a one-value query, e.g. "PRAGMA synchronous".
  std::int64_t query_int(std::string_view sql);
  std::string query_text(std::string_view sql);
  std::int64_t last_insert_id() const;
  int changes() const;
  bool in_transaction() const;
  sqlite3* handle() { return db_; }
  // Throws DbError for a non-OK result code `rc`, naming `what`.
  void check(int rc, std::string_view what) const;

 private:
  friend class Statement;
  // Takes back a statement no longer in use: kept for its SQL text, or
  // finalized when one is kept already or the cache is full.
  void recycle(sqlite3_stmt* stmt) noexcept;

  static constexpr std::size_t kMaxIdleStatements = 64;
  sqlite3* db_ = nullptr;
  std::unordered_map<std::string, sqlite3_stmt*> idle_;
};

// A prepared statement. bind() indexes are 1-based as in SQL ("?1").
class Statement {
 public:
  Statement(Db& db, sqlite3_stmt* stmt);
  ~Statement();
  Statement(Statement&& other) noexcept;
  Statement& operator=(Statement&&) = delete;
  Statement(const Statement&) = delete;

  Statement& bind(int index, std::int64_t value);
  Statement& bind(int index, int value) { return bind(index, std::int64_t{value}); }
  Statement& bind(int index, double value);
  Statement& bind(int index, std::string_view text);
  Statement& bind(int index, const char* text) { return bind(index, std::string_view(text)); }
  Statement& bind_blob(int index, const void* data, std::size_t size);
  // Without SQLite's own copy: the caller keeps `text` / `data` alive and
  // unchanged until the statement is next reset (the row writer's inputs).
  Statement& bind_kept(int index, std::string_view text);
  Statement& bind_blob_kept(int index, const void* data, std::size_t size);
  Statement& bind_null(int index);
  template <class T>
  Statement& bind(int index, const std::optional<T>& value) {
    return value ? bind(index, *value) : bind_null(index);
  }

  // Advances; true while a row is available.
  bool step();
  // Steps a statement that returns no rows (INSERT/UPDATE/DELETE).
  void run();
  // Clears bindings and rewinds, for the next use of a prepared statement.
  void reset();

  bool is_null(int column) const;
  std::int64_t int_at(int column) const;
  double real_at(int column) const;
  std::string text_at(int column) const;
  // The text without a copy; valid until the next step() or reset().
  std::string_view text_view_at(int column) const;
  std::vector<unsigned char> blob_at(int column) const;
  std::optional<std::int64_t> opt_int_at(int column) const;
  std::optional<double> opt_real_at(int column) const;

 private:
  Db* db_;
  sqlite3_stmt* stmt_;
};

// BEGIN IMMEDIATE on construction (takes the write lock now, so a write
// never fails half-way for lack of it), ROLLBACK on destruction unless
// commit() returned.
class Transaction {
 public:
  explicit Transaction(Db& db);
  ~Transaction();
  Transaction(const Transaction&) = delete;
  Transaction& operator=(const Transaction&) = delete;
  void commit();

 private:
  Db& db_;
  bool done_ = false;
};

// A named SAVEPOINT inside a transaction; rolled back to (and released)
// unless release() returned.
class Savepoint {
 public:
  explicit Savepoint(Db& db);
  ~Savepoint();
  Savepoint(const Savepoint&) = delete;
  Savepoint& operator=(const Savepoint&) = delete;
  void release();
  void rollback();

 private:
  Db& db_;
  bool done_ = false;
};

// Times and dates as stored: seconds / days since 1970-01-01 UTC.
inline std::int64_t to_db(std::chrono::sys_seconds t) { return t.time_since_epoch().count(); }
inline std::int64_t to_db(std::chrono::sys_days d) { return d.time_since_epoch().count(); }
inline std::chrono::sys_seconds seconds_from_db(std::int64_t v) {
  return std::chrono::sys_seconds{std::chrono::seconds{v}};
}
inline std::chrono::sys_days days_from_db(std::int64_t v) {
  return std::chrono::sys_days{std::chrono::days{v}};
}

}  // namespace pbfleet::storage::sqlite
