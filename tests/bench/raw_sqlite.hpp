// The limits the storage figures are measured against: the same rows read
// or written with bare SQLite calls (prepared statements, no domain types,
// no decoding beyond touching each column).
#pragma once

#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <memory>
#include <string>
#include <vector>

#include "models/wire/reading.hpp"

namespace pbfleet::bench {

struct ScanResult {
  std::size_t rows = 0;
  double seconds = 0.0;
};

class Connection;

// Bare reads on one read-only connection opened and prepared up front, so
// that each timed scan is only the statements' execution.
class BareReader {
 public:
  explicit BareReader(const std::filesystem::path& db);
  ~BareReader();
  BareReader(const BareReader&) = delete;
  BareReader& operator=(const BareReader&) = delete;

  // The last `per_battery` readings of every battery in service, newest
  // first, by one index range per battery: the rows the reports read.
  ScanResult last_readings(std::size_t per_battery);
  // Every reading of one battery, oldest first (the rows of its history).
  ScanResult history(const std::string& serial);

 private:
  std::unique_ptr<Connection> connection_;
  struct Statements;
  std::unique_ptr<Statements> statements_;
};

// Serial of the battery with the given row id (exits when there is none).
std::string serial_with_id(const std::filesystem::path& db, std::int64_t id);

// Inserts `readings` with one prepared INSERT, `batch` rows per
// transaction (BEGIN IMMEDIATE ... COMMIT), on a database the store
// created (so schema, triggers, WAL, synchronous=FULL and the page cache
// size are the server's). With `rows_per_statement` > 1 each INSERT
// carries that many rows (VALUES (...), (...)), the rest of a transaction
// one row at a time.
// Every serial must name an existing battery. Returns rows per second.
double raw_insert_rate(const std::filesystem::path& db,
                       const std::vector<models::wire::ReadingInput>& readings, std::size_t batch,
                       std::size_t rows_per_statement = 1);

}  // namespace pbfleet::bench
