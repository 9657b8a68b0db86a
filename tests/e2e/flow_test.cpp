// The happy path of a shop over real HTTP: bootstrap admin token, fleet
// set-up, a crew token, a weekly round, history, reports, metrics.
#include <doctest/doctest.h>

#include <cstdio>

#include "tests/support/http_client.hpp"
#include "tests/support/live_fleet.hpp"
#include "tests/support/server_process.hpp"

namespace pbfleet::testing {

using nlohmann::json;

TEST_CASE("a weekly round goes in and comes back out as history, reports and metrics") {
  LiveFleet fleet;
  auto crew = fleet.client("crew");
  json round = json::array();
  int minute = 0;
  for (const auto& serial : fleet.serials("North Yard"))
    round.push_back(good_reading(serial, "round-1-" + serial, minute++));
  auto stored = crew.post("/v1/readings", round);
  REQUIRE(stored.status == 201);
  CHECK(stored.json()["stored"] == round.size());
  auto replay = crew.post("/v1/readings", round);
  CHECK(replay.status == 200);
  CHECK(replay.json()["replayed"] == round.size());

  auto technician = fleet.client("technician");
  const std::string serial = fleet.serials("North Yard").front();
  auto history = technician.get("/v1/batteries/" + serial + "/history");
  REQUIRE(history.status == 200);
  REQUIRE(history.json()["readings"].size() == 1);
  CHECK(history.json()["readings"][0]["derived"]["corrected_sg"].is_number());

  auto manager = fleet.client("manager");
  auto winter = manager.get("/v1/reports/winter?low_c=-30");
  REQUIRE(winter.status == 200);
  CHECK(winter.json()["batteries"].size() ==
        fleet.serials("North Yard").size() + fleet.serials("Harbour").size());
  auto csv = manager.send("GET", "/v1/reports/overdue", {}, "application/json", {{"Accept", "text/csv"}});
  CHECK(csv.status == 200);
  CHECK(csv.header("content-type").rfind("text/csv", 0) == 0);
  CHECK(crew.get("/v1/reports/winter").status == 403);

  HttpClient anonymous(fleet.server().port());
  CHECK(anonymous.get("/v1/depots").status == 401);
  auto metrics = anonymous.get("/metrics");
  REQUIRE(metrics.status == 200);
  CHECK(metrics.body.find("pbfleet_readings " + std::to_string(round.size()) + "\n") != std::string::npos);
  CHECK(metrics.body.back() == '\n');
}

TEST_CASE("the access log names the route and token id, never the token") {
  LiveFleet fleet;
  auto crew = fleet.client("crew");
  REQUIRE(crew.get("/v1/depots").status == 200);
  const std::string log = fleet.server().log_text();
  CHECK(log.find("route=/v1/depots status=200") != std::string::npos);
  for (const auto& [who, token] : fleet.tokens()) {
    INFO(who);
    CHECK(log.find(token) == std::string::npos);
  }
  CHECK(count_in_file(fleet.db(), fleet.token("crew")) == 0);
}

TEST_CASE("the daemon answers --help and --version on stdout") {
  // Checked through the binary the tests start; see ServerProcess::executable().
  const std::string exe = ServerProcess::executable().string();
  std::string out;
  FILE* pipe = ::popen((exe + " --version").c_str(), "r");
  REQUIRE(pipe != nullptr);
  char buffer[256];
  while (std::fgets(buffer, sizeof buffer, pipe)) out += buffer;
  CHECK(::pclose(pipe) == 0);
  CHECK(out.find("pbfleetd") != std::string::npos);
}

}  // namespace pbfleet::testing
