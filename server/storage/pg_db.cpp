#include "server/storage/pg_db.hpp"

#include <charconv>
#include <cstring>

#include "server/storage/sqlite_db.hpp"  // DbError of the shared row helpers

namespace pbfleet::storage::pg {
namespace {

bool starts_with(const std::string& text, std::string_view prefix) {
  return text.rfind(prefix, 0) == 0;
}

// SQLSTATE classes and codes (PostgreSQL manual, appendix A "Error Codes").
StoreErrc code_of_state(const std::string& state) {
  if (state == "23505") return StoreErrc::conflict;                      // unique_violation
  if (state == "23503" || state == "23514" || state == "23502")          // foreign key, check,
    return StoreErrc::constraint;                                         // not null
  if (state == "53100") return StoreErrc::disk_full;                     // disk_full
  if (starts_with(state, "08") || starts_with(state, "57") ||            // connection, shutdown
      starts_with(state, "40") || state == "55P03" || state == "53300" || // retry, lock timeout
      state == "25006" || state == "53200")                               // read-only, memory
    return StoreErrc::unavailable;
  return StoreErrc::internal;
}

std::string first_line(const char* what) {
  std::string text(what);
  if (auto nl = text.find('\n'); nl != std::string::npos) text.resize(nl);
  return text;
}

}  // namespace

PgError::PgError(StoreError error) : std::runtime_error(error.detail), error_(std::move(error)) {}

void fail(StoreErrc code, std::string detail, std::string field) {
  throw PgError(StoreError{code, std::move(detail), std::move(field)});
}

StoreError classify(const std::exception& e) {
  if (const auto* own = dynamic_cast<const PgError*>(&e)) return own->error();
  if (const auto* shared = dynamic_cast<const sqlite::DbError*>(&e)) return shared->error();
  if (dynamic_cast<const pqxx::broken_connection*>(&e) != nullptr) {
    return {StoreErrc::unavailable, "lost the connection to PostgreSQL: " + first_line(e.what()), ""};
  }
  if (dynamic_cast<const pqxx::in_doubt_error*>(&e) != nullptr) {
    return {StoreErrc::unavailable,
            "the connection broke during COMMIT; the write may or may not be stored (a retry with "
            "the same reading_id is safe)",
            ""};
  }
  if (const auto* sql = dynamic_cast<const pqxx::sql_error*>(&e)) {
    return {code_of_state(sql->sqlstate()), "PostgreSQL: " + first_line(e.what()), ""};
  }
  return {StoreErrc::internal, first_line(e.what()), ""};
}

std::unique_ptr<pqxx::connection> connect(const std::string& conninfo,
                                          const SessionSettings& settings) {
  std::unique_ptr<pqxx::connection> c;
  try {
    c = std::make_unique<pqxx::connection>(conninfo);
  } catch (const pqxx::broken_connection& e) {
    fail(StoreErrc::unavailable, "cannot connect to PostgreSQL: " + first_line(e.what()));
  } catch (const std::exception& e) {
    fail(StoreErrc::unavailable, "cannot connect to PostgreSQL: " + first_line(e.what()));
  }
  // libpqxx 6 would otherwise reconnect a broken connection by itself,
  // losing the session settings below (synchronous_commit) and, on the
  // writer, running the rest of a transaction in autocommit. A broken
  // connection must throw; the store drops it and opens a fresh one.
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wdeprecated-declarations"
  c->inhibit_reactivation(true);
#pragma GCC diagnostic pop
  pqxx::nontransaction tx(*c);
  tx.exec("SET synchronous_commit = on");
  tx.exec("SET lock_timeout = " + std::to_string(settings.lock_timeout.count()));
  tx.exec("SET TIME ZONE 'UTC'");
  tx.exec("SET application_name = 'pbfleetd'");
  const std::string got = tx.exec1("SHOW synchronous_commit")[0].c_str();
  if (got != "on") {
    fail(StoreErrc::unavailable, "refusing to use PostgreSQL: synchronous_commit reads '" + got +
                                     "' after SET synchronous_commit = on");
  }
  return c;
}

std::string bytea_param(const unsigned char* data, std::size_t size) {
  static constexpr char kHex[] = "0123456789abcdef";
  std::string out = "\\x";
  out.reserve(2 + size * 2);
  for (std::size_t i = 0; i < size; ++i) {
    out += kHex[data[i] >> 4];
    out += kHex[data[i] & 0xf];
  }
  return out;
}

bool bytea_into(const pqxx::field& f, unsigned char* out, std::size_t size) {
  const std::string_view t = text_view(f);
  if (t.size() != 2 + size * 2 || t.substr(0, 2) != "\\x") return false;
  auto nibble = [](char ch) -> int {
    if (ch >= '0' && ch <= '9') return ch - '0';
    if (ch >= 'a' && ch <= 'f') return ch - 'a' + 10;
    return -1;
  };
  for (std::size_t i = 0; i < size; ++i) {
    const int hi = nibble(t[2 + 2 * i]);
    const int lo = nibble(t[3 + 2 * i]);
    if (hi < 0 || lo < 0) return false;
    out[i] = static_cast<unsigned char>(hi * 16 + lo);
  }
  return true;
}

void ArrayLiteral::next() {
  if (!first_) out_ += ',';
  first_ = false;
}

void ArrayLiteral::text(std::string_view value) {
  next();
  out_ += '"';
  for (char c : value) {
    if (c == '"' || c == '\\') out_ += '\\';
    out_ += c;
  }
  out_ += '"';
}

void ArrayLiteral::integer(std::int64_t value) {
  next();
  out_ += std::to_string(value);
}

void ArrayLiteral::number(double value) {
  next();
  char buffer[32];
  const auto r = std::to_chars(buffer, buffer + sizeof buffer, value);
  out_.append(buffer, r.ptr);
}

void ArrayLiteral::boolean(bool value) {
  next();
  out_ += value ? 't' : 'f';
}

void ArrayLiteral::null() {
  next();
  out_ += "NULL";
}

std::optional<double> opt_double(const pqxx::field& f) {
  if (f.is_null()) return std::nullopt;
  return f.as<double>();
}

std::optional<std::int64_t> opt_int(const pqxx::field& f) {
  if (f.is_null()) return std::nullopt;
  std::int64_t v = 0;
  const std::string_view t = text_view(f);
  std::from_chars(t.data(), t.data() + t.size(), v);
  return v;
}

}  // namespace pbfleet::storage::pg
