// RELIABILITY-TESTS row 21, bounded: online backups through
// POST /v1/admin/backup while 8 writers post batches of 10 for about 6 s.
// Each copy passes integrity_check, holds every batch wholly or not at all,
// and a daemon started on the copy serves it and accepts new writes.
#include <doctest/doctest.h>

#include <atomic>
#include <mutex>
#include <set>
#include <thread>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;

constexpr int kWritersDuringBackup = 8;
constexpr int kBatch = 10;
constexpr int kBackups = 3;

}  // namespace

TEST_CASE("an online backup taken under write load is consistent and can be served") {
  LiveFleet fleet({.batteries_per_depot = 4, .extra_args = {}, .log_level = "warn", .database = {}});
  std::atomic<bool> stop{false};
  std::atomic<int> acknowledged_batches{0};
  std::atomic<int> failures{0};
  std::vector<std::thread> writers;
  for (int w = 0; w < kWritersDuringBackup; ++w) {
    writers.emplace_back([&, w] {
      auto client = fleet.client("crew");
      const auto& serials = fleet.serials(w % 2 ? "North Yard" : "Harbour");
      for (int n = 0; !stop; ++n) {
        json items = json::array();
        for (int i = 0; i < kBatch; ++i)
          items.push_back(good_reading(serials[static_cast<std::size_t>(i) % serials.size()],
                                       "b" + std::to_string(w) + "-" + std::to_string(n) + "-" +
                                           std::to_string(i),
                                       n));
        try {
          const auto reply = client.post("/v1/readings", items);
          if (reply.status == 201) ++acknowledged_batches; else ++failures;
        } catch (const TransportError&) {
          ++failures;
        }
      }
    });
  }

  auto admin = fleet.client("admin");
  std::vector<std::string> copies;
  for (int b = 0; b < kBackups; ++b) {
    std::this_thread::sleep_for(std::chrono::milliseconds{1500});
    const std::string name = "copy-" + std::to_string(b) + ".db";
    auto reply = admin.post("/v1/admin/backup", {{"path", name}});
    REQUIRE_MESSAGE(reply.status == 201, reply.body);
    CHECK(reply.json()["integrity"] == "ok");
    copies.push_back(reply.json()["path"].get<std::string>());
  }
  std::this_thread::sleep_for(std::chrono::milliseconds{500});
  stop = true;
  for (auto& t : writers) t.join();
  CHECK(failures == 0);
  MESSAGE(acknowledged_batches.load() << " batches of " << kBatch << " acknowledged during "
                                      << kBackups << " backups");

  std::int64_t last_count = -1;
  for (const auto& copy : copies) {
    SqliteProbe db(copy);
    CHECK(db.integrity() == "ok");
    // Batch key: the reading_id without its trailing index ("b3-17-").
    auto sizes = db.column(
        "SELECT count(*) FROM readings GROUP BY rtrim(reading_id, '0123456789')");
    for (const auto& size : sizes) CHECK_MESSAGE(size == std::to_string(kBatch), "a batch holds " << size);
    const auto count = db.integer("SELECT count(*) FROM readings");
    CHECK(count % kBatch == 0);
    CHECK(count >= last_count);  // later copies hold at least as much
    last_count = count;
  }

  // Restore: a daemon on the last copy serves it with the same tokens.
  TempDir restore_dir("pbfleet-restore");
  std::filesystem::copy_file(copies.back(), restore_dir / "pbfleet.db");
  ServerProcess restored({.db = restore_dir / "pbfleet.db", .log = restore_dir / "pbfleetd.log",
                          .admin_token = {}, .extra_args = {}, .log_level = "warn", .database = {}});
  HttpClient client(restored.port());
  client.set_token(fleet.token("manager"));
  auto listed = client.get("/v1/readings?limit=1000");
  REQUIRE_MESSAGE(listed.status == 200, listed.body);
  auto batteries = client.get("/v1/batteries");
  CHECK(batteries.status == 200);
  CHECK(batteries.json()["items"].size() == 8);
  client.set_token(fleet.token("crew"));
  auto written = client.post("/v1/readings", good_reading(fleet.serials("Harbour")[0], "after-restore", 1));
  CHECK_MESSAGE(written.status == 201, written.body);
  CHECK(restored.terminate() == 0);
  SqliteProbe db(restore_dir / "pbfleet.db");
  CHECK(db.integrity() == "ok");
  CHECK(db.integer("SELECT count(*) FROM readings") == last_count + 1);
}

}  // namespace pbfleet::testing
