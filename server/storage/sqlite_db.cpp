#include "server/storage/sqlite_db.hpp"

#include <sqlite3.h>

#include <utility>

namespace pbfleet::storage::sqlite {
namespace {

// Classifies an extended SQLite result code for the Store's callers.
StoreErrc classify(int rc) {
  switch (rc & 0xff) {
    case SQLITE_BUSY:
    case SQLITE_LOCKED:
    case SQLITE_READONLY:
    case SQLITE_CANTOPEN:
    case SQLITE_IOERR:
    case SQLITE_PERM:
    case SQLITE_NOTADB:
    case SQLITE_CORRUPT:
    case SQLITE_PROTOCOL:
      return StoreErrc::unavailable;
    case SQLITE_FULL:
      return StoreErrc::disk_full;
    case SQLITE_CONSTRAINT:
      return (rc == SQLITE_CONSTRAINT_UNIQUE || rc == SQLITE_CONSTRAINT_PRIMARYKEY)
                 ? StoreErrc::conflict
                 : StoreErrc::constraint;
    default:
      return StoreErrc::internal;
  }
}

}  // namespace

DbError::DbError(StoreError error) : std::runtime_error(error.detail), error_(std::move(error)) {}

void fail(StoreErrc code, std::string detail, std::string field) {
  throw DbError(StoreError{code, std::move(detail), std::move(field)});
}

// ---- Db ---------------------------------------------------------------------

Db::Db(const std::filesystem::path& file, Mode mode) {
  const int flags =
      SQLITE_OPEN_NOMUTEX |
      (mode == Mode::read_only ? SQLITE_OPEN_READONLY : SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE);
  const int rc = sqlite3_open_v2(file.c_str(), &db_, flags, nullptr);
  if (rc != SQLITE_OK) {
    std::string detail = "cannot open database " + file.string() + ": " +
                         (db_ ? sqlite3_errmsg(db_) : sqlite3_errstr(rc));
    sqlite3_close(db_);
    db_ = nullptr;
    fail(StoreErrc::unavailable, std::move(detail));
  }
  sqlite3_extended_result_codes(db_, 1);
}

Db::~Db() {
  for (auto& [sql, stmt] : idle_) sqlite3_finalize(stmt);
  sqlite3_close_v2(db_);
}

void Db::check(int rc, std::string_view what) const {
  if (rc == SQLITE_OK || rc == SQLITE_ROW || rc == SQLITE_DONE) return;
  std::string detail = std::string(what) + ": " + sqlite3_errmsg(db_);
  fail(classify(rc), std::move(detail));
}

void Db::exec(std::string_view sql) {
  const std::string text(sql);
  check(sqlite3_exec(db_, text.c_str(), nullptr, nullptr, nullptr), "exec");
}

Statement Db::prepare(std::string_view sql) {
  if (auto it = idle_.find(std::string(sql)); it != idle_.end()) {
    sqlite3_stmt* kept = it->second;
    idle_.erase(it);
    return Statement(*this, kept);
  }
  sqlite3_stmt* stmt = nullptr;
  check(sqlite3_prepare_v3(db_, sql.data(), static_cast<int>(sql.size()), SQLITE_PREPARE_PERSISTENT,
                           &stmt, nullptr),
        "prepare");
  return Statement(*this, stmt);
}

std::int64_t Db::query_int(std::string_view sql) {
  Statement s = prepare(sql);
  if (!s.step()) fail(StoreErrc::internal, "no result from " + std::string(sql));
  return s.int_at(0);
}

std::string Db::query_text(std::string_view sql) {
  Statement s = prepare(sql);
  if (!s.step()) fail(StoreErrc::internal, "no result from " + std::string(sql));
  return s.text_at(0);
}

void Db::recycle(sqlite3_stmt* stmt) noexcept {
  sqlite3_reset(stmt);
  sqlite3_clear_bindings(stmt);
  const char* text = sqlite3_sql(stmt);
  if (text == nullptr || idle_.size() >= kMaxIdleStatements) {
    sqlite3_finalize(stmt);
    return;
  }
  try {
    if (!idle_.try_emplace(text, stmt).second) sqlite3_finalize(stmt);
  } catch (...) {  // out of memory: just do not keep it
    sqlite3_finalize(stmt);
  }
}

std::int64_t Db::last_insert_id() const { return sqlite3_last_insert_rowid(db_); }
int Db::changes() const { return sqlite3_changes(db_); }
bool Db::in_transaction() const { return sqlite3_get_autocommit(db_) == 0; }

// ---- Statement --------------------------------------------------------------

Statement::Statement(Db& db, sqlite3_stmt* stmt) : db_(&db), stmt_(stmt) {}
Statement::~Statement() {
  if (stmt_) db_->recycle(stmt_);
}
Statement::Statement(Statement&& other) noexcept
    : db_(other.db_), stmt_(std::exchange(other.stmt_, nullptr)) {}

Statement& Statement::bind(int index, std::int64_t value) {
  db_->check(sqlite3_bind_int64(stmt_, index, value), "bind");
  return *this;
}
Statement& Statement::bind(int index, double value) {
  db_->check(sqlite3_bind_double(stmt_, index, value), "bind");
  return *this;
}
Statement& Statement::bind(int index, std::string_view text) {
  db_->check(
      sqlite3_bind_text64(stmt_, index, text.data(), text.size(), SQLITE_TRANSIENT, SQLITE_UTF8),
      "bind");
  return *this;
}
Statement& Statement::bind_blob(int index, const void* data, std::size_t size) {
  db_->check(sqlite3_bind_blob64(stmt_, index, data, size, SQLITE_TRANSIENT), "bind");
  return *this;
}
Statement& Statement::bind_kept(int index, std::string_view text) {
  db_->check(sqlite3_bind_text64(stmt_, index, text.data(), text.size(), SQLITE_STATIC, SQLITE_UTF8),
             "bind");
  return *this;
}
Statement& Statement::bind_blob_kept(int index, const void* data, std::size_t size) {
  db_->check(sqlite3_bind_blob64(stmt_, index, data, size, SQLITE_STATIC), "bind");
  return *this;
}
Statement& Statement::bind_null(int index) {
  db_->check(sqlite3_bind_null(stmt_, index), "bind");
  return *this;
}

bool Statement::step() {
  const int rc = sqlite3_step(stmt_);
  if (rc == SQLITE_ROW) return true;
  if (rc == SQLITE_DONE) return false;
  db_->check(rc, "step");
  return false;
}

void Statement::run() {
  while (step()) {
  }
}

void Statement::reset() {
  sqlite3_reset(stmt_);
  sqlite3_clear_bindings(stmt_);
}

bool Statement::is_null(int column) const {
  return sqlite3_column_type(stmt_, column) == SQLITE_NULL;
}
std::int64_t Statement::int_at(int column) const { return sqlite3_column_int64(stmt_, column); }
double Statement::real_at(int column) const { return sqlite3_column_double(stmt_, column); }
std::string Statement::text_at(int column) const {
  const auto* text = sqlite3_column_text(stmt_, column);
  const int size = sqlite3_column_bytes(stmt_, column);
  return text ? std::string(reinterpret_cast<const char*>(text), static_cast<std::size_t>(size))
              : std::string();
}
std::string_view Statement::text_view_at(int column) const {
  const auto* text = sqlite3_column_text(stmt_, column);
  const int size = sqlite3_column_bytes(stmt_, column);
  return text ? std::string_view(reinterpret_cast<const char*>(text), static_cast<std::size_t>(size))
              : std::string_view();
}
std::vector<unsigned char> Statement::blob_at(int column) const {
  const auto* data = static_cast<const unsigned char*>(sqlite3_column_blob(stmt_, column));
  const int size = sqlite3_column_bytes(stmt_, column);
  return data ? std::vector<unsigned char>(data, data + size) : std::vector<unsigned char>();
}
std::optional<std::int64_t> Statement::opt_int_at(int column) const {
  if (is_null(column)) return std::nullopt;
  return int_at(column);
}
std::optional<double> Statement::opt_real_at(int column) const {
  if (is_null(column)) return std::nullopt;
  return real_at(column);
}

// ---- Transaction and Savepoint ------------------------------------------------

Transaction::Transaction(Db& db) : db_(db) { db_.exec("BEGIN IMMEDIATE"); }

Transaction::~Transaction() {
  // SQLite may already have rolled back (e.g. after SQLITE_FULL); then
  // ROLLBACK fails harmlessly.
  if (!done_ && db_.in_transaction())
    sqlite3_exec(db_.handle(), "ROLLBACK", nullptr, nullptr, nullptr);
}

void Transaction::commit() {
  db_.exec("COMMIT");
  done_ = true;
}

Savepoint::Savepoint(Db& db) : db_(db) { db_.exec("SAVEPOINT batch"); }

Savepoint::~Savepoint() {
  if (!done_ && db_.in_transaction()) {
    sqlite3_exec(db_.handle(), "ROLLBACK TO batch; RELEASE batch", nullptr, nullptr, nullptr);
  }
}

void Savepoint::release() {
  db_.exec("RELEASE batch");
  done_ = true;
}

void Savepoint::rollback() {
  db_.exec("ROLLBACK TO batch; RELEASE batch");
  done_ = true;
}

}  // namespace pbfleet::storage::sqlite
