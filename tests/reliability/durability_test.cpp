// RELIABILITY-TESTS rows 3 and 22: the durability settings in force are
// exposed to admins and match the database file; SIGTERM under write load
// ends the daemon with exit 0 within 10 s and loses no acknowledged write.
#include <doctest/doctest.h>

#include <atomic>
#include <mutex>
#include <set>
#include <thread>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {

using nlohmann::json;

TEST_CASE("the daemon runs WAL with synchronous FULL and foreign keys, and says so") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto admin = fleet.client("admin");
  auto reply = admin.get("/v1/admin/durability");
  REQUIRE_MESSAGE(reply.status == 200, reply.body);
  const json d = reply.json();
  CHECK(d["journal_mode"] == "wal");
  CHECK(d["synchronous"] == 2);
  CHECK((d["foreign_keys"] == true || d["foreign_keys"] == 1));
  // journal_mode is stored in the file itself.
  SqliteProbe db(fleet.db());
  CHECK(db.column("PRAGMA journal_mode").at(0) == "wal");
}

TEST_CASE("SIGTERM under write load exits 0 within 10 s and keeps every acknowledged reading") {
  LiveFleet fleet({.batteries_per_depot = 4, .extra_args = {}, .log_level = "warn", .database = {}});
  std::mutex mutex;
  std::set<std::string> acknowledged;
  std::atomic<int> server_errors{0};
  std::atomic<bool> stop{false};
  std::vector<std::thread> writers;
  for (int w = 0; w < 8; ++w) {
    writers.emplace_back([&, w] {
      auto client = fleet.client("crew");
      const auto& serials = fleet.serials("North Yard");
      for (int n = 0; !stop; ++n) {
        const std::string id = "t" + std::to_string(w) + "-" + std::to_string(n);
        try {
          auto reply = client.post("/v1/readings", good_reading(serials[static_cast<std::size_t>(n) % serials.size()], id, n));
          if (reply.status == 201) {
            std::lock_guard lock(mutex);
            acknowledged.insert(id);
          } else if (reply.status >= 500 && reply.status != 503) {
            ++server_errors;  // 503 is the documented answer while stopping
          }
        } catch (const TransportError&) {
          std::this_thread::sleep_for(std::chrono::milliseconds{20});  // the daemon is gone
        }
      }
    });
  }
  std::this_thread::sleep_for(std::chrono::seconds{2});
  const auto start = std::chrono::steady_clock::now();
  const int code = fleet.server().terminate(std::chrono::seconds{10});
  const auto took = std::chrono::steady_clock::now() - start;
  stop = true;
  for (auto& t : writers) t.join();
  MESSAGE("stopped in " << std::chrono::duration<double>(took).count() << " s with "
                        << acknowledged.size() << " readings acknowledged");
  CHECK(code == 0);
  CHECK(server_errors == 0);
  CHECK(acknowledged.size() > 20);
  SqliteProbe db(fleet.db());
  CHECK(db.integrity() == "ok");
  std::set<std::string> stored;
  for (auto& id : db.column("SELECT reading_id FROM readings")) stored.insert(std::move(id));
  CHECK(std::includes(stored.begin(), stored.end(), acknowledged.begin(), acknowledged.end()));
}

}  // namespace pbfleet::testing
