#include "server/api/auth.hpp"

#include <doctest/doctest.h>

#include "server/api/router.hpp"
#include "tests/api/fixture.hpp"

namespace pbfleet::api {

using testing::ApiFixture;
using testing::slug_of;

namespace {

// A concrete path for a route pattern (ids that do not exist, so no
// request of the matrix changes the fixture).
std::string concrete(std::string_view pattern) {
  std::string out(pattern);
  for (auto [name, value] : {std::pair{"{serial}", "NY-0001"}, std::pair{"{id}", "999999"}}) {
    auto at = out.find(name);
    if (at != std::string::npos) out.replace(at, std::string_view(name).size(), value);
  }
  return out;
}

}  // namespace

TEST_CASE("every route x role cell answers as the route table documents") {
  ApiFixture f;
  const std::vector<std::pair<std::string, storage::Role>> roles{
      {"crew", storage::Role::crew},
      {"technician", storage::Role::technician},
      {"manager", storage::Role::manager},
      {"admin", storage::Role::admin}};
  int cells = 0;
  for (const auto& route : routes()) {
    const std::string path = concrete(route.pattern);
    if (route.roles == kPublic) {
      auto r = f.call(std::string(route.method), path, "");
      INFO(route.method << " " << path << " without a token: " << r.body);
      CHECK(r.status != 401);
      CHECK(r.status != 403);
      ++cells;
      continue;
    }
    auto none = f.call(std::string(route.method), path, "");
    INFO(route.method << " " << path);
    CHECK(none.status == 401);
    CHECK(slug_of(none) == "unauthorized");
    ++cells;
    for (const auto& [who, role] : roles) {
      // An empty JSON object: enough to get past the role check, never a
      // valid create, so nothing in the fixture changes.
      auto r = f.call(std::string(route.method), path, who,
                      route.method == "GET" || route.method == "DELETE" ? "" : "{\"x\":1}");
      INFO(who << " -> " << r.status << " " << r.body);
      const bool allowed = (route.roles & role_bit(role)) != 0;
      if (allowed) {
        CHECK(r.status != 401);
        CHECK(r.status != 403);
      } else {
        CHECK(r.status == 403);
        CHECK(slug_of(r) == "forbidden");
      }
      ++cells;
    }
  }
  CHECK(cells == static_cast<int>(4 + (routes().size() - 4) * 5));
}

TEST_CASE("an unknown token answers 401") {
  ApiFixture f;
  http::Request r;
  r.method = "GET";
  r.target = "/v1/depots";
  r.headers["authorization"] = "Bearer " + std::string(64, 'a');
  auto response = f.api().handle(r);
  CHECK(response.status == 401);
  CHECK(slug_of(response) == "unauthorized");
}

TEST_CASE("a malformed authorization header answers 401") {
  ApiFixture f;
  for (const char* value : {"Basic abc", "Bearer", "Bearer ", "token"}) {
    http::Request r;
    r.method = "GET";
    r.target = "/v1/depots";
    r.headers["authorization"] = value;
    CHECK(f.api().handle(r).status == 401);
  }
}

TEST_CASE("a revoked token answers 401 on the very next request") {
  ApiFixture f;
  CHECK(f.get("/v1/depots", "crew").status == 200);  // now cached
  auto revoked = f.call("DELETE", "/v1/tokens/" + std::to_string(f.token_id("crew")), "admin");
  REQUIRE(revoked.status == 200);
  CHECK(testing::body_of(revoked)["revoked_at"].is_string());
  auto after = f.get("/v1/depots", "crew");
  CHECK(after.status == 401);
  CHECK(testing::body_of(after)["detail"] == "token revoked");
}

TEST_CASE("repeated bad tokens from one address are throttled with 429") {
  ApiFixture f;
  http::Request r;
  r.method = "GET";
  r.target = "/v1/depots";
  r.peer = "127.0.0.9:1234";
  r.headers["authorization"] = "Bearer " + std::string(64, 'b');
  const int threshold = AuthLimits{}.failures_per_window;
  for (int i = 0; i < threshold; ++i) REQUIRE(f.api().handle(r).status == 401);
  auto throttled = f.api().handle(r);
  CHECK(throttled.status == 429);
  CHECK(slug_of(throttled) == "too-many-requests");
  // Another address with a valid token is unaffected.
  CHECK(f.get("/v1/depots", "crew").status == 200);
}

TEST_CASE("created tokens are shown once and listed without the token text") {
  ApiFixture f;
  auto made = f.post("/v1/tokens", {{"name", "bay 3"}, {"role", "technician"}});
  REQUIRE(made.status == 201);
  const std::string raw = testing::body_of(made)["token"];
  CHECK(raw.size() == 64);
  auto list = f.get("/v1/tokens");
  REQUIRE(list.status == 200);
  CHECK(list.body.find(raw) == std::string::npos);
  CHECK(list.body.find("bay 3") != std::string::npos);
}

TEST_CASE("peer_address drops the port") {
  CHECK(peer_address("127.0.0.1:5000") == "127.0.0.1");
  CHECK(peer_address("::1:5000") == "::1");
}

}  // namespace pbfleet::api

