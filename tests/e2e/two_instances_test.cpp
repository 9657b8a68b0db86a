// Two pbfleetd instances on one PostgreSQL database (a throwaway cluster
// this test process starts, tests/support/pg_cluster.hpp), as behind a load
// balancer: what goes in through A comes out of B, a reading_id raced
// through both is stored once, a SIGKILL of A loses no acknowledged
// reading, and a token revoked on A is refused by B within a second.
#include <doctest/doctest.h>

#include <atomic>
#include <cstdlib>
#include <chrono>
#include <set>
#include <thread>

#include "server/storage/pg_store.hpp"
#include "tests/support/http_client.hpp"
#include "tests/support/live_fleet.hpp"
#include "tests/support/pg_cluster.hpp"
#include "tests/support/server_process.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;

// Instance A seeds the fleet (LiveFleet) on a fresh database; B is a
// second daemon on the same database.
struct TwoInstances {
  std::string uri = shared_pg_cluster().fresh_database();
  LiveFleet a{FleetOptions{
      .batteries_per_depot = 4, .extra_args = {}, .log_level = "info", .database = uri}};
  TempDir b_dir{"pbfleet-live-b"};
  ServerProcess b{ServerConfig{.db = b_dir / "b.db", .log = b_dir / "pbfleetd.log",
                               .admin_token = {}, .extra_args = {}, .log_level = "info",
                               .database = uri}};

  HttpClient on_b(const std::string& who) const {
    HttpClient c(b.port());
    c.set_token(a.token(who));
    return c;
  }
};

std::set<std::string> history_ids(HttpClient& client, const std::string& serial) {
  auto reply = client.get("/v1/batteries/" + serial + "/history");
  REQUIRE(reply.status == 200);
  std::set<std::string> ids;
  const json body = reply.json();  // kept: a range over a temporary's member would dangle
  for (const auto& r : body["readings"]) ids.insert(r["reading_id"].get<std::string>());
  return ids;
}

}  // namespace

TEST_CASE("readings posted to instance A are in instance B's history and reports") {
  TwoInstances two;
  auto crew_a = two.a.client("crew");
  json round = json::array();
  int minute = 0;
  for (const auto& serial : two.a.serials("North Yard"))
    round.push_back(good_reading(serial, "ab-" + serial, minute++));
  REQUIRE(crew_a.post("/v1/readings", round).status == 201);

  auto technician_b = two.on_b("technician");
  const std::string serial = two.a.serials("North Yard").front();
  CHECK(history_ids(technician_b, serial) == std::set<std::string>{"ab-" + serial});
  auto manager_b = two.on_b("manager");
  auto winter = manager_b.get("/v1/reports/winter?low_c=-30");
  REQUIRE(winter.status == 200);
  int with_readings = 0;
  const json report = winter.json();
  for (const auto& b : report["batteries"]) with_readings += b["reading_at"].is_null() ? 0 : 1;
  CHECK(with_readings == static_cast<int>(round.size()));
  // A replay through B answers 200 with A's originals.
  auto replay = two.on_b("crew").post("/v1/readings", round);
  CHECK(replay.status == 200);
  CHECK(replay.json()["replayed"] == round.size());
}

TEST_CASE("the same reading_id raced through A and B from 8 threads is stored once") {
  TwoInstances two;
  const std::string serial = two.a.serials("Harbour").front();
  const json reading = good_reading(serial, "race-ab-1", 3);
  std::atomic<int> created{0}, replayed{0}, other{0};
  std::vector<std::thread> threads;
  for (int t = 0; t < 8; ++t) {
    threads.emplace_back([&, t] {
      HttpClient client = t % 2 == 0 ? two.a.client("crew") : two.on_b("crew");
      const int status = client.post("/v1/readings", json::array({reading})).status;
      (status == 201 ? created : status == 200 ? replayed : other)++;
    });
  }
  for (auto& t : threads) t.join();
  CHECK(created == 1);
  CHECK(replayed == 7);
  CHECK(other == 0);
  auto reader = two.on_b("technician");
  CHECK(history_ids(reader, serial) == std::set<std::string>{"race-ab-1"});
  // Different content under that id through the other instance: 409.
  json changed = reading;
  changed["note"] = "not the same reading";
  CHECK(two.on_b("crew").post("/v1/readings", json::array({changed})).status == 409);
}

TEST_CASE("a SIGKILL of A during ingest loses no reading A acknowledged, as B shows") {
  TwoInstances two;
  const std::string serial = two.a.serials("North Yard").front();
  std::set<std::string> acknowledged;
  std::atomic<bool> done{false};
  std::thread writer([&] {
    auto crew = two.a.client("crew");
    for (int i = 0; i < 2000; ++i) {
      const std::string id = "kill-" + std::to_string(i);
      try {
        if (crew.post("/v1/readings", json::array({good_reading(serial, id, i)})).status == 201)
          acknowledged.insert(id);
      } catch (const TransportError&) {
        break;  // A is gone
      }
    }
    done = true;
  });
  while (acknowledged.size() < 40 && !done) std::this_thread::sleep_for(std::chrono::milliseconds{5});
  two.a.server().kill_hard();
  writer.join();
  REQUIRE(acknowledged.size() >= 40);
  auto reader = two.on_b("technician");
  const auto stored = history_ids(reader, serial);
  for (const auto& id : acknowledged) CHECK_MESSAGE(stored.count(id) == 1, id);
  MESSAGE(acknowledged.size() << " acknowledged, " << stored.size() << " stored");
}

TEST_CASE("a token revoked on A is refused on B within a second") {
  TwoInstances two;
  auto [id, raw] = two.a.make_token("crew");
  HttpClient b_client(two.b.port());
  b_client.set_token(raw);
  REQUIRE(b_client.get("/v1/depots").status == 200);  // B knows (and may cache) it now
  auto admin_a = two.a.client("admin");
  REQUIRE(admin_a.send("DELETE", "/v1/tokens/" + std::to_string(id)).status == 200);
  const auto revoked = std::chrono::steady_clock::now();
  std::this_thread::sleep_for(std::chrono::milliseconds{1000});
  CHECK(b_client.get("/v1/depots").status == 401);
  CHECK(std::chrono::steady_clock::now() - revoked < std::chrono::milliseconds{1500});
}

TEST_CASE("deploy/backup dumps the PostgreSQL database and proves the dump restores") {
  TwoInstances two;
  auto crew = two.a.client("crew");
  json round = json::array();
  for (const auto& serial : two.a.serials("Harbour"))
    round.push_back(good_reading(serial, "bk-" + serial, 1));
  REQUIRE(crew.post("/v1/readings", round).status == 201);
  const auto dest = two.b_dir / "fleet.dump";
  const auto out = two.b_dir / "backup.out";
  const std::string command = std::string(PBFLEET_SOURCE_DIR) + "/deploy/backup '" + two.uri +
                              "' '" + dest.string() + "' > '" + out.string() + "' 2>&1";
  const int status = std::system(command.c_str());
  const std::string said = read_text_file(out);
  REQUIRE_MESSAGE(status == 0, said);
  CHECK(std::filesystem::file_size(dest) > 0);
  CHECK(said.find("restore check ok (schema " + std::to_string(storage::known_pg_schema_version())) !=
        std::string::npos);
  CHECK(said.find(std::to_string(round.size()) + " readings") != std::string::npos);
  // A second backup to the same name is refused.
  CHECK(std::system(command.c_str()) != 0);
}

}  // namespace pbfleet::testing
