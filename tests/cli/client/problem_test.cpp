#include "cli/client/problem.hpp"

#include <doctest/doctest.h>

using namespace pbfleet::cli::client;

TEST_CASE("problem+json: slug, title, detail and every field error with its row") {
  auto p = parse_problem(422, R"({"type":"https://pbfleet.invalid/problems/validation-failed","title":"Validation failed",
    "status":422,"detail":"2 readings rejected","errors":[
    {"field":"/0/cell_sg/3","detail":"1.452 is above the range","allowed":"1.000 to 1.400","row":4},
    {"field":"taken_at","detail":"in the future"}]})");
  CHECK(p.status == 422);
  CHECK(p.slug == "validation-failed");
  REQUIRE(p.errors.size() == 2);
  CHECK(p.errors[0].row == 4);
  CHECK_FALSE(p.errors[1].row.has_value());
  CHECK(is_data_rejection(p));
}

TEST_CASE("rendered problem: one line per field, rows shifted to file rows, allowed range shown") {
  auto p = parse_problem(422, R"({"title":"Validation failed","status":422,"detail":"1 reading rejected",
    "errors":[{"field":"cell_sg[3]","detail":"1.452 is above the range","allowed":"1.000 to 1.400","row":2}]})");
  CHECK(render_problem(p, 500) ==
        "error: server answered 422 Validation failed: 1 reading rejected\n"
        "  row 502  cell_sg[3]: 1.452 is above the range (allowed: 1.000 to 1.400)\n");
}

TEST_CASE("a body that is not problem JSON still gives the status and its first line") {
  auto p = parse_problem(502, "<html>Bad gateway</html>\nmore");
  CHECK(p.status == 502);
  CHECK(p.detail == "<html>Bad gateway</html>");
  CHECK_FALSE(is_data_rejection(p));
  CHECK(render_problem(p) == "error: server answered 502: <html>Bad gateway</html>\n");
}

TEST_CASE("conflicts are data rejections, auth and server failures are not") {
  CHECK(is_data_rejection(parse_problem(409, "{}")));
  CHECK_FALSE(is_data_rejection(parse_problem(401, "{}")));
  CHECK_FALSE(is_data_rejection(parse_problem(503, "{}")));
}
