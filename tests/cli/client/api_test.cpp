#include "cli/client/api.hpp"

#include <doctest/doctest.h>

#include "tests/cli/fake_server.hpp"

using namespace pbfleet::cli;
using namespace pbfleet::cli::client;

TEST_CASE("query values are percent-encoded and empty ones left out") {
  CHECK(with_query("/v1/reports/winter", {{"low_c", "-25.00"}, {"depot_id", ""}, {"on", "2026-12-20"}}) ==
        "/v1/reports/winter?low_c=-25.00&on=2026-12-20");
  CHECK(url_encode("North Yard/ø&=") == "North%20Yard%2F%C3%B8%26%3D");
  CHECK(with_query("/v1/depots", {}) == "/v1/depots");
}

TEST_CASE("every request carries the bearer token, JSON bodies are sent as JSON") {
  testing::FakeServer server([](const HttpRequest&) { return testing::json_response(201, R"({"id":1})"); });
  Api api(server.transport(), "tok");
  auto reply = api.post("/v1/depots", Json{{"name", "Harbour"}});
  REQUIRE(reply.ok);
  CHECK(reply.json["id"] == 1);
  REQUIRE(server.requests.size() == 1);
  CHECK(server.requests[0].bearer_token == "tok");
  CHECK(server.requests[0].method == "POST");
  CHECK(server.requests[0].content_type == "application/json");
  CHECK(Json::parse(server.requests[0].body)["name"] == "Harbour");
}

TEST_CASE("a refusal is parsed into a problem, garbage JSON on success is an error") {
  testing::FakeServer refuse([](const HttpRequest&) {
    return testing::json_response(404, R"({"type":"https://pbfleet.invalid/problems/not-found","title":"Not found","status":404})");
  });
  auto r = Api(refuse.transport(), "").get("/v1/batteries/X");
  CHECK_FALSE(r.ok);
  REQUIRE(r.problem.has_value());
  CHECK(r.problem->slug == "not-found");

  testing::FakeServer garbage([](const HttpRequest&) { return testing::json_response(200, "{not json"); });
  auto g = Api(garbage.transport(), "").get("/v1/depots");
  CHECK_FALSE(g.ok);
  CHECK_FALSE(g.transport_error.empty());
}
