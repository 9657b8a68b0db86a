// RELIABILITY-TESTS row 1: SIGKILL pbfleetd at random moments during a
// stream of acknowledged readings (single and batched, each with a
// reading_id), restart, re-send what was not acknowledged, and check that
// every acknowledged reading is present exactly once, that no batch is
// ever partly stored, and that the database passes PRAGMA integrity_check.
//
// Bounded: 6 kills, about 20 s. The seed is printed; PBFLEET_TEST_SEED
// replays a failing run.
#include <doctest/doctest.h>

#include <signal.h>

#include <atomic>
#include <cstdlib>
#include <map>
#include <random>
#include <set>
#include <thread>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;

constexpr int kKills = 6;
constexpr int kMaxBatch = 40;
constexpr int kKillDelayMinMs = 80;
constexpr int kKillDelayMaxMs = 900;

unsigned seed_from_environment() {
  if (const char* env = std::getenv("PBFLEET_TEST_SEED")) return static_cast<unsigned>(std::atoll(env));
  return std::random_device{}();
}

// Kills the daemon whose PID is armed after a random delay; then disarms.
class Killer {
 public:
  explicit Killer(unsigned seed) : rng_(seed), thread_([this] { loop(); }) {}
  ~Killer() {
    stop_ = true;
    thread_.join();
  }
  void arm(pid_t pid) { target_ = pid; }
  [[nodiscard]] bool armed() const { return target_.load() > 0; }

 private:
  void loop() {
    while (!stop_) {
      const pid_t pid = target_.load();
      if (pid <= 0) {
        std::this_thread::sleep_for(std::chrono::milliseconds{5});
        continue;
      }
      std::uniform_int_distribution<int> delay(kKillDelayMinMs, kKillDelayMaxMs);
      std::this_thread::sleep_for(std::chrono::milliseconds{delay(rng_)});
      ::kill(pid, SIGKILL);
      target_ = -1;
    }
  }
  std::mt19937 rng_;
  std::atomic<pid_t> target_{-1};
  std::atomic<bool> stop_{false};
  std::thread thread_;
};

struct Batch {
  std::vector<std::string> ids;
  json body;  // an object (single reading) or an array
};

Batch make_batch(int number, int size, const std::vector<std::string>& serials) {
  Batch b;
  json items = json::array();
  for (int i = 0; i < size; ++i) {
    std::string id = "k" + std::to_string(number) + "-" + std::to_string(i);
    items.push_back(good_reading(serials[static_cast<std::size_t>(number + i) % serials.size()],
                                 id, number * kMaxBatch + i));
    b.ids.push_back(std::move(id));
  }
  b.body = size == 1 ? items[0] : items;
  return b;
}

// How many of the batch's reading ids the database holds.
std::int64_t stored_of(SqliteProbe& db, const Batch& b) {
  std::string list;
  for (const auto& id : b.ids) list += (list.empty() ? "'" : ",'") + id + "'";
  return db.integer("SELECT count(*) FROM readings WHERE reading_id IN (" + list + ")");
}

}  // namespace

TEST_CASE("readings acknowledged before a SIGKILL survive it exactly once, batches are all or nothing") {
  const unsigned seed = seed_from_environment();
  MESSAGE("seed " << seed << " (set PBFLEET_TEST_SEED to replay)");
  std::mt19937 rng(seed);
  LiveFleet fleet({.batteries_per_depot = 4, .extra_args = {}, .log_level = "warn", .database = {}});
  std::vector<std::string> serials = fleet.serials("North Yard");
  for (const auto& s : fleet.serials("Harbour")) serials.push_back(s);

  std::set<std::string> acknowledged;
  int kills = 0, batches = 0, resent = 0;
  Killer killer(seed + 1);
  auto client = fleet.client("crew");
  killer.arm(fleet.server().pid());
  std::uniform_int_distribution<int> size_of(1, kMaxBatch);
  std::optional<Batch> in_doubt;

  while (kills < kKills) {
    // About a third are single readings (an object), the rest arrays.
    const int size = size_of(rng) % 3 == 0 ? 1 : size_of(rng);
    Batch batch = in_doubt ? *in_doubt : make_batch(batches++, size, serials);
    try {
      auto reply = client.post("/v1/readings", batch.body);
      REQUIRE_MESSAGE((reply.status == 201 || reply.status == 200), reply.body);
      const json body = reply.json();
      CHECK(body["stored"].get<int>() + body["replayed"].get<int>() ==
            static_cast<int>(batch.ids.size()));
      if (in_doubt) ++resent;
      acknowledged.insert(batch.ids.begin(), batch.ids.end());
      in_doubt.reset();
    } catch (const TransportError&) {
      // The daemon died under this request: it may or may not have committed.
      in_doubt = batch;
      fleet.server().kill_hard();  // reaps it (already dead)
      ++kills;
      {
        SqliteProbe db(fleet.db());
        CHECK(db.integrity() == "ok");
        const auto held = stored_of(db, batch);
        CHECK_MESSAGE((held == 0 || held == static_cast<std::int64_t>(batch.ids.size())),
                      "batch of " << batch.ids.size() << " partly stored: " << held);
        CHECK(db.integer("SELECT count(*) FROM readings") >=
              static_cast<std::int64_t>(acknowledged.size()));
      }
      fleet.server().start();
      client = fleet.client("crew");
      if (kills < kKills) killer.arm(fleet.server().pid());
    }
  }
  // Resend the last batch in doubt so every batch ends acknowledged.
  if (in_doubt) {
    auto reply = client.post("/v1/readings", in_doubt->body);
    REQUIRE_MESSAGE((reply.status == 201 || reply.status == 200), reply.body);
    acknowledged.insert(in_doubt->ids.begin(), in_doubt->ids.end());
    ++resent;
  }
  MESSAGE(kills << " kills, " << batches << " batches, " << acknowledged.size()
                << " readings acknowledged, " << resent << " batches re-sent");
  CHECK(fleet.server().terminate() == 0);

  SqliteProbe db(fleet.db());
  CHECK(db.integrity() == "ok");
  // Every acknowledged reading exactly once, and nothing else.
  CHECK(db.integer("SELECT count(*) FROM readings") == static_cast<std::int64_t>(acknowledged.size()));
  CHECK(db.integer("SELECT count(DISTINCT reading_id) FROM readings") ==
        static_cast<std::int64_t>(acknowledged.size()));
  std::set<std::string> stored;
  for (auto& id : db.column("SELECT reading_id FROM readings")) stored.insert(std::move(id));
  CHECK(stored == acknowledged);
  // The trigger-kept counter agrees with the table after every crash.
  CHECK(db.integer("SELECT value FROM counters WHERE name = 'readings'") ==
        static_cast<std::int64_t>(acknowledged.size()));
}

}  // namespace pbfleet::testing
