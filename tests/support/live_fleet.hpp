// A running pbfleetd with a small fleet of the demo company set up through
// the API, one token per role, and direct read access to its database file.
//
// Fleet: depots "North Yard" and "Harbour", one vehicle each (TR-101,
// TR-201), batteries NY-0001.. on TR-101 and HB-0001.. on TR-201, all 12 V
// flooded with 6 cells. Tokens: admin (bootstrap), crew, technician,
// manager (all unscoped) and crew_north, technician_north (scoped to North
// Yard).
#pragma once

#include <cstdint>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "tests/support/http_client.hpp"

struct sqlite3;  // <sqlite3.h> stays in the .cpp
#include "tests/support/server_process.hpp"

namespace pbfleet::testing {

struct FleetOptions {
  int batteries_per_depot = 4;
  std::vector<std::string> extra_args;  // more daemon flags
  std::string log_level = "info";
  std::string database;  // PostgreSQL URI; empty = a SQLite file in dir()
};

class LiveFleet {
 public:
  explicit LiveFleet(FleetOptions options = {});

  [[nodiscard]] ServerProcess& server() { return *server_; }
  [[nodiscard]] const TempDir& dir() const { return dir_; }
  [[nodiscard]] std::filesystem::path db() const { return dir_ / "pbfleet.db"; }
  // Raw token of a named role ("admin", "crew", "crew_north", ...).
  [[nodiscard]] const std::string& token(const std::string& who) const { return tokens_.at(who); }
  [[nodiscard]] const std::map<std::string, std::string>& tokens() const { return tokens_; }
  [[nodiscard]] std::int64_t depot_id(const std::string& name) const { return depots_.at(name); }
  [[nodiscard]] std::int64_t vehicle_id(const std::string& code) const { return vehicles_.at(code); }
  // Serials of a depot's batteries ("North Yard" or "Harbour").
  [[nodiscard]] const std::vector<std::string>& serials(const std::string& depot) const {
    return serials_.at(depot);
  }
  // A keep-alive client on the current port with `who`'s token ("" = none).
  [[nodiscard]] HttpClient client(const std::string& who = "admin") const;
  // Creates a token through the API; returns {id, raw}.
  std::pair<std::int64_t, std::string> make_token(const std::string& role,
                                                  std::optional<std::int64_t> depot = {});

 private:
  void seed(int batteries_per_depot);

  TempDir dir_;
  std::unique_ptr<ServerProcess> server_;
  std::map<std::string, std::string> tokens_;
  std::map<std::string, std::int64_t> depots_;
  std::map<std::string, std::int64_t> vehicles_;
  std::map<std::string, std::vector<std::string>> serials_;
};

// A valid reading for a 6-cell battery: OCV 12.62 V, SG 1.265 in every cell
// at 5 C, taken `minute` minutes after 2026-01-05T06:00:00Z.
nlohmann::json good_reading(const std::string& serial, const std::string& reading_id, int minute);

// The body must be RFC 9457 problem+json of the given slug; the slug's
// `type` URI, the status and (when given) one `errors[]` entry naming
// `field`. Returns a description of the first mismatch, or "" when it fits.
std::string problem_mismatch(const HttpReply& reply, int status, const std::string& slug,
                             const std::string& field = {});

// Direct access to the database file (tests may use SQL; the service never
// lets a client do so). Opened read-write so a crashed WAL is recovered.
class SqliteProbe {
 public:
  explicit SqliteProbe(const std::filesystem::path& db);
  ~SqliteProbe();
  SqliteProbe(const SqliteProbe&) = delete;
  SqliteProbe& operator=(const SqliteProbe&) = delete;
  // First column of the first row as an integer (0 when no row).
  std::int64_t integer(const std::string& sql);
  // First column of every row as text.
  std::vector<std::string> column(const std::string& sql);
  // "ok", or what PRAGMA integrity_check reported.
  std::string integrity();

 private:
  ::sqlite3* db_ = nullptr;
};

// Readings in a fleet's database file, counted directly (not through the API).
std::int64_t stored_readings(const LiveFleet& fleet);

}  // namespace pbfleet::testing
