// Tokens (RELIABILITY-TESTS rows 10, 12, 13): a revoked token stops working
// on the very next request; raw tokens appear nowhere in the log or the
// database; bad-token guessing is throttled without locking out valid
// clients; a depot-scoped token sees objects of other depots exactly as if
// they did not exist.
#include <doctest/doctest.h>

#include <atomic>
#include <regex>
#include <thread>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;

// The reply with every occurrence of `serial` replaced, to compare bodies
// of an out-of-scope and a missing object.
std::string masked(const HttpReply& r, const std::string& serial) {
  return std::to_string(r.status) + " " + std::regex_replace(r.body, std::regex(serial), "<serial>");
}

}  // namespace

TEST_CASE("a revoked token gets 401 on the very next request, even on an open connection") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto [id, raw] = fleet.make_token("manager");
  HttpClient user = fleet.client("");
  user.set_token(raw);
  REQUIRE(user.get("/v1/batteries").status == 200);  // now cached by the daemon
  auto revoked = fleet.client("admin").send("DELETE", "/v1/tokens/" + std::to_string(id));
  REQUIRE_MESSAGE(revoked.status == 200, revoked.body);
  CHECK(revoked.json()["revoked_at"].is_string());
  CHECK(problem_mismatch(user.get("/v1/batteries"), 401, "unauthorized") == "");
  user.disconnect();
  CHECK(problem_mismatch(user.get("/v1/depots"), 401, "unauthorized") == "");
  // Still refused after a restart.
  REQUIRE(fleet.server().terminate() == 0);
  fleet.server().start();
  HttpClient later = fleet.client("");
  later.set_token(raw);
  CHECK(problem_mismatch(later.get("/v1/batteries"), 401, "unauthorized") == "");
}

TEST_CASE("raw tokens appear nowhere in the log, the database or the token list") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "trace", .database = {}});
  auto [id, doomed] = fleet.make_token("crew");
  fleet.client("admin").send("DELETE", "/v1/tokens/" + std::to_string(id));
  std::map<std::string, std::string> all = fleet.tokens();
  all["revoked"] = doomed;
  all["bad"] = std::string(64, 'f');
  for (const auto& [who, raw] : all) {
    HttpClient c = fleet.client("");
    c.set_token(raw);
    c.get("/v1/batteries");
    c.post("/v1/readings", good_reading("NY-0001", "", 0));
    c.get("/v1/batteries/NOPE-1?x=" + raw.substr(0, 8));
  }
  auto listed = fleet.client("admin").get("/v1/tokens?limit=100");
  REQUIRE(listed.status == 200);
  CHECK(fleet.server().terminate() == 0);  // flush the log and checkpoint the WAL
  for (const auto& [who, raw] : all) {
    CAPTURE(who);
    CHECK(count_in_file(fleet.dir() / "pbfleetd.log", raw) == 0);
    CHECK(count_in_file(fleet.db(), raw) == 0);
    CHECK(count_in_file(fleet.db().string() + "-wal", raw) == 0);
    CHECK(listed.body.find(raw) == std::string::npos);
  }
  // The log did record the requests (the check above looked at real text).
  CHECK(count_in_file(fleet.dir() / "pbfleetd.log", "route=/v1/batteries") >= all.size());
}

TEST_CASE("a thousand bad tokens from one address within a minute get 429 after the first 20 while valid clients carry on") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  std::atomic<bool> guessing{true};
  std::atomic<int> valid_ok{0}, valid_other{0};
  std::thread valid([&] {  // a valid client on another address throughout
    auto crew = fleet.client("crew");
    while (guessing) {
      (crew.get("/v1/batteries").status == 200 ? valid_ok : valid_other)++;
    }
  });
  HttpClient guesser = fleet.client("");
  guesser.set_source_address("127.0.0.77");
  int unauthorized = 0, throttled = 0, other = 0;
  const auto start = std::chrono::steady_clock::now();
  for (int i = 0; i < 1000; ++i) {
    guesser.set_token("guess-" + std::to_string(i) + std::string(50, 'x'));
    const int status = guesser.get("/v1/batteries").status;
    unauthorized += status == 401;
    throttled += status == 429;
    other += status != 401 && status != 429;
    // The 401s come first, then only 429s for the rest of the window.
    if (i < 20) CHECK(status == 401);
  }
  const auto took = std::chrono::steady_clock::now() - start;
  guessing = false;
  valid.join();
  MESSAGE(unauthorized << " answered 401, " << throttled << " answered 429 in "
                       << std::chrono::duration_cast<std::chrono::milliseconds>(took).count()
                       << " ms; the valid client got " << valid_ok.load() << " x 200");
  REQUIRE(took < std::chrono::seconds{60});  // all within one throttle window
  CHECK(unauthorized == 20);  // AuthLimits::failures_per_window, documented in CONTRACT.md
  CHECK(throttled == 980);
  CHECK(other == 0);
  auto last = guesser.get("/v1/batteries");
  CHECK(problem_mismatch(last, 429, "too-many-requests") == "");
  CHECK(valid_other == 0);
  CHECK(valid_ok > 0);

  // A valid client on another address is not affected...
  CHECK(fleet.client("crew").get("/v1/batteries").status == 200);
  // ...nor one with a valid token behind the same address (a shared NAT).
  HttpClient neighbour = fleet.client("crew");
  neighbour.set_source_address("127.0.0.77");
  CHECK(neighbour.get("/v1/batteries").status == 200);
}

