// Depots, vehicles, batteries, history, estimate, reports and admin routes
// through dispatch (no sockets).
#include "server/api/handlers/handlers.hpp"

#include <doctest/doctest.h>

#include "tests/api/fixture.hpp"

namespace pbfleet::api {

using nlohmann::json;
using testing::ApiFixture;
using testing::body_of;
using testing::error_fields;
using testing::good_reading;
using testing::slug_of;

TEST_CASE("health, readiness and metrics need no token") {
  ApiFixture f;
  CHECK(f.get("/healthz", "").status == 200);
  auto ready = f.get("/readyz", "");
  CHECK(ready.status == 200);
  CHECK(body_of(ready)["status"] == "ready");
  auto metrics = f.get("/metrics", "");
  CHECK(metrics.status == 200);
  CHECK(metrics.content_type.rfind("text/plain; version=0.0.4", 0) == 0);
  CHECK(metrics.body.find("pbfleet_readings 0\n") != std::string::npos);
}

TEST_CASE("request counters grow by exactly the requests answered") {
  ApiFixture f;
  auto count = [&f] {
    const auto text = f.get("/metrics", "").body;
    const std::string key = "pbfleet_http_requests_total{route=\"/healthz\",status=\"200\"} ";
    auto at = text.find(key);
    return at == std::string::npos ? 0 : std::stoi(text.substr(at + key.size()));
  };
  const int before = count();
  for (int i = 0; i < 7; ++i) f.get("/healthz", "");
  CHECK(count() == before + 7);
}

TEST_CASE("unknown paths are 404 and wrong methods 405 with Allow") {
  ApiFixture f;
  auto missing = f.get("/v2/anything");
  CHECK(missing.status == 404);
  CHECK(slug_of(missing) == "not-found");
  auto wrong = f.call("PUT", "/v1/depots", "admin");
  CHECK(wrong.status == 405);
  bool allow = false;
  for (const auto& [name, value] : wrong.headers) allow = allow || (name == "Allow" && value == "GET, POST");
  CHECK(allow);
}

TEST_CASE("a depot is created, read, listed and patched") {
  ApiFixture f;
  auto made = f.post("/v1/depots", {{"name", "Ridge Pass"}, {"time_zone", "Europe/Oslo"}, {"design_low_c", -32}},
                     "manager");
  REQUIRE(made.status == 201);
  const auto id = body_of(made)["id"].get<std::int64_t>();
  CHECK(body_of(f.get("/v1/depots/" + std::to_string(id), "crew"))["name"] == "Ridge Pass");
  auto patched = f.call("PATCH", "/v1/depots/" + std::to_string(id), "manager", R"({"design_low_c":-35})");
  REQUIRE(patched.status == 200);
  CHECK(body_of(patched)["design_low_c"] == -35.0);
  CHECK(body_of(patched)["name"] == "Ridge Pass");
  CHECK(body_of(f.get("/v1/depots"))["items"].size() == 3);
  auto duplicate = f.post("/v1/depots", {{"name", "Ridge Pass"}, {"design_low_c", -30}}, "manager");
  CHECK(duplicate.status == 409);
}

TEST_CASE("a depot outside the range lists each bad field with its range") {
  ApiFixture f;
  auto r = f.post("/v1/depots", {{"name", ""}, {"design_low_c", -90}, {"id", 5}});
  CHECK(r.status == 422);
  CHECK(slug_of(r) == "unknown-field");  // unknown fields come first
  auto r2 = f.post("/v1/depots", {{"name", ""}, {"design_low_c", -90}});
  CHECK(slug_of(r2) == "validation-failed");
  CHECK(error_fields(r2) == std::vector<std::string>{"/name", "/design_low_c"});
  CHECK(body_of(r2)["errors"][1]["allowed"] == "-60 to 20");
}

TEST_CASE("vehicles list by depot and refuse an unknown engine") {
  ApiFixture f;
  auto list = f.get("/v1/vehicles?depot_id=" + std::to_string(f.depot_id("Harbour")));
  REQUIRE(list.status == 200);
  REQUIRE(body_of(list)["items"].size() == 1);
  CHECK(body_of(list)["items"][0]["code"] == "TR-201");
  auto bad = f.post("/v1/vehicles", {{"code", "TR-9"}, {"depot_id", f.depot_id("Harbour")}, {"engine", "steam"}});
  CHECK(bad.status == 422);
  CHECK(error_fields(bad) == std::vector<std::string>{"/engine"});
}

TEST_CASE("a battery's cell count follows its nominal voltage") {
  ApiFixture f;
  auto made = f.post("/v1/batteries", {{"serial", "VA-0001"}, {"chemistry", "agm"}, {"nominal_v", 24}}, "crew");
  REQUIRE(made.status == 201);
  CHECK(body_of(made)["cells"] == 12);
  CHECK(body_of(made)["installed_on"] == "2026-01-10");
  auto mismatch = f.post("/v1/batteries", {{"serial", "VA-0002"}, {"chemistry", "agm"}, {"nominal_v", 12}, {"cells", 3}});
  CHECK(mismatch.status == 422);
  CHECK(error_fields(mismatch) == std::vector<std::string>{"/cells"});
}

TEST_CASE("batteries are fitted and retired, and a scoped token sees only its depot") {
  ApiFixture f;
  auto fit = f.post("/v1/batteries/NY-0002/fit", {{"vehicle_id", f.vehicle_id("TR-201")}}, "technician");
  REQUIRE(fit.status == 200);
  CHECK(body_of(fit)["vehicle_id"] == f.vehicle_id("TR-201"));
  CHECK(f.get("/v1/batteries/NY-0002", "crew_harbour").status == 200);
  auto hidden = f.get("/v1/batteries/NY-0001", "crew_harbour");
  auto missing = f.get("/v1/batteries/NO-SUCH", "crew_harbour");
  CHECK(hidden.status == 404);
  CHECK(body_of(hidden)["title"] == body_of(missing)["title"]);
  CHECK(body_of(f.get("/v1/batteries", "crew_harbour"))["items"].size() == 2);
  auto retired = f.post("/v1/batteries/NY-0001/retire", {{"reason", "failed load test"}});
  REQUIRE(retired.status == 200);
  CHECK(body_of(retired)["status"] == "retired");
  CHECK(f.post("/v1/readings", good_reading("NY-0001", "late"), "crew").status == 422);
}

TEST_CASE("history shows readings with derived values and events, within from and to") {
  ApiFixture f;
  json batch = json::array({good_reading("NY-0001", "h1", 60 * 24 * 14), good_reading("NY-0001", "h2", 60 * 24 * 7),
                            good_reading("NY-0001", "h3", 60)});
  REQUIRE(f.post("/v1/readings", batch, "crew").status == 201);
  auto all = body_of(f.get("/v1/batteries/NY-0001/history", "technician"));
  REQUIRE(all["readings"].size() == 3);
  CHECK(all["battery"]["serial"] == "NY-0001");
  CHECK(all["readings"][0]["reading_id"] == "h1");
  CHECK(all["readings"][2]["derived"]["soc_percent"].is_number());
  CHECK(all["events"].size() >= 1);
  CHECK(all["events"][0]["kind"] == "fitted");
  CHECK(all["events"][0]["at"] == "2025-10-02T00:00:00Z");  // the install date, not registration
  auto window = body_of(f.get("/v1/batteries/NY-0001/history?from=2026-01-01T00:00:00Z&to=2026-01-05T00:00:00Z"));
  REQUIRE(window["readings"].size() == 1);
  CHECK(window["readings"][0]["reading_id"] == "h2");
  CHECK(f.get("/v1/batteries/NY-0001/history?from=yesterday").status == 400);
}

TEST_CASE("estimate answers the model's figures and refuses out-of-range input") {
  ApiFixture f;
  auto r = f.post("/v1/estimate", {{"cell_sg", {1.265, 1.265, 1.265, 1.265, 1.265, 1.265}},
                                   {"electrolyte_temp_c", 25}, {"full_sg", 1.265}}, "crew");
  REQUIRE(r.status == 200);
  // A battery reading its own full-charge SG at the reference temperature is
  // fully charged (definition of the full-charge SG).
  CHECK(body_of(r)["soc_percent"].get<double>() == doctest::Approx(100.0).epsilon(0.02));
  auto bad = f.post("/v1/estimate", {{"cell_sg", {1.9}}, {"electrolyte_temp_c", 25}, {"volts", 3}});
  CHECK(bad.status == 422);
  CHECK(slug_of(bad) == "unknown-field");
}

TEST_CASE("reports answer JSON, or CSV with formula-safe text cells") {
  ApiFixture f;
  REQUIRE(f.post("/v1/batteries", {{"serial", "=HYPERLINK(\"x\")"}, {"chemistry", "flooded"}, {"nominal_v", 12},
                                   {"vehicle_id", f.vehicle_id("TR-104")}}).status == 201);
  REQUIRE(f.post("/v1/readings", good_reading("NY-0001", "w1", 60 * 24 * 3), "crew").status == 201);
  auto winter = f.get("/v1/reports/winter?low_c=-30", "manager");
  REQUIRE(winter.status == 200);
  auto body = body_of(winter);
  CHECK(body["cold_date"] == "2026-01-10");
  CHECK(body["batteries"].size() == 4);
  CHECK(body["batteries"][0]["low_c"] == -30.0);

  auto csv = f.call("GET", "/v1/reports/overdue?days=10", "manager", "", "");
  http::Request request;
  request.method = "GET";
  request.target = "/v1/reports/overdue?days=10";
  request.headers["accept"] = "text/csv";
  request.headers["authorization"] = "Bearer " + f.token("manager");
  auto as_csv = f.api().handle(request);
  REQUIRE(as_csv.status == 200);
  CHECK(as_csv.content_type.rfind("text/csv", 0) == 0);
  CHECK(as_csv.body.rfind("depot_name,serial,", 0) == 0);
  CHECK(as_csv.body.find("'=HYPERLINK") != std::string::npos);
  CHECK(as_csv.body.find(",=HYPERLINK") == std::string::npos);
  CHECK(as_csv.body.find("NY-0001") == std::string::npos);  // read 3 days ago: not overdue
  CHECK(body_of(csv)["days"] == 10);
  CHECK(f.get("/v1/reports/overdue?days=0").status == 400);
}

TEST_CASE("the durability settings in force are exposed to admins") {
  ApiFixture f;
  auto r = f.get("/v1/admin/durability");
  REQUIRE(r.status == 200);
  CHECK(body_of(r)["journal_mode"] == "wal");
  CHECK(body_of(r)["synchronous"] == 2);
  CHECK(body_of(r)["foreign_keys"] == true);
}

TEST_CASE("an online backup lands in the backup folder and passes integrity_check") {
  ApiFixture f;
  REQUIRE(f.post("/v1/readings", good_reading("NY-0001", "b1"), "crew").status == 201);
  auto r = f.post("/v1/admin/backup", {{"path", "nightly.db"}});
  REQUIRE(r.status == 201);
  CHECK(body_of(r)["integrity"] == "ok");
  CHECK(body_of(r)["path"].get<std::string>().ends_with("/backups/nightly.db"));
  auto escape = f.post("/v1/admin/backup", {{"path", "../../etc/x.db"}});
  CHECK(escape.status == 422);
  CHECK(error_fields(escape) == std::vector<std::string>{"/path"});
}

}  // namespace pbfleet::api
