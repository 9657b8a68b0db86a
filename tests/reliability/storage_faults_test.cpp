// RELIABILITY-TESTS rows 4 and 5: the database runs out of space, and the
// database file becomes unusable, while the daemon runs.
//
// Row 4 uses the documented `max_db_bytes` cap (SQLite max_page_count): a
// write that would pass it fails with SQLITE_FULL exactly as on a full disk
// (a small tmpfs would need root). Space is freed by deleting filler rows
// from the database file, the way an operator would clear room; the daemon
// is not restarted.
//
// Row 5 takes the file away from the daemon: chmod 000 when the tests run
// as a normal user; as root (which chmod does not stop) the file is moved
// aside, which leaves it equally unusable at its configured path.
#include <doctest/doctest.h>

#include <sys/stat.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <thread>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;
using namespace std::chrono_literals;

json batch(const std::vector<std::string>& serials, const std::string& prefix, int count,
           int first_minute) {
  json out = json::array();
  for (int i = 0; i < count; ++i) {
    auto r = good_reading(serials[static_cast<std::size_t>(i) % serials.size()],
                          prefix + "-" + std::to_string(i), first_minute + i);
    r["note"] = std::string(200, 'n');  // the longest note allowed: fills pages faster
    out.push_back(r);
  }
  return out;
}

// Polls `target` until it answers `status` or `limit` passes; the time taken.
std::optional<std::chrono::milliseconds> time_until(HttpClient& client, const std::string& target,
                                                    int status, std::chrono::milliseconds limit) {
  const auto start = std::chrono::steady_clock::now();
  while (std::chrono::steady_clock::now() - start < limit) {
    if (client.get(target).status == status)
      return std::chrono::duration_cast<std::chrono::milliseconds>(std::chrono::steady_clock::now() -
                                                                   start);
    std::this_thread::sleep_for(100ms);
  }
  return std::nullopt;
}

}  // namespace

TEST_CASE("a full database answers 507 storing nothing, keeps serving reads, and takes writes again once space is freed") {
  // 1 MiB: the seeded fleet takes a few hundred KiB; filler batches of 100
  // readings (~50 KiB each) reach the cap within about 20 batches.
  LiveFleet fleet({.batteries_per_depot = 2, .extra_args = {"--max-db-bytes", "1048576"},
                   .log_level = "warn", .database = {}});
  auto crew = fleet.client("crew");
  const auto& serials = fleet.serials("North Yard");
  int filled = 0;
  HttpReply refused;
  for (int b = 0; b < 60; ++b) {
    refused = crew.post("/v1/readings", batch(serials, "fill" + std::to_string(b), 100, b * 100));
    if (refused.status != 201) break;
    ++filled;
  }
  MESSAGE(filled << " filler batches of 100 stored before the cap");
  REQUIRE_MESSAGE(filled > 0, refused.body.substr(0, 300));
  CHECK(problem_mismatch(refused, 507, "storage-full") == "");
  CHECK(refused.header("content-type").find("application/problem+json") != std::string::npos);

  // No partial batch: nothing of the refused batch is stored.
  const std::string refused_prefix = "fill" + std::to_string(filled) + "-";
  {
    SqliteProbe db(fleet.db());
    CHECK(db.integer("SELECT count(*) FROM readings WHERE reading_id LIKE '" + refused_prefix + "%'") == 0);
    CHECK(db.integer("SELECT count(*) FROM readings") == filled * 100);
  }
  // Sent again while still full: refused the same way; reads keep working.
  auto retry = crew.post("/v1/readings", batch(serials, "fill" + std::to_string(filled), 100, filled * 100));
  CHECK(problem_mismatch(retry, 507, "storage-full") == "");
  CHECK(crew.get("/v1/batteries").status == 200);
  auto page = crew.get("/v1/readings?serial=" + serials[0] + "&limit=10");
  CHECK(page.status == 200);
  CHECK(page.json()["items"].size() == 10);
  CHECK(fleet.client("manager").get("/v1/reports/winter").status == 200);
  CHECK(fleet.client("").get("/healthz").status == 200);

  // Free space (delete half the filler) without restarting: writes succeed.
  {
    SqliteProbe db(fleet.db());
    db.column("DELETE FROM readings WHERE reading_id LIKE 'fill%' AND CAST(substr(reading_id, 5) AS INTEGER) % 2 = 0");
    db.column("PRAGMA wal_checkpoint(PASSIVE)");
  }
  auto again = crew.post("/v1/readings", batch(serials, "fill" + std::to_string(filled), 100, filled * 100));
  CHECK_MESSAGE(again.status == 201, again.body);
  CHECK(again.json()["stored"] == 100);
  SqliteProbe db(fleet.db());
  CHECK(db.integer("SELECT count(*) FROM readings WHERE reading_id LIKE '" + refused_prefix + "%'") == 100);
  CHECK(db.integrity() == "ok");
  CHECK(fleet.server().running());
}

TEST_CASE("readyz answers 503 within 5 s when the database file becomes unusable, healthz stays 200, and both recover") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto probe = fleet.client("");
  REQUIRE(probe.get("/readyz").status == 200);
  const auto file = fleet.db();
  const auto aside = file.string() + ".aside";
  const bool root = ::geteuid() == 0;
  MESSAGE(std::string(root ? "running as root: the file is moved aside" : "chmod 000 on the file"));
  if (root) {
    std::filesystem::rename(file, aside);
  } else {
    REQUIRE(::chmod(file.c_str(), 0) == 0);
  }
  const auto down = time_until(probe, "/readyz", 503, 5s);
  REQUIRE_MESSAGE(down.has_value(), "readyz still 200 after 5 s");
  MESSAGE("readyz went 503 after " << down->count() << " ms");
  auto ready = probe.get("/readyz");
  CHECK(problem_mismatch(ready, 503, "storage-unavailable") == "");
  CHECK(probe.get("/healthz").status == 200);

  if (root) {
    std::filesystem::rename(aside, file);
  } else {
    REQUIRE(::chmod(file.c_str(), 0644) == 0);
  }
  const auto up = time_until(probe, "/readyz", 200, 5s);
  CHECK_MESSAGE(up.has_value(), "readyz did not recover within 5 s");
  CHECK(probe.get("/healthz").status == 200);
  CHECK(fleet.client("crew").post("/v1/readings", good_reading(fleet.serials("North Yard")[0], "after-repair", 1)).status == 201);
}

}  // namespace pbfleet::testing
