#include "tests/bench/raw_sqlite.hpp"

#include <sqlite3.h>

#include <cstdio>
#include <cstdlib>
#include <map>

#include "tests/bench/figure.hpp"

namespace pbfleet::bench {

namespace {

constexpr const char* kColumns =
    "id, reading_id, battery_id, taken_at, received_at, ocv_v, cell_sg, electrolyte_temp_c,"
    " electrolyte_unit, ambient_temp_c, ambient_unit, rest_h, load_test_a, load_test_end_v,"
    " logged_by, source, note, after_charge, water_added";

[[noreturn]] void die(sqlite3* db, const char* what) {
  std::fprintf(stderr, "sqlite %s: %s\n", what, db ? sqlite3_errmsg(db) : "cannot open");
  std::exit(1);
}

}  // namespace

// One connection, closed on scope exit.
class Connection {
 public:
  Connection(const std::filesystem::path& file, bool writable) {
    const int flags = writable ? SQLITE_OPEN_READWRITE : SQLITE_OPEN_READONLY;
    if (sqlite3_open_v2(file.c_str(), &db_, flags, nullptr) != SQLITE_OK) die(db_, "open");
    sqlite3_busy_timeout(db_, 5000);
    // The writer's settings (sqlite_store.cpp), its 32 MiB page cache too:
    // with SQLite's default 2 MiB the raw insert slowed as the table grew
    // (110k rows/s at 400k rows against 140k at 100k), flattering the ratio.
    if (writable)
      exec("PRAGMA journal_mode=WAL; PRAGMA synchronous=FULL; PRAGMA foreign_keys=ON;"
           " PRAGMA cache_size=-32768; PRAGMA temp_store=MEMORY");
  }
  ~Connection() { sqlite3_close(db_); }
  Connection(const Connection&) = delete;
  Connection& operator=(const Connection&) = delete;

  void exec(const char* sql) {
    if (sqlite3_exec(db_, sql, nullptr, nullptr, nullptr) != SQLITE_OK) die(db_, sql);
  }
  sqlite3_stmt* prepare(const std::string& sql) {
    sqlite3_stmt* s = nullptr;
    if (sqlite3_prepare_v3(db_, sql.c_str(), -1, SQLITE_PREPARE_PERSISTENT, &s, nullptr) != SQLITE_OK)
      die(db_, "prepare");
    return s;
  }
  sqlite3* get() { return db_; }

