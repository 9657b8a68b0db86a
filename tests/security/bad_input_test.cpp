// Bad input to POST /v1/readings (RELIABILITY-TESTS rows 8 and 9): every
// case is answered with its status and an RFC 9457 problem whose `type` is
// the documented slug and whose errors[] names the field, and nothing is
// stored. Also: SQL meta characters and Unicode are stored verbatim and
// harm nothing; path traversal in a serial is refused.
#include <doctest/doctest.h>

#include <functional>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;
using Edit = std::function<void(json&)>;

constexpr const char* kSerial = "NY-0001";

struct BadCase {
  std::string name;
  std::string body;
  int status;
  std::string slug;
  std::string field;  // JSON pointer errors[] must name; empty: no field to name
  std::string content_type = "application/json";
};

json base() { return good_reading(kSerial, "", 0); }

// A case built from the good reading with one edit.
BadCase edited(std::string name, const Edit& edit, std::string field,
               std::string slug = "validation-failed") {
  json r = base();
  edit(r);
  return {std::move(name), r.dump(), 422, std::move(slug), std::move(field)};
}

BadCase unknown(const std::string& key, json value) {
  return edited("mass assignment of '" + key + "'", [&](json& r) { r[key] = value; }, "/" + key,
                "unknown-field");
}

std::vector<BadCase> cases() {
  std::vector<BadCase> c{
      // Malformed bodies.
      {"truncated JSON", R"({"serial": "NY-0001", "taken_at": )", 400, "malformed-body", ""},
      {"not JSON at all", "serial=NY-0001", 400, "malformed-body", ""},
      {"empty body", "", 400, "malformed-body", ""},
      {"trailing garbage after JSON", base().dump() + "}", 400, "malformed-body", ""},
      {"a JSON string instead of a reading", R"("NY-0001")", 422, "validation-failed", "/"},
      {"a JSON number instead of a reading", "42", 422, "validation-failed", "/"},
      {"an empty array", "[]", 422, "validation-failed", "/"},
      {"a reading as XML", "<reading/>", 415, "unsupported-media-type", "", "application/xml"},
      // Wrong types.
      edited("ocv_v as a string", [](json& r) { r["ocv_v"] = "12.6"; }, "/ocv_v"),
      edited("cell_sg as a string", [](json& r) { r["cell_sg"] = "1.265;1.265"; }, "/cell_sg"),
      edited("one SG as a string", [](json& r) { r["cell_sg"][2] = "1.2x"; }, "/cell_sg/2"),
      edited("SG as null", [](json& r) { r["cell_sg"][3] = nullptr; }, "/cell_sg/3"),
      edited("taken_at as a number", [](json& r) { r["taken_at"] = 1767592800; }, "/taken_at"),
      edited("serial as a number", [](json& r) { r["serial"] = 1; }, "/serial"),
      edited("after_charge as a string", [](json& r) { r["after_charge"] = "yes"; }, "/after_charge"),
      edited("rest_h as an object", [](json& r) { r["rest_h"] = json::object(); }, "/rest_h"),
      // Specific gravity outside 1.000..1.400.
      edited("SG 0.9", [](json& r) { r["cell_sg"][0] = 0.9; }, "/cell_sg/0"),
      edited("SG 0.999", [](json& r) { r["cell_sg"][1] = 0.999; }, "/cell_sg/1"),
      edited("SG 1.401", [](json& r) { r["cell_sg"][4] = 1.401; }, "/cell_sg/4"),
      edited("SG 2.5", [](json& r) { r["cell_sg"][5] = 2.5; }, "/cell_sg/5"),
      edited("SG negative", [](json& r) { r["cell_sg"][0] = -1.265; }, "/cell_sg/0"),
      edited("SG in points (1265)", [](json& r) { r["cell_sg"][0] = 1265; }, "/cell_sg/0"),
      // Open-circuit voltage.
      edited("OCV negative", [](json& r) { r["ocv_v"] = -3.0; }, "/ocv_v"),
      edited("OCV 30 V on 6 cells", [](json& r) { r["ocv_v"] = 30.0; }, "/ocv_v"),
      edited("OCV 15.1 V on 6 cells", [](json& r) { r["ocv_v"] = 15.1; }, "/ocv_v"),
      edited("load test end voltage absurd", [](json& r) {
        r["load_test_a"] = 400;
        r["load_test_end_v"] = 99;
      }, "/load_test_end_v"),
      edited("load test current without end voltage", [](json& r) { r["load_test_a"] = 400; },
             "/load_test_end_v"),
      // Temperatures outside -60..+80 C, and units.
      edited("electrolyte -80 C", [](json& r) { r["electrolyte_temp_c"] = -80; }, "/electrolyte_temp_c"),
      edited("electrolyte 81 C", [](json& r) { r["electrolyte_temp_c"] = 81; }, "/electrolyte_temp_c"),
      edited("electrolyte 200 F", [](json& r) {
        r.erase("electrolyte_temp_c");
        r["electrolyte_temp_f"] = 200;
      }, "/electrolyte_temp_f"),
      edited("ambient -61 C", [](json& r) { r["ambient_temp_c"] = -61; }, "/ambient_temp_c"),
      edited("temperature given in C and F", [](json& r) { r["electrolyte_temp_f"] = 41; },
             "/electrolyte_temp_f"),
      edited("temperature in kelvin (unknown unit)", [](json& r) {
        r.erase("electrolyte_temp_c");
        r["electrolyte_temp_k"] = 278;
      }, "/electrolyte_temp_k", "unknown-field"),
      edited("SG without electrolyte temperature", [](json& r) { r.erase("electrolyte_temp_c"); },
             "/electrolyte_temp_c"),
      // Timestamps.
      edited("month 13", [](json& r) { r["taken_at"] = "2026-13-01T06:00:00Z"; }, "/taken_at"),
      edited("February 30", [](json& r) { r["taken_at"] = "2026-02-30T06:00:00Z"; }, "/taken_at"),
      edited("no time zone", [](json& r) { r["taken_at"] = "2026-01-05T06:00:00"; }, "/taken_at"),
      edited("words", [](json& r) { r["taken_at"] = "yesterday"; }, "/taken_at"),
      edited("far in the future", [](json& r) { r["taken_at"] = "2099-01-01T00:00:00Z"; }, "/taken_at"),
      edited("before 2000", [](json& r) { r["taken_at"] = "1999-12-31T23:59:59Z"; }, "/taken_at"),
      // Cell counts.
      edited("5 SG values for 6 cells", [](json& r) { r["cell_sg"].erase(5); }, "/cell_sg"),
      edited("7 SG values for 6 cells", [](json& r) { r["cell_sg"].push_back(1.265); }, "/cell_sg"),
      edited("neither OCV nor SG", [](json& r) {
        r.erase("ocv_v");
        r.erase("cell_sg");
      }, "/ocv_v"),
      // Serials and ids.
      edited("missing serial", [](json& r) { r.erase("serial"); }, "/serial"),
      edited("unknown serial", [](json& r) { r["serial"] = "ZZ-9999"; }, "/serial"),
      edited("path traversal in serial", [](json& r) { r["serial"] = "../../etc/passwd"; }, "/serial"),
      edited("backslash in serial", [](json& r) { r["serial"] = "NY\\0001"; }, "/serial"),
      edited("control character in serial", [](json& r) { r["serial"] = "NY-\x01"; }, "/serial"),
      edited("reading_id of 65 characters", [](json& r) { r["reading_id"] = std::string(65, 'a'); },
             "/reading_id"),
      edited("SQL in reading_id", [](json& r) { r["reading_id"] = "x'; DROP TABLE readings;--"; },
             "/reading_id"),
      // Text fields.
      edited("note of 201 characters", [](json& r) { r["note"] = std::string(201, 'n'); }, "/note"),
      edited("control character in logged_by", [](json& r) { r["logged_by"] = "Kari\x07"; }, "/logged_by"),
      edited("rest_h negative", [](json& r) { r["rest_h"] = -1; }, "/rest_h"),
      // Mass assignment (row 9): server-computed and foreign fields.
      unknown("id", 7),
      unknown("battery_id", 2),
      unknown("depot_id", 2),
      unknown("soc_percent", 100),
      unknown("flags", json::array()),
      unknown("derived", json::object()),
      unknown("created_by", "admin"),
      unknown("received_at", "2026-01-05T06:00:00Z"),
      unknown("content_hash", "00"),
  };
  // A whole batch is refused for one bad row; the pointer names the row.
  json batch = json::array({base(), base()});
  batch[1]["cell_sg"][0] = 0.5;
  c.push_back({"one bad reading in a batch of two", batch.dump(), 422, "validation-failed", "/1/cell_sg/0"});
  return c;
}

}  // namespace

