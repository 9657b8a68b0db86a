#include "server/api/problem.hpp"

#include <doctest/doctest.h>

#include <nlohmann/json.hpp>

namespace pbfleet::api {

TEST_CASE("a problem is RFC 9457 JSON with a stable type, title, status and detail") {
  auto r = problem(ProblemKind::not_found, "no battery with serial 'X'");
  CHECK(r.status == 404);
  CHECK(r.content_type == "application/problem+json");
  auto body = nlohmann::json::parse(r.body);
  CHECK(body["type"] == "https://pbfleet.invalid/problems/not-found");
  CHECK(body["title"] == "Not found");
  CHECK(body["status"] == 404);
  CHECK(body["detail"] == "no battery with serial 'X'");
  CHECK_FALSE(body.contains("errors"));
}

TEST_CASE("validation problems list each field with its allowed range and row") {
  auto r = problem(ProblemKind::validation_failed, "2 fields",
                   {{"/0/cell_sg/2", "too high", "1.000 to 1.400", std::nullopt},
                    {"ocv_v", "too low", "0.00 to 15.00 V", 4}});
  auto body = nlohmann::json::parse(r.body);
  CHECK(r.status == 422);
  REQUIRE(body["errors"].size() == 2);
  CHECK(body["errors"][0]["field"] == "/0/cell_sg/2");
  CHECK(body["errors"][0]["allowed"] == "1.000 to 1.400");
  CHECK_FALSE(body["errors"][0].contains("row"));
  CHECK(body["errors"][1]["row"] == 4);
}

TEST_CASE("status codes and slugs of the problem kinds are fixed") {
  CHECK(status_of(ProblemKind::unknown_field) == 422);
  CHECK(slug_of(ProblemKind::unknown_field) == "unknown-field");
  CHECK(status_of(ProblemKind::payload_too_large) == 413);
  CHECK(status_of(ProblemKind::unauthorized) == 401);
  CHECK(status_of(ProblemKind::forbidden) == 403);
  CHECK(status_of(ProblemKind::conflict) == 409);
  CHECK(status_of(ProblemKind::storage_unavailable) == 503);
  CHECK(kind_for_status(413) == ProblemKind::payload_too_large);
  CHECK(kind_for_status(431) == ProblemKind::header_too_large);
}

TEST_CASE("a 401 asks for a bearer token") {
  auto r = problem(ProblemKind::unauthorized, "no token");
  bool found = false;
  for (const auto& [name, value] : r.headers) found = found || (name == "WWW-Authenticate" && value == "Bearer");
  CHECK(found);
}

TEST_CASE("invalid UTF-8 in a detail is replaced, not thrown") {
  auto r = problem(ProblemKind::malformed_body, std::string("bad \xff byte"));
  CHECK(nlohmann::json::parse(r.body)["detail"].get<std::string>().find("bad") == 0);
}

}  // namespace pbfleet::api