namespace pbfleet::api {

TEST_CASE("a token made with expires_in_days works until then and answers 401 'expired' after") {
  testing::ApiFixture f;
  auto made = f.post("/v1/tokens", {{"name", "night shift"}, {"role", "crew"}, {"expires_in_days", 7}});
  REQUIRE(made.status == 201);
  const auto body = testing::body_of(made);
  CHECK(body["expires_at"] == "2026-01-17T12:00:00Z");  // test_now() + 7 days
  const std::string raw = body["token"];

  auto as_shift = [&] {
    http::Request r;
    r.method = "GET";
    r.target = "/v1/depots";
    r.peer = "127.0.0.9:5000";
    r.headers["authorization"] = "Bearer " + raw;
    return f.api().handle(r);
  };
  CHECK(as_shift().status == 200);  // now cached by the authenticator
  f.clock().at = testing::test_now() + std::chrono::days{7} - std::chrono::seconds{1};
  CHECK(as_shift().status == 200);
  f.clock().at = testing::test_now() + std::chrono::days{7};
  const auto refused = as_shift();
  CHECK(refused.status == 401);
  CHECK(slug_of(refused) == "unauthorized");
  CHECK(testing::body_of(refused)["detail"].get<std::string>().find("expired") != std::string::npos);
  CHECK(refused.body.find(raw) == std::string::npos);

  auto listed = testing::body_of(f.get("/v1/tokens?limit=1000"));
  int with_expiry = 0;
  for (const auto& t : listed["items"]) {
    REQUIRE(t.contains("expires_at"));
    with_expiry += t["expires_at"].is_string();
  }
  CHECK(with_expiry == 1);
}

TEST_CASE("expires_in_days outside 1..3650 or not a whole number is a 422 naming the field and range") {
  testing::ApiFixture f;
  for (const nlohmann::json& days : {nlohmann::json(0), nlohmann::json(3651), nlohmann::json(-5),
                                     nlohmann::json(1.5), nlohmann::json("30")}) {
    CAPTURE(days.dump());
    auto r = f.post("/v1/tokens", {{"name", "x"}, {"role", "crew"}, {"expires_in_days", days}});
    CHECK(r.status == 422);
    CHECK(slug_of(r) == "validation-failed");
    const auto errors = testing::body_of(r)["errors"];
    REQUIRE(errors.size() == 1);
    CHECK(errors[0]["field"] == "/expires_in_days");
    CHECK(errors[0]["allowed"] == "1 to 3650");
  }
  const auto listed = testing::body_of(f.get("/v1/tokens?limit=1000"))["items"];
  for (const auto& t : listed) CHECK(t["name"] != "x");
  CHECK(f.post("/v1/tokens", {{"name", "y"}, {"role", "crew"}, {"expires_in_days", 3650}}).status == 201);
}

}  // namespace pbfleet::api

namespace pbfleet::api {

TEST_CASE("an Accept header excluding every type a route produces gets 406 problem+json") {
  testing::ApiFixture f;
  auto with_accept = [&](const std::string& target, const std::string& accept) {
    http::Request r;
    r.method = "GET";
    r.target = target;
    r.headers["authorization"] = "Bearer " + f.token("manager");
    r.headers["accept"] = accept;
    return f.api().handle(r);
  };
  const auto refused = with_accept("/v1/depots", "text/html");
  CHECK(refused.status == 406);
  CHECK(slug_of(refused) == "not-acceptable");
  CHECK(refused.content_type == "application/problem+json");
  CHECK(with_accept("/v1/depots", "text/csv").status == 406);
  CHECK(with_accept("/v1/depots", "application/json").status == 200);
  CHECK(with_accept("/v1/depots", "*/*").status == 200);
  CHECK(with_accept("/v1/reports/overdue", "text/csv").status == 200);
  CHECK(with_accept("/v1/reports/overdue", "image/png").status == 406);
  CHECK(with_accept("/metrics", "text/plain").status == 200);
  CHECK(with_accept("/metrics", "application/xml").status == 406);
}

}  // namespace pbfleet::api
