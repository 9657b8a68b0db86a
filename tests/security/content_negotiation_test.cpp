// Content negotiation over a real socket: an Accept header that admits
// none of the types a route answers with gets 406 problem+json (decided
// once, in dispatch, from the route table), and nothing is done.
#include <doctest/doctest.h>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {

TEST_CASE("a request whose Accept excludes JSON and the route's other types gets 406 and changes nothing") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto crew = fleet.client("crew");
  auto refused = crew.send("POST", "/v1/readings",
                           good_reading(fleet.serials("North Yard")[0], "neg-1", 1).dump(),
                           "application/json", {{"Accept", "text/html"}});
  CHECK(problem_mismatch(refused, 406, "not-acceptable") == "");
  CHECK(refused.header("content-type").find("application/problem+json") != std::string::npos);
  SqliteProbe db(fleet.db());
  CHECK(db.integer("SELECT count(*) FROM readings WHERE reading_id = 'neg-1'") == 0);

  auto manager = fleet.client("manager");
  CHECK(manager.send("GET", "/v1/reports/winter", {}, "application/json", {{"Accept", "text/csv"}}).status == 200);
  CHECK(problem_mismatch(manager.send("GET", "/v1/reports/winter", {}, "application/json", {{"Accept", "application/pdf"}}),
                         406, "not-acceptable") == "");
  CHECK(manager.send("GET", "/v1/depots", {}, "application/json", {{"Accept", "text/html, */*;q=0.1"}}).status == 200);
  CHECK(manager.send("GET", "/v1/depots", {}, "application/json", {{"Accept", "application/json;q=0"}}).status == 406);
}

}  // namespace pbfleet::testing
