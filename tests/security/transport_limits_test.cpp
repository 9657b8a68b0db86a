// Hostile transport (RELIABILITY-TESTS rows 14 and 16, bounded): a 10 MB
// body gets 413, a header flood 431, a client trickling its header is cut
// off by the header timeout while others are served, and connections
// beyond the cap are refused without harming the service. Nothing of a
// refused request is stored.
#include <doctest/doctest.h>

#include <thread>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {

using nlohmann::json;

TEST_CASE("a 10 MB body gets 413 problem+json and nothing is stored") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto crew = fleet.client("crew");
  json r = good_reading("NY-0001", "big-1", 0);
  r["note"] = std::string(10 * 1024 * 1024, 'a');
  auto reply = crew.post("/v1/readings", r);
  CHECK(problem_mismatch(reply, 413, "payload-too-large") == "");
  // The daemon is fine afterwards.
  CHECK(fleet.client("crew").get("/v1/batteries").status == 200);
  SqliteProbe db(fleet.db());
  CHECK(db.integer("SELECT count(*) FROM readings") == 0);
}

TEST_CASE("a header flood gets 431 problem+json") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto crew = fleet.client("crew");
  Headers flood;
  for (int i = 0; i < 200; ++i) flood.emplace_back("X-Flood-" + std::to_string(i), std::string(100, 'h'));
  auto reply = crew.send("GET", "/v1/batteries", {}, "application/json", flood);
  CHECK(problem_mismatch(reply, 431, "header-too-large") == "");
  CHECK(fleet.client("crew").get("/v1/batteries").status == 200);
}

TEST_CASE("a client trickling its header is cut off by the header timeout while others are served") {
  // 1 s header timeout so the test stays short; the default is 10 s.
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {"--header-timeout-ms", "1000"},
                   .log_level = "warn", .database = {}});
  std::vector<std::unique_ptr<RawConnection>> slow;
  for (int i = 0; i < 20; ++i) {
    slow.push_back(std::make_unique<RawConnection>(fleet.server().port()));
    slow.back()->write("GET /v1/batteries HTTP/1.1\r\n");
  }
  const auto start = std::chrono::steady_clock::now();
  auto normal = fleet.client("crew");
  int served = 0;
  for (int i = 0; i < 10; ++i) {
    for (auto& s : slow) s->write("X");  // one byte per client per round
    served += normal.get("/v1/batteries").status == 200;
    std::this_thread::sleep_for(std::chrono::milliseconds{100});
  }
  CHECK(served == 10);
  int closed = 0;
  for (auto& s : slow) closed += s->closed_within(std::chrono::milliseconds{3000});
  const double took = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  MESSAGE(closed << " of 20 slow clients closed after " << took << " s");
  CHECK(closed == 20);
  CHECK(took < 5.0);
}

TEST_CASE("connections beyond the cap are refused and the service recovers") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {"--max-connections", "8"},
                   .log_level = "warn", .database = {}});
  // 14 connections at once: at most 8 are served, the rest answered 503 at
  // accept. (Connections of the fleet set-up may still count for a moment,
  // so the served number can be below 8, never above.)
  std::vector<std::unique_ptr<RawConnection>> held;
  for (int i = 0; i < 14; ++i) held.push_back(std::make_unique<RawConnection>(fleet.server().port()));
  std::this_thread::sleep_for(std::chrono::milliseconds{300});
  int served = 0, refused = 0;
  for (auto& c : held) {
    c->write("GET /healthz HTTP/1.1\r\nHost: x\r\nConnection: close\r\n\r\n");
    const std::string answer = c->read_until_close(std::chrono::seconds{3});
    CAPTURE(answer);
    served += answer.rfind("HTTP/1.1 200", 0) == 0;
    refused += answer.rfind("HTTP/1.1 503", 0) == 0 || answer.empty();
  }
  MESSAGE(served << " served, " << refused << " refused");
  CHECK(served <= 8);
  CHECK(refused >= 6);
  CHECK(served + refused == 14);
  held.clear();
  std::this_thread::sleep_for(std::chrono::milliseconds{300});
  CHECK(fleet.client("crew").get("/v1/batteries").status == 200);
}

}  // namespace pbfleet::testing