TEST_CASE("bad readings are refused with a problem naming the field, and nothing is stored") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto crew = fleet.client("crew");
  const auto all = cases();
  CHECK(all.size() >= 40);
  for (const auto& bad : all) {
    CAPTURE(bad.name);
    auto reply = crew.send("POST", "/v1/readings", bad.body, bad.content_type);
    CHECK(problem_mismatch(reply, bad.status, bad.slug, bad.field) == "");
    CHECK(stored_readings(fleet) == 0);
  }
  // The good reading the cases start from is accepted (the table is not
  // refusing everything for one shared reason).
  auto good = crew.post("/v1/readings", base());
  CHECK_MESSAGE(good.status == 201, good.body);
  CHECK(stored_readings(fleet) == 1);
}

TEST_CASE("SQL meta characters and Unicode in text fields are stored verbatim and harm nothing") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto admin = fleet.client("admin");
  const std::string sql = "Robert'); DROP TABLE readings;-- \" OR 1=1 -- %_ \\";
  const std::string unicode = "Nordøya – Ridge Pass ❄ 北港 Ærøskøbing";

  auto depot = admin.post("/v1/depots", {{"name", unicode}, {"time_zone", "Europe/Oslo"}, {"design_low_c", -30}});
  REQUIRE_MESSAGE(depot.status == 201, depot.body);
  CHECK(depot.json()["name"] == unicode);
  auto vehicle = admin.post("/v1/vehicles", {{"code", sql}, {"depot_id", depot.json()["id"]}, {"engine", "gasoline"}});
  REQUIRE_MESSAGE(vehicle.status == 201, vehicle.body);
  const std::string serial = "Q'; DROP TABLE batteries;-- ÆØÅ";
  auto battery = admin.post("/v1/batteries", {{"serial", serial}, {"chemistry", "agm"}, {"nominal_v", 12},
                                              {"rated_cca_a", 700}, {"vehicle_id", vehicle.json()["id"]}});
  REQUIRE_MESSAGE(battery.status == 201, battery.body);

  json r = good_reading(serial, "sql-1", 0);
  r["logged_by"] = sql;
  r["source"] = unicode;
  r["note"] = sql + "\n" + unicode;
  auto crew = fleet.client("crew");
  auto posted = crew.post("/v1/readings", r);
  REQUIRE_MESSAGE(posted.status == 201, posted.body);

  // Read back through the API (serial percent-encoded in the path).
  std::string encoded;
  for (unsigned char ch : serial) {
    char buf[4];
    std::snprintf(buf, sizeof buf, "%%%02X", ch);
    encoded += std::isalnum(ch) ? std::string(1, static_cast<char>(ch)) : std::string(buf);
  }
  auto history = crew.get("/v1/batteries/" + encoded + "/history");
  REQUIRE_MESSAGE(history.status == 200, history.body);
  const auto reading = history.json()["readings"].at(0);
  CHECK(reading["logged_by"] == sql);
  CHECK(reading["source"] == unicode);
  CHECK(reading["note"] == sql + "\n" + unicode);
  CHECK(history.json()["battery"]["serial"] == serial);

  SqliteProbe db(fleet.db());
  CHECK(db.integrity() == "ok");
  CHECK(db.integer("SELECT count(*) FROM batteries") == 3);
  CHECK(db.column("SELECT logged_by FROM readings").at(0) == sql);
  CHECK(db.column("SELECT name FROM depots WHERE name LIKE 'Nord%'").at(0) == unicode);
}

TEST_CASE("path traversal in a battery serial is refused on registration and harmless in a path") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto admin = fleet.client("admin");
  for (const std::string serial : {"../../etc/passwd", "..", "a/b", "a\\b", " NY-0009", "NY-\x7f"}) {
    CAPTURE(serial);
    auto reply = admin.post("/v1/batteries", {{"serial", serial}, {"chemistry", "flooded"}, {"nominal_v", 12},
                                              {"rated_cca_a", 700}, {"vehicle_id", fleet.vehicle_id("TR-101")}});
    CHECK(problem_mismatch(reply, 422, "validation-failed", "/serial") == "");
  }
  for (const std::string path : {"/v1/batteries/..%2F..%2Fetc%2Fpasswd", "/v1/batteries/%2e%2e",
                                 "/v1/batteries/NY-0001%2F..%2F..%2Fhistory"}) {
    CAPTURE(path);
    auto reply = admin.get(path);
    CHECK(problem_mismatch(reply, 404, "not-found") == "");
  }
  SqliteProbe db(fleet.db());
  CHECK(db.integer("SELECT count(*) FROM batteries") == 2);
}

}  // namespace pbfleet::testing
