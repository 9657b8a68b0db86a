// RELIABILITY-TESTS row 17: paging GET /v1/readings by cursor through 10k
// readings while another client keeps inserting. Every reading that existed
// when paging began appears exactly once; a limit above the documented
// maximum (1000, server/api/CONTRACT.md) is refused with 400 bad-query
// naming `limit`, never silently served.
#include <doctest/doctest.h>

#include <atomic>
#include <map>
#include <thread>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;

constexpr int kExisting = 10'000;
constexpr int kSeedBatch = 1000;

}  // namespace

TEST_CASE("cursor paging sees every pre-existing reading exactly once while another client inserts") {
  LiveFleet fleet({.batteries_per_depot = 4, .extra_args = {}, .log_level = "warn", .database = {}});
  const auto& serials = fleet.serials("North Yard");
  auto crew = fleet.client("crew");
  for (int b = 0; b < kExisting / kSeedBatch; ++b) {
    json batch = json::array();
    for (int i = 0; i < kSeedBatch; ++i) {
      const int n = b * kSeedBatch + i;
      batch.push_back(good_reading(serials[static_cast<std::size_t>(n) % serials.size()],
                                   "pre-" + std::to_string(n), n));
    }
    auto reply = crew.post("/v1/readings", batch);
    REQUIRE_MESSAGE(reply.status == 201, reply.body.substr(0, 300));
  }

  std::atomic<bool> stop{false};
  std::atomic<int> inserted{0}, insert_failures{0};
  std::thread inserter([&] {
    auto writer = fleet.client("crew");
    for (int b = 0; !stop && b < 2000; ++b) {
      json batch = json::array();
      for (int i = 0; i < 10; ++i)
        batch.push_back(good_reading(serials[static_cast<std::size_t>(i) % serials.size()],
                                     "new-" + std::to_string(b) + "-" + std::to_string(i), 20'000 + b * 10 + i));
      if (writer.post("/v1/readings", batch).status == 201) {
        inserted += 10;
      } else {
        ++insert_failures;
      }
    }
  });

  std::map<std::string, int> seen;
  auto reader = fleet.client("admin");
  std::string cursor;
  int pages = 0;
  for (; pages < 200; ++pages) {
    auto reply = reader.get("/v1/readings?limit=250" + (cursor.empty() ? "" : "&cursor=" + cursor));
    REQUIRE_MESSAGE(reply.status == 200, reply.body.substr(0, 300));
    const json page = reply.json();
    for (const auto& item : page["items"]) ++seen[item["reading_id"].get<std::string>()];
    if (page["next_cursor"].is_null()) break;
    cursor = page["next_cursor"].get<std::string>();
    // Let the inserter commit between pages.
    std::this_thread::sleep_for(std::chrono::milliseconds{5});
  }
  stop = true;
  inserter.join();
  MESSAGE((pages + 1) << " pages; " << inserted.load() << " readings inserted meanwhile");
  CHECK(insert_failures == 0);
  CHECK(inserted > 0);

  int missing = 0, doubled = 0, pre = 0;
  for (int n = 0; n < kExisting; ++n) {
    auto it = seen.find("pre-" + std::to_string(n));
    if (it == seen.end()) {
      ++missing;
    } else {
      ++pre;
      doubled += it->second != 1;
    }
  }
  CHECK(missing == 0);
  CHECK(doubled == 0);
  CHECK(pre == kExisting);
  for (const auto& [id, count] : seen) CHECK_MESSAGE(count == 1, id);
}

TEST_CASE("a page limit above 1000 is refused with 400 naming limit, 1000 is served") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto admin = fleet.client("admin");
  for (const std::string target : {"/v1/readings", "/v1/batteries", "/v1/tokens", "/v1/depots"}) {
    CAPTURE(target);
    auto over = admin.get(target + "?limit=1001");
    CHECK(problem_mismatch(over, 400, "bad-query", "limit") == "");
    CHECK(over.json()["errors"][0]["allowed"] == "1 to 1000");
    CHECK(problem_mismatch(admin.get(target + "?limit=0"), 400, "bad-query", "limit") == "");
    CHECK(admin.get(target + "?limit=1000").status == 200);
  }
}

}  // namespace pbfleet::testing
