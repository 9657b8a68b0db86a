// RELIABILITY-TESTS row 2: a batch replayed with the same reading_ids (also
// after a restart) is answered like the first time and stores nothing more;
// the same id with another body is a 409 conflict; the same batch sent
// twice at once is stored once.
//
// Documented design (server/api/CONTRACT.md): a replay answers 200 with
// "replayed" counts instead of the first 201, and every replay answers the
// same status and body; the readings and their derived values are those of
// the first answer.
#include <doctest/doctest.h>

#include <future>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;

json batch_of(const std::string& prefix, const std::vector<std::string>& serials, int n) {
  json items = json::array();
  for (int i = 0; i < n; ++i)
    items.push_back(good_reading(serials[static_cast<std::size_t>(i) % serials.size()],
                                 prefix + std::to_string(i), i));
  return items;
}

// The answer's readings without the per-answer "replayed" flag.
json readings_without_flag(const json& body) {
  json out = body.at("readings");
  for (auto& r : out) r.erase("replayed");
  return out;
}

std::int64_t readings_in(const LiveFleet& fleet) {
  SqliteProbe db(fleet.db());
  return db.integer("SELECT count(*) FROM readings");
}

}  // namespace

TEST_CASE("a batch sent five times, once after a restart, is stored once and replays answer alike") {
  LiveFleet fleet({.batteries_per_depot = 3, .extra_args = {}, .log_level = "warn", .database = {}});
  const json batch = batch_of("idem-", fleet.serials("Harbour"), 10);
  auto crew = fleet.client("crew");

  auto first = crew.post("/v1/readings", batch);
  REQUIRE_MESSAGE(first.status == 201, first.body);
  CHECK(first.json()["stored"] == 10);
  CHECK(readings_in(fleet) == 10);

  std::vector<HttpReply> replays;
  for (int i = 0; i < 3; ++i) replays.push_back(crew.post("/v1/readings", batch));
  REQUIRE(fleet.server().terminate() == 0);
  fleet.server().start();
  crew = fleet.client("crew");
  replays.push_back(crew.post("/v1/readings", batch));

  for (const auto& r : replays) {
    CHECK_MESSAGE(r.status == 200, r.body);
    CHECK(r.body == replays.front().body);
    CHECK(r.json()["stored"] == 0);
    CHECK(r.json()["replayed"] == 10);
    CHECK(readings_without_flag(r.json()) == readings_without_flag(first.json()));
  }
  CHECK(readings_in(fleet) == 10);
}

TEST_CASE("the same reading_id with a different body is a 409 conflict and stores nothing") {
  LiveFleet fleet({.batteries_per_depot = 2, .extra_args = {}, .log_level = "warn", .database = {}});
  auto crew = fleet.client("crew");
  const auto serial = fleet.serials("North Yard").front();
  REQUIRE(crew.post("/v1/readings", good_reading(serial, "conflict-1", 0)).status == 201);

  json changed = good_reading(serial, "conflict-1", 0);
  changed["ocv_v"] = 12.40;
  auto single = crew.post("/v1/readings", changed);
  CHECK(problem_mismatch(single, 409, "conflict", "/reading_id") == "");

  // In a batch, the conflicting row makes the whole batch fail.
  json mixed = json::array({good_reading(serial, "conflict-new", 1), changed});
  auto batch = crew.post("/v1/readings", mixed);
  CHECK(problem_mismatch(batch, 409, "conflict", "/1/reading_id") == "");

  SqliteProbe db(fleet.db());
  CHECK(db.integer("SELECT count(*) FROM readings") == 1);
  CHECK(db.integer("SELECT count(*) FROM readings WHERE reading_id = 'conflict-new'") == 0);
  CHECK(db.integer("SELECT count(*) FROM readings WHERE reading_id = 'conflict-1' AND ocv_v = 12.62") == 1);
}

TEST_CASE("one reading_id twice in one batch with different bodies stores nothing") {
  LiveFleet fleet({.batteries_per_depot = 2, .extra_args = {}, .log_level = "warn", .database = {}});
  auto crew = fleet.client("crew");
  const auto serial = fleet.serials("North Yard").front();
  json twice = json::array({good_reading(serial, "dup-1", 0), good_reading(serial, "dup-1", 5)});
  auto reply = crew.post("/v1/readings", twice);
  CHECK_MESSAGE((reply.status == 409 || reply.status == 422), reply.body);
  CHECK(reply.header("content-type").rfind("application/problem+json", 0) == 0);
  CHECK(readings_in(fleet) == 0);
}

TEST_CASE("the same batch sent on two connections at once is stored once") {
  LiveFleet fleet({.batteries_per_depot = 3, .extra_args = {}, .log_level = "warn", .database = {}});
  for (int round = 0; round < 10; ++round) {
    const json batch = batch_of("race" + std::to_string(round) + "-", fleet.serials("Harbour"), 20);
    auto send = [&] { return fleet.client("crew").post("/v1/readings", batch); };
    auto a = std::async(std::launch::async, send);
    auto b = std::async(std::launch::async, send);
    const auto ra = a.get(), rb = b.get();
    REQUIRE_MESSAGE((ra.status == 201 || ra.status == 200), ra.body);
    REQUIRE_MESSAGE((rb.status == 201 || rb.status == 200), rb.body);
    CHECK(ra.json()["stored"].get<int>() + rb.json()["stored"].get<int>() == 20);
    CHECK(readings_without_flag(ra.json()) == readings_without_flag(rb.json()));
  }
  CHECK(readings_in(fleet) == 200);
}

}  // namespace pbfleet::testing
