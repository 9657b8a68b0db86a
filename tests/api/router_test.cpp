#include "server/api/router.hpp"

#include <doctest/doctest.h>

#include <set>

namespace pbfleet::api {

TEST_CASE("a literal path matches its route and no other") {
  auto m = match_route(routes(), "GET", "/v1/depots");
  REQUIRE(m.route != nullptr);
  CHECK(m.route->pattern == "/v1/depots");
  CHECK(m.params.empty());
}

TEST_CASE("a path parameter is captured by name") {
  auto m = match_route(routes(), "GET", "/v1/batteries/NY-0001/history");
  REQUIRE(m.route != nullptr);
  CHECK(m.route->pattern == "/v1/batteries/{serial}/history");
  CHECK(m.params.at("serial") == "NY-0001");
}

TEST_CASE("a known path with another method lists the allowed methods") {
  auto m = match_route(routes(), "DELETE", "/v1/depots");
  CHECK(m.route == nullptr);
  std::set<std::string_view> allowed(m.allowed.begin(), m.allowed.end());
  CHECK(allowed == std::set<std::string_view>{"GET", "POST"});
}

TEST_CASE("an unknown path matches nothing and allows nothing") {
  auto m = match_route(routes(), "GET", "/v1/nothing/here");
  CHECK(m.route == nullptr);
  CHECK(m.allowed.empty());
}

TEST_CASE("every route is unique by method and pattern") {
  std::set<std::pair<std::string_view, std::string_view>> seen;
  for (const auto& r : routes()) CHECK(seen.insert({r.method, r.pattern}).second);
}

TEST_CASE("every route has exactly one handler") {
  for (const auto& r : routes()) {
    INFO(r.method << " " << r.pattern);
    CHECK((r.sync == nullptr) != (r.async == nullptr));
  }
}

}  // namespace pbfleet::api

namespace pbfleet::api {

TEST_CASE("an Accept header admits a route when any of its ranges matches a produced type") {
  const std::string_view json = "application/json";
  const std::string_view reports = "application/json,text/csv";
  CHECK(accepts("", json));
  CHECK(accepts("*/*", json));
  CHECK(accepts("application/*", json));
  CHECK(accepts("text/html, application/json;q=0.9", json));
  CHECK(accepts("Application/JSON", json));
  CHECK(accepts("text/csv", reports));
  CHECK(accepts("text/*", reports));
  CHECK_FALSE(accepts("text/csv", json));
  CHECK_FALSE(accepts("text/html", reports));
  CHECK_FALSE(accepts("image/*, text/html", json));
  CHECK_FALSE(accepts("application/json;q=0", json));
  CHECK_FALSE(accepts("application/json; q=0.0, text/html", json));
  CHECK(accepts("application/json; q=0.01", json));
  CHECK_FALSE(accepts("application/jsonx", json));
}

TEST_CASE("only the reports and /metrics produce more than JSON") {
  std::set<std::string_view> other;
  for (const auto& route : routes())
    if (produced_types(route) != "application/json") other.insert(route.pattern);
  CHECK(other == std::set<std::string_view>{"/metrics", "/v1/reports/winter", "/v1/reports/sulfation",
                                            "/v1/reports/replacements", "/v1/reports/overdue"});
}

}  // namespace pbfleet::api
