// libpqxx helpers for the PostgreSQL store: error classification,
// connections with their session settings, bytea and row conversions.
//
// Internal to the storage library (the only place that includes pqxx).
// Failures inside the store throw PgError carrying a classified StoreError;
// pqxx exceptions are classified by `classify` at each public member's
// boundary (unique -> conflict, foreign key/check/not-null -> constraint,
// lost connection, lock timeout, shutdown -> unavailable, disk full ->
// disk_full).
#pragma once

#include <pqxx/pqxx>

#include <chrono>
#include <memory>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>

#include "server/storage/store.hpp"

namespace pbfleet::storage::pg {

class PgError : public std::runtime_error {
 public:
  explicit PgError(StoreError error);
  const StoreError& error() const { return error_; }

 private:
  StoreError error_;
};

[[noreturn]] void fail(StoreErrc code, std::string detail, std::string field = {});

// The StoreError for an exception thrown inside a store call (PgError,
// pqxx errors, the SQLite helpers' DbError shared for cursors and hashes).
StoreError classify(const std::exception& e);

struct SessionSettings {
  std::chrono::milliseconds lock_timeout{5000};
  std::chrono::seconds connect_timeout{5};
};

// A new connection with synchronous_commit = on (read back: refuses with
// `unavailable` when it did not take), lock_timeout and UTC. Throws PgError.
std::unique_ptr<pqxx::connection> connect(const std::string& conninfo,
                                          const SessionSettings& settings);

// bytea in text form ("\x0a1b..."), as a parameter and as read back.
std::string bytea_param(const unsigned char* data, std::size_t size);
// Copies a bytea column (text form) into `out` of exactly `size` bytes;
// false when the column is not that long.
bool bytea_into(const pqxx::field& f, unsigned char* out, std::size_t size);

// A PostgreSQL array literal ("{...}") built element by element, passed as
// one text parameter and cast in SQL ($1::text[]), so many rows travel in
// one statement (INSERT ... SELECT FROM unnest(...)).
class ArrayLiteral {
 public:
  void text(std::string_view value);  // quoted and escaped
  void integer(std::int64_t value);
  void number(double value);          // shortest round-trip decimal
  void boolean(bool value);
  void null();
  template <class T>
  void number(const std::optional<T>& value) {
    value ? number(static_cast<double>(*value)) : null();
  }
  void opt_text(const std::optional<std::string>& value) { value ? text(*value) : null(); }
  [[nodiscard]] std::string str() const { return out_ + "}"; }

 private:
  void next();
  std::string out_ = "{";
  bool first_ = true;
};

// Nullable columns.
std::optional<double> opt_double(const pqxx::field& f);
std::optional<std::int64_t> opt_int(const pqxx::field& f);
inline std::string text(const pqxx::field& f) { return std::string(f.c_str(), f.size()); }
inline std::string_view text_view(const pqxx::field& f) { return {f.c_str(), f.size()}; }
inline bool boolean(const pqxx::field& f) { return f.c_str()[0] == 't'; }

// Conversions of the integer time columns.
inline std::int64_t to_db(std::chrono::sys_seconds t) { return t.time_since_epoch().count(); }
inline std::int64_t to_db(std::chrono::sys_days d) { return d.time_since_epoch().count(); }
inline std::chrono::sys_seconds seconds_from_db(std::int64_t s) {
  return std::chrono::sys_seconds{std::chrono::seconds{s}};
}
inline std::chrono::sys_days days_from_db(std::int64_t d) {
  return std::chrono::sys_days{std::chrono::days{d}};
}

}  // namespace pbfleet::storage::pg
