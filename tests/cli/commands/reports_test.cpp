// The report commands against a fake server: the request they make, and
// text, JSON and CSV output.
#include <doctest/doctest.h>

#include "cli/commands/context.hpp"
#include "tests/cli/fake_server.hpp"

using namespace pbfleet::cli;
using client::HttpRequest;
using client::Json;

namespace {

const char* kWinter = R"({"cold_date":"2026-12-20","batteries":[
  {"serial":"NB-2023-0001","depot_name":"North Yard","vehicle_code":"TR-104","level":"act_now","low_c":-25.0,
   "projected_soc_percent":48.2,"crank_margin":0.81,"freeze_margin_c":3.5,"action":"Recharge before the cold",
   "reasons":["SOC 48 % at the low"],"cautions":["Charging gives off hydrogen."]},
  {"serial":"NB-2023-0002","depot_name":"Harbour","vehicle_code":"VAN-12","level":"ok","low_c":-12.0,
   "projected_soc_percent":92.0,"crank_margin":1.9,"freeze_margin_c":48.0,"action":"","reasons":[],"cautions":[]}],
  "depots":[{"depot_name":"Harbour","low_c":-12.0,"batteries":1,"act_now":0,"watch":0,"no_data":0,"ok":1,"expected_replacements":0}]})";

testing::FakeServer winter_server() {
  return testing::FakeServer([](const HttpRequest& r) {
    if (r.accept == "text/csv") return client::HttpResponse{200, "text/csv", "serial,level\r\nNB-2023-0001,act_now\r\n"};
    return testing::json_response(200, kWinter);
  });
}

}  // namespace

TEST_CASE("winter --low in Fahrenheit asks the server in Celsius") {
  auto server = winter_server();
  testing::Terminal term;
  REQUIRE(term.run({"winter", "--low", "-13F", "--depot", "2", "--json"}, {server.transport(), nullptr}) == 0);
  REQUIRE(server.requests.size() == 1);
  CHECK(server.requests[0].target == "/v1/reports/winter?low_c=-25.00&depot_id=2");
  CHECK(Json::parse(term.out.str())["batteries"].size() == 2);
}

TEST_CASE("winter text: ranked table, depot summary, and the safety caution once") {
  auto server = winter_server();
  testing::Terminal term;
  REQUIRE(term.run({"winter"}, {server.transport(), nullptr}) == 0);
  auto out = term.out.str();
  CHECK(out.find("cold date: 2026-12-20") != std::string::npos);
  CHECK(out.find("NB-2023-0001  North Yard") != std::string::npos);
  CHECK(out.find("act_now") < out.find("NB-2023-0002"));
  CHECK(out.find("By depot") != std::string::npos);
  CHECK(out.find("Safety: Charging gives off hydrogen.") != std::string::npos);
  CHECK(out.find('\x1b') == std::string::npos);  // not a terminal: no colour
}

TEST_CASE("winter text on a terminal is coloured unless NO_COLOR is set") {
  auto server = winter_server();
  testing::Terminal tty("", /*tty=*/true);
  REQUIRE(tty.run({"winter"}, {server.transport(), nullptr}) == 0);
  CHECK(tty.out.str().find("\x1b[1;31mact_now") != std::string::npos);
  testing::Terminal no_color("", true);
  no_color.io.env["NO_COLOR"] = "";
  REQUIRE(no_color.run({"winter"}, {server.transport(), nullptr}) == 0);
  CHECK(no_color.out.str().find('\x1b') == std::string::npos);
}

TEST_CASE("report --csv asks the server for CSV and passes it through") {
  auto server = winter_server();
  testing::Terminal term;
  REQUIRE(term.run({"winter", "--csv"}, {server.transport(), nullptr}) == 0);
  CHECK(server.requests.at(0).accept == "text/csv");
  CHECK(term.out.str() == "serial,level\r\nNB-2023-0001,act_now\r\n");
}

TEST_CASE("--json and --csv together are a usage error") {
  testing::Terminal term;
  CHECK(term.run({"sulfation", "--json", "--csv"}) == kExitUsage);
}

TEST_CASE("overdue, sulfation and replacements call their routes with their filters") {
  testing::FakeServer server([](const HttpRequest&) { return testing::json_response(200, R"({"items":[]})"); });
  for (auto [args, target] : std::vector<std::pair<std::vector<std::string>, std::string>>{
           {{"overdue", "--days", "8"}, "/v1/reports/overdue?days=8"},
           {{"overdue"}, "/v1/reports/overdue?days=10"},
           {{"sulfation", "--depot", "3"}, "/v1/reports/sulfation?depot_id=3"},
           {{"replacements"}, "/v1/reports/replacements"}}) {
    testing::Terminal term;
    server.requests.clear();
    REQUIRE(term.run(args, {server.transport(), nullptr}) == 0);
    CHECK(server.requests.at(0).target == target);
    CHECK(term.out.str().find("(none)") != std::string::npos);
  }
}

TEST_CASE("a server refusal exits 1 with the problem on stderr, auth failures get a hint") {
  testing::FakeServer server([](const HttpRequest&) {
    return testing::json_response(401, R"({"type":"https://pbfleet.invalid/problems/unauthorized","title":"Unauthorized","status":401})");
  });
  testing::Terminal term;
  CHECK(term.run({"winter"}, {server.transport(), nullptr}) == kExitFailure);
  CHECK(term.out.str().empty());
  CHECK(term.err.str().find("401 Unauthorized") != std::string::npos);
  CHECK(term.err.str().find("hint: check the token") != std::string::npos);
}
