#include "tests/support/live_fleet.hpp"

#include <sqlite3.h>

#include <chrono>
#include <cstdio>
#include <stdexcept>
#include <tuple>

namespace pbfleet::testing {

using nlohmann::json;

namespace {

constexpr std::string_view kProblemBase = "https://pbfleet.invalid/problems/";

// Posts `body` and returns the created object; throws unless 201.
json create(HttpClient& admin, const std::string& target, const json& body) {
  auto reply = admin.post(target, body);
  if (reply.status != 201)
    throw std::runtime_error("seeding " + target + " got " + std::to_string(reply.status) + ": " +
                             reply.body);
  return reply.json();
}

std::string two_digits(int v) { return (v < 10 ? "0" : "") + std::to_string(v); }

}  // namespace

LiveFleet::LiveFleet(FleetOptions options) : dir_("pbfleet-live") {
  ServerConfig config;
  config.db = dir_ / "pbfleet.db";
  config.log = dir_ / "pbfleetd.log";
  config.admin_token = dir_ / "admin.token";
  config.extra_args = options.extra_args;
  config.log_level = options.log_level;
  config.database = options.database;
  server_ = std::make_unique<ServerProcess>(config);
  tokens_["admin"] = server_->admin_token();
  seed(options.batteries_per_depot);
}

HttpClient LiveFleet::client(const std::string& who) const {
  HttpClient c(server_->port());
  if (!who.empty()) c.set_token(tokens_.at(who));
  return c;
}

std::pair<std::int64_t, std::string> LiveFleet::make_token(const std::string& role,
                                                           std::optional<std::int64_t> depot) {
  auto admin = client("admin");
  json body{{"name", "test " + role}, {"role", role}};
  if (depot) body["depot_id"] = *depot;
  auto made = create(admin, "/v1/tokens", body);
  return {made.at("id").get<std::int64_t>(), made.at("token").get<std::string>()};
}

void LiveFleet::seed(int batteries_per_depot) {
  auto admin = client("admin");
  const std::vector<std::tuple<std::string, std::string, std::string>> depots{
      {"North Yard", "TR-101", "NY"}, {"Harbour", "TR-201", "HB"}};
  for (const auto& [name, code, prefix] : depots) {
    auto depot = create(admin, "/v1/depots",
                        {{"name", name}, {"time_zone", "Europe/Oslo"}, {"design_low_c", -25}});
    depots_[name] = depot.at("id").get<std::int64_t>();
    auto vehicle = create(admin, "/v1/vehicles",
                          {{"code", code}, {"depot_id", depots_[name]}, {"engine", "diesel"},
                           {"displacement_l", 7.7}});
    vehicles_[code] = vehicle.at("id").get<std::int64_t>();
    for (int i = 1; i <= batteries_per_depot; ++i) {
      std::string serial = prefix + "-00" + two_digits(i);
      create(admin, "/v1/batteries",
             {{"serial", serial}, {"chemistry", "flooded"}, {"nominal_v", 12}, {"cells", 6},
              {"rated_cca_a", 800}, {"full_charge_sg", 1.265}, {"installed_on", "2025-10-02"},
              {"vehicle_id", vehicles_[code]}});
      serials_[name].push_back(serial);
    }
  }
  for (const std::string role : {"crew", "technician", "manager"})
    tokens_[role] = make_token(role).second;
  tokens_["crew_north"] = make_token("crew", depots_["North Yard"]).second;
  tokens_["technician_north"] = make_token("technician", depots_["North Yard"]).second;
}

json good_reading(const std::string& serial, const std::string& reading_id, int minute) {
  using namespace std::chrono;
  const sys_seconds taken = sys_days{year{2026} / January / 5} + hours{6} + minutes{minute};
  const auto day = floor<days>(taken);
  const year_month_day ymd{day};
  const hh_mm_ss hms{taken - day};
  char text[32];
  std::snprintf(text, sizeof text, "%04d-%02u-%02uT%02d:%02d:%02dZ", static_cast<int>(ymd.year()),
                static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()),
                static_cast<int>(hms.hours().count()), static_cast<int>(hms.minutes().count()),
                static_cast<int>(hms.seconds().count()));
  json r{{"serial", serial},
         {"taken_at", text},
         {"ocv_v", 12.62},
         {"cell_sg", {1.265, 1.265, 1.265, 1.265, 1.265, 1.265}},
         {"electrolyte_temp_c", 5.0},
         {"rest_h", 12},
         {"logged_by", "reliability"}};
  if (!reading_id.empty()) r["reading_id"] = reading_id;
  return r;
}

std::string problem_mismatch(const HttpReply& reply, int status, const std::string& slug,
                             const std::string& field) {
  if (reply.status != status)
    return "status " + std::to_string(reply.status) + " != " + std::to_string(status) + ": " +
           reply.body.substr(0, 300);
  if (reply.header("content-type").rfind("application/problem+json", 0) != 0)
    return "content-type '" + reply.header("content-type") + "'";
  const json body = reply.json();
  if (!body.is_object()) return "body is not a JSON object: " + reply.body.substr(0, 200);
  if (body.value("type", "") != std::string(kProblemBase) + slug)
    return "type '" + body.value("type", "") + "' != slug " + slug + ": " + reply.body.substr(0, 300);
  if (body.value("status", 0) != status) return "body status differs";
  if (field.empty()) return {};
  if (!body.contains("errors") || !body["errors"].is_array())
    return "no errors[] naming " + field + ": " + reply.body.substr(0, 300);
  for (const auto& e : body["errors"])
    if (e.is_object() && e.value("field", "") == field) return {};
  return "errors[] does not name " + field + ": " + reply.body.substr(0, 400);
}

SqliteProbe::SqliteProbe(const std::filesystem::path& db) {
  if (sqlite3_open_v2(db.c_str(), &db_, SQLITE_OPEN_READWRITE, nullptr) != SQLITE_OK) {
    std::string message = db_ ? sqlite3_errmsg(db_) : "out of memory";
    sqlite3_close(db_);
    throw std::runtime_error("cannot open " + db.string() + ": " + message);
  }
  sqlite3_busy_timeout(db_, 5000);
}

SqliteProbe::~SqliteProbe() { sqlite3_close(db_); }

std::vector<std::string> SqliteProbe::column(const std::string& sql) {
  sqlite3_stmt* stmt = nullptr;
  if (sqlite3_prepare_v2(db_, sql.c_str(), -1, &stmt, nullptr) != SQLITE_OK)
    throw std::runtime_error("prepare '" + sql + "': " + sqlite3_errmsg(db_));
  std::vector<std::string> out;
  int rc = 0;
  while ((rc = sqlite3_step(stmt)) == SQLITE_ROW) {
    const auto* text = sqlite3_column_text(stmt, 0);
    out.emplace_back(text ? reinterpret_cast<const char*>(text) : "");
  }
  sqlite3_finalize(stmt);
  if (rc != SQLITE_DONE) throw std::runtime_error("step '" + sql + "': " + sqlite3_errmsg(db_));
  return out;
}

std::int64_t SqliteProbe::integer(const std::string& sql) {
  auto rows = column(sql);
  return rows.empty() ? 0 : std::stoll(rows.front());
}

std::string SqliteProbe::integrity() {
  auto rows = column("PRAGMA integrity_check");
  std::string out;
  for (const auto& r : rows) out += (out.empty() ? "" : "; ") + r;
  return out;
}

std::int64_t stored_readings(const LiveFleet& fleet) {
  SqliteProbe db(fleet.db());
  return db.integer("SELECT count(*) FROM readings");
}

}  // namespace pbfleet::testing
