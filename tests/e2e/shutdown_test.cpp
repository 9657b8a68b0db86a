// Graceful stop and restart: SIGTERM drains and exits 0, data survives.
#include <doctest/doctest.h>

#include <future>

#include "tests/support/http_client.hpp"
#include "tests/support/live_fleet.hpp"
#include "tests/support/server_process.hpp"

namespace pbfleet::testing {

TEST_CASE("SIGTERM with an idle keep-alive client exits 0 promptly and keeps the data") {
  LiveFleet fleet;
  auto crew = fleet.client("crew");
  const std::string serial = fleet.serials("Harbour").front();
  REQUIRE(crew.post("/v1/readings", good_reading(serial, "before-stop", 1)).status == 201);
  REQUIRE(crew.get("/healthz").status == 200);  // leaves an idle keep-alive connection
  const auto start = std::chrono::steady_clock::now();
  CHECK(fleet.server().terminate(std::chrono::seconds(10)) == 0);
  CHECK(std::chrono::steady_clock::now() - start < std::chrono::seconds(5));
  fleet.server().start();
  auto again = fleet.client("crew");
  auto history = again.get("/v1/batteries/" + serial + "/history");
  REQUIRE(history.status == 200);
  CHECK(history.json()["readings"].size() == 1);
}

TEST_CASE("requests in flight at SIGTERM are answered before the exit") {
  LiveFleet fleet;
  const std::string serial = fleet.serials("North Yard").front();
  std::vector<std::future<int>> posts;
  for (int i = 0; i < 8; ++i) {
    posts.push_back(std::async(std::launch::async, [&fleet, &serial, i] {
      auto c = fleet.client("crew");
      nlohmann::json batch = nlohmann::json::array();
      for (int k = 0; k < 50; ++k) batch.push_back(good_reading(serial, "f" + std::to_string(i * 100 + k), i * 100 + k));
      try {
        return c.post("/v1/readings", batch).status;
      } catch (const TransportError&) {
        return 0;  // refused after the stop began: never acknowledged
      }
    }));
  }
  std::this_thread::sleep_for(std::chrono::milliseconds(20));
  CHECK(fleet.server().terminate(std::chrono::seconds(10)) == 0);
  int acknowledged = 0;
  for (auto& p : posts) {
    const int status = p.get();
    CHECK((status == 201 || status == 0 || status == 503));
    if (status == 201) acknowledged += 50;
  }
  SqliteProbe probe(fleet.db());
  const auto stored = probe.integer("SELECT COUNT(*) FROM readings");
  CHECK(stored >= acknowledged);  // no acknowledged reading lost
  CHECK(stored % 50 == 0);        // no batch partly stored
  CHECK(probe.integrity() == "ok");
}

}  // namespace pbfleet::testing