 private:
  sqlite3* db_ = nullptr;
};

namespace {

// Steps `s` to the end, touching every column as a reader would.
std::size_t drain(sqlite3_stmt* s, std::uint64_t& touched) {
  std::size_t rows = 0;
  const int columns = sqlite3_column_count(s);
  while (sqlite3_step(s) == SQLITE_ROW) {
    ++rows;
    for (int c = 0; c < columns; ++c) {
      if (sqlite3_column_type(s, c) == SQLITE_TEXT) touched += sqlite3_column_bytes(s, c);
      else touched += static_cast<std::uint64_t>(sqlite3_column_double(s, c));
    }
  }
  sqlite3_reset(s);
  return rows;
}

std::vector<std::int64_t> in_service_ids(Connection& c) {
  sqlite3_stmt* s = c.prepare("SELECT id FROM batteries WHERE status = 'in_service' ORDER BY id");
  std::vector<std::int64_t> ids;
  while (sqlite3_step(s) == SQLITE_ROW) ids.push_back(sqlite3_column_int64(s, 0));
  sqlite3_finalize(s);
  return ids;
}

std::string join_sg(const std::vector<models::SpecificGravity>& cells) {
  std::string out;
  char buf[32];
  for (const auto& sg : cells) {
    if (!out.empty()) out += ';';
    std::snprintf(buf, sizeof buf, "%.17g", sg.value);
    out += buf;
  }
  return out;
}

void bind_optional(sqlite3_stmt* s, int i, bool has, double value) {
  if (has) sqlite3_bind_double(s, i, value);
  else sqlite3_bind_null(s, i);
}

void bind_temperature(sqlite3_stmt* s, int i, const std::optional<models::wire::EnteredTemperature>& t) {
  bind_optional(s, i, t.has_value(), t ? t->value.value : 0.0);
  if (t) sqlite3_bind_text(s, i + 1, t->unit == models::wire::TempUnit::c ? "C" : "F", 1, SQLITE_STATIC);
  else sqlite3_bind_null(s, i + 1);
}

constexpr int kRawColumns = 19;

// Binds one row to parameters first + 1 .. first + kRawColumns.
void bind_reading(sqlite3_stmt* s, int first, const models::wire::ReadingInput& r,
                  std::int64_t battery_id, std::uint64_t n) {
  const std::string sg = join_sg(r.cell_sg);
  const auto at = [first](int column) { return first + column; };
  sqlite3_bind_text(s, at(1), r.reading_id.c_str(), -1, SQLITE_TRANSIENT);
  sqlite3_bind_int64(s, at(2), battery_id);
  sqlite3_bind_int64(s, at(3), r.taken_at.time_since_epoch().count());
  sqlite3_bind_int64(s, at(4), r.taken_at.time_since_epoch().count());
  bind_optional(s, at(5), r.ocv.has_value(), r.ocv ? r.ocv->value : 0.0);
  sqlite3_bind_text(s, at(6), sg.c_str(), -1, SQLITE_TRANSIENT);
  bind_temperature(s, at(7), r.electrolyte);
  bind_temperature(s, at(9), r.ambient);
  bind_optional(s, at(11), r.rest.has_value(), r.rest ? r.rest->value : 0.0);
  sqlite3_bind_null(s, at(12));
  sqlite3_bind_null(s, at(13));
  sqlite3_bind_text(s, at(14), r.logged_by.c_str(), -1, SQLITE_TRANSIENT);
  sqlite3_bind_text(s, at(15), r.source.c_str(), -1, SQLITE_TRANSIENT);
  sqlite3_bind_text(s, at(16), r.note.c_str(), -1, SQLITE_TRANSIENT);
  sqlite3_bind_int(s, at(17), r.after_charge ? 1 : 0);
  sqlite3_bind_int(s, at(18), r.water_added ? 1 : 0);
  unsigned char hash[16] = {};  // the raw limit does not hash: a counter keeps rows distinct
  for (int i = 0; i < 8; ++i) hash[i] = static_cast<unsigned char>(n >> (8 * i));
  sqlite3_bind_blob(s, at(19), hash, sizeof hash, SQLITE_TRANSIENT);
}

std::map<std::string, std::int64_t> battery_ids(Connection& c) {
  sqlite3_stmt* s = c.prepare("SELECT serial, id FROM batteries");
  std::map<std::string, std::int64_t> out;
  while (sqlite3_step(s) == SQLITE_ROW)
    out.emplace(reinterpret_cast<const char*>(sqlite3_column_text(s, 0)), sqlite3_column_int64(s, 1));
  sqlite3_finalize(s);
  return out;
}

}  // namespace

struct BareReader::Statements {
  sqlite3_stmt* last = nullptr;
  sqlite3_stmt* history = nullptr;
  std::vector<std::int64_t> battery_ids;
  ~Statements() {
    sqlite3_finalize(last);
    sqlite3_finalize(history);
  }
};

BareReader::BareReader(const std::filesystem::path& db)
    : connection_(std::make_unique<Connection>(db, false)), statements_(std::make_unique<Statements>()) {
  statements_->last = connection_->prepare(std::string("SELECT ") + kColumns +
                                           " FROM readings WHERE battery_id = ?1"
                                           " ORDER BY taken_at DESC, id DESC LIMIT ?2");
  statements_->history = connection_->prepare(std::string("SELECT ") + kColumns +
                                              " FROM readings WHERE battery_id ="
                                              " (SELECT id FROM batteries WHERE serial = ?1)"
                                              " ORDER BY taken_at, id");
}

BareReader::~BareReader() = default;

ScanResult BareReader::last_readings(std::size_t per_battery) {
  const auto start = SteadyClock::now();
  sqlite3_stmt* s = statements_->last;
  ScanResult out;
  std::uint64_t touched = 0;
  for (const std::int64_t id : in_service_ids(*connection_)) {
    sqlite3_bind_int64(s, 1, id);
    sqlite3_bind_int64(s, 2, static_cast<std::int64_t>(per_battery));
    out.rows += drain(s, touched);
  }
  out.seconds = seconds_since(start);
  if (touched == 0) out.rows = 0;
  return out;
}

ScanResult BareReader::history(const std::string& serial) {
  const auto start = SteadyClock::now();
  sqlite3_stmt* s = statements_->history;
  sqlite3_bind_text(s, 1, serial.c_str(), -1, SQLITE_TRANSIENT);
  std::uint64_t touched = 0;
  ScanResult out;
  out.rows = drain(s, touched);
  out.seconds = seconds_since(start);
  return out;
}

std::string serial_with_id(const std::filesystem::path& db, std::int64_t id) {
  Connection c(db, false);
  sqlite3_stmt* s = c.prepare("SELECT serial FROM batteries WHERE id = ?1");
  sqlite3_bind_int64(s, 1, id);
  if (sqlite3_step(s) != SQLITE_ROW) die(c.get(), "no battery with that id");
  std::string serial = reinterpret_cast<const char*>(sqlite3_column_text(s, 0));
  sqlite3_finalize(s);
  return serial;
}

double raw_insert_rate(const std::filesystem::path& db,
                       const std::vector<models::wire::ReadingInput>& readings, std::size_t batch,
                       std::size_t rows_per_statement) {
  Connection c(db, true);
  const auto ids = battery_ids(c);
  const auto insert_sql = [](std::size_t rows) {
    std::string sql =
        "INSERT INTO readings (reading_id, battery_id, taken_at, received_at, ocv_v, cell_sg,"
        " electrolyte_temp_c, electrolyte_unit, ambient_temp_c, ambient_unit, rest_h, load_test_a,"
        " load_test_end_v, logged_by, source, note, after_charge, water_added, content_hash) VALUES ";
    for (std::size_t r = 0; r < rows; ++r) {
      sql += r == 0 ? "(" : ", (";
      for (int p = 1; p <= kRawColumns; ++p) {
        sql += '?';
        sql += std::to_string(r * kRawColumns + static_cast<std::size_t>(p));
        if (p < kRawColumns) sql += ", ";
      }
      sql += ')';
    }
    return sql;
  };
  sqlite3_stmt* one = c.prepare(insert_sql(1));
  sqlite3_stmt* many = rows_per_statement > 1 ? c.prepare(insert_sql(rows_per_statement)) : nullptr;
  const auto start = SteadyClock::now();
  for (std::size_t i = 0; i < readings.size(); i += batch) {
    c.exec("BEGIN IMMEDIATE");
    const std::size_t end = std::min(readings.size(), i + batch);
    for (std::size_t j = i; j < end;) {
      const bool full = many && end - j >= rows_per_statement;
      sqlite3_stmt* s = full ? many : one;
      const std::size_t rows = full ? rows_per_statement : 1;
      for (std::size_t r = 0; r < rows; ++r)
        bind_reading(s, static_cast<int>(r) * kRawColumns, readings[j + r],
                     ids.at(readings[j + r].serial), j + r);
      if (sqlite3_step(s) != SQLITE_DONE) die(c.get(), "insert");
      sqlite3_reset(s);
      j += rows;
    }
    c.exec("COMMIT");
  }
  const double seconds = seconds_since(start);
  sqlite3_finalize(one);
  sqlite3_finalize(many);
  return static_cast<double>(readings.size()) / seconds;
}

}  // namespace pbfleet::bench