TEST_CASE("a depot-scoped token sees other depots' objects exactly as missing ones") {
  LiveFleet fleet({.batteries_per_depot = 2, .extra_args = {}, .log_level = "warn", .database = {}});
  auto crew = fleet.client("crew_north");
  auto tech = fleet.client("technician_north");
  const std::string theirs = "HB-0001", missing = "ZZ-0404";

  // Reading for another depot's battery: same answer as for no battery.
  auto other = crew.post("/v1/readings", good_reading(theirs, "bola-1", 0));
  auto none = crew.post("/v1/readings", good_reading(missing, "bola-2", 0));
  CHECK(problem_mismatch(other, 422, "validation-failed", "/serial") == "");
  CHECK(masked(other, theirs) == masked(none, missing));

  for (const std::string suffix : {"", "/history"}) {
    CAPTURE(suffix);
    auto a = tech.get("/v1/batteries/" + theirs + suffix);
    auto b = tech.get("/v1/batteries/" + missing + suffix);
    CHECK(problem_mismatch(a, 404, "not-found") == "");
    CHECK(masked(a, theirs) == masked(b, missing));
  }
  auto listed_a = tech.get("/v1/readings?serial=" + theirs);
  auto listed_b = tech.get("/v1/readings?serial=" + missing);
  CHECK(problem_mismatch(listed_a, 404, "not-found") == "");
  CHECK(masked(listed_a, theirs) == masked(listed_b, missing));

  const auto harbour_truck = std::to_string(fleet.vehicle_id("TR-201"));
  auto vehicle_a = tech.get("/v1/vehicles/" + harbour_truck);
  auto vehicle_b = tech.get("/v1/vehicles/999999");
  CHECK(problem_mismatch(vehicle_a, 404, "not-found") == "");
  CHECK(std::regex_replace(vehicle_a.body, std::regex(harbour_truck), "<id>") ==
        std::regex_replace(vehicle_b.body, std::regex("999999"), "<id>"));
  const auto harbour = std::to_string(fleet.depot_id("Harbour"));
  auto depot_a = tech.get("/v1/depots/" + harbour);
  auto depot_b = tech.get("/v1/depots/999999");
  CHECK(problem_mismatch(depot_a, 404, "not-found") == "");
  CHECK(std::regex_replace(depot_a.body, std::regex(harbour), "<id>") ==
        std::regex_replace(depot_b.body, std::regex("999999"), "<id>"));

  // Fitting an own battery into another depot's vehicle: as a missing vehicle.
  auto fit_a = tech.post("/v1/batteries/NY-0001/fit", {{"vehicle_id", fleet.vehicle_id("TR-201")}});
  auto fit_b = tech.post("/v1/batteries/NY-0001/fit", {{"vehicle_id", 999999}});
  CHECK(problem_mismatch(fit_a, 422, "validation-failed", "/vehicle_id") == "");
  CHECK(fit_a.body == fit_b.body);

  // Lists hold only the token's depot.
  auto batteries = tech.get("/v1/batteries?limit=100");
  REQUIRE(batteries.status == 200);
  const auto listed = batteries.json();  // a local: the loop must not walk a temporary's member
  for (const auto& b : listed["items"]) CHECK(b["serial"].get<std::string>().rfind("NY-", 0) == 0);
  CHECK(listed["items"].size() == 2);

  SqliteProbe db(fleet.db());
  CHECK(db.integer("SELECT count(*) FROM readings") == 0);
  CHECK(db.integer("SELECT count(*) FROM batteries b JOIN vehicles v ON v.id = b.vehicle_id "
                   "WHERE b.serial = 'NY-0001' AND v.code = 'TR-101'") == 1);
}

}  // namespace pbfleet::testing
