#include "cli/commands/history.hpp"

#include <cmath>

#include <doctest/doctest.h>

#include "tests/cli/fake_server.hpp"

using namespace pbfleet::cli;
using client::Json;

namespace {

const char* kHistory = R"({"battery":{"serial":"NB-2023-0001","chemistry":"flooded","rated_cca_a":800,"installed_on":"2023-10-02","status":"in_service"},
 "readings":[
  {"taken_at":"2026-10-05T07:15:00Z","ocv_v":12.62,"rest_h":14,"cell_sg":[1.262,1.266],"electrolyte_temp_c":10.000000000000002,"electrolyte_temp_unit":"F",
   "derived":{"corrected_sg":1.254,"soc_percent":88.0,"soc_uncertainty_percent":4,"cell_spread":0.004,"weak_cell":null,"flags":[]}},
  {"taken_at":"2026-11-02T07:10:00Z","ocv_v":12.48,"rest_h":2,"electrolyte_temp_c":2,"electrolyte_temp_unit":"C",
   "derived":{"soc_percent":71.0,"soc_uncertainty_percent":12,"flags":["ocv_unsettled"]}},
  {"taken_at":"2026-11-30T07:20:00Z","cell_sg":[1.220,1.225],"electrolyte_temp_c":-2.7777777777777777,"electrolyte_temp_unit":"F",
   "derived":{"corrected_sg":1.208,"soc_percent":62.0,"soc_uncertainty_percent":4,"flags":["low_soc"]}}],
 "events":[{"at":"2026-11-02T12:00:00Z","kind":"charged","detail":"bench charger"}]})";

}  // namespace

TEST_CASE("history rows keep the temperature as entered and average the raw cells") {
  auto rows = history_rows(Json::parse(kHistory));
  REQUIRE(rows.size() == 3);
  CHECK(rows[0]["temp"] == "50F");
  CHECK(rows[1]["temp"] == "2C");
  CHECK(rows[2]["temp"] == "27F");  // kept as -2.777...C
  CHECK(rows[0]["raw_sg"].get<double>() == doctest::Approx(1.264));
  CHECK(rows[1]["raw_sg"].is_null());
  CHECK(rows[2]["flags"][0] == "low_soc");
}

TEST_CASE("chart series: SOC on 0-100, SG axis around the data, flags marked, missing values empty") {
  auto rows = history_rows(Json::parse(kHistory));
  auto soc = soc_series(rows);
  CHECK(soc.lo == 0);
  CHECK(soc.hi == 100);
  CHECK(soc.values == std::vector<double>{88.0, 71.0, 62.0});
  CHECK(soc.flagged == std::vector<bool>{false, true, true});
  CHECK(soc.first_label == "2026-10-05");
  CHECK(soc.last_label == "2026-11-30");
  auto sg = sg_series(rows);
  CHECK(std::isnan(sg.values[1]));
  CHECK(sg.lo == doctest::Approx(1.200));
  CHECK(sg.hi == doctest::Approx(1.260));
  CHECK(sg.decimals == 3);
}

TEST_CASE("a bare --to date runs to the last second of that day, a full time goes as given") {
  testing::FakeServer server([](const client::HttpRequest&) { return testing::json_response(200, kHistory); });
  testing::Terminal term;
  REQUIRE(term.run({"history", "NB-1", "--ascii", "--from", "2026-10-01T06:30:00Z", "--to", "2026-11-30"},
                   {server.transport(), nullptr}) == 0);
  CHECK(server.requests.at(0).target ==
        "/v1/batteries/NB-1/history?from=2026-10-01T06%3A30%3A00Z&to=2026-11-30T23%3A59%3A59Z");
}

TEST_CASE("history prints the table, both charts and the events, --ascii keeps it plain") {
  testing::FakeServer server([](const client::HttpRequest&) { return testing::json_response(200, kHistory); });
  testing::Terminal term;
  REQUIRE(term.run({"history", "NB 2023/1", "--ascii", "--from", "2026-10-01"}, {server.transport(), nullptr}) == 0);
  // A bare date is the whole day in UTC: from its first second.
  CHECK(server.requests.at(0).target ==
        "/v1/batteries/NB%202023%2F1/history?from=2026-10-01T00%3A00%3A00Z");
  auto out = term.out.str();
  CHECK(out.find("NB-2023-0001  flooded, 800 A CCA, installed 2023-10-02, in_service") == 0);
  CHECK(out.find("2026-11-02 07:10") != std::string::npos);
  CHECK(out.find("State of charge (%)") != std::string::npos);
  CHECK(out.find("Corrected SG") != std::string::npos);
  CHECK(out.find("^ = flagged reading") != std::string::npos);
  CHECK(out.find("charged") != std::string::npos);
  for (unsigned char c : out) CHECK(c < 0x80);
}

TEST_CASE("history --csv gives one row per reading with machine column names") {
  testing::FakeServer server([](const client::HttpRequest&) { return testing::json_response(200, kHistory); });
  testing::Terminal term;
  REQUIRE(term.run({"history", "NB-2023-0001", "--csv"}, {server.transport(), nullptr}) == 0);
  auto csv = term.out.str();
  CHECK(csv.rfind("taken_at,ocv_v,rest_h,temp,raw_sg,corrected_sg,soc_percent,", 0) == 0);
  CHECK(std::count(csv.begin(), csv.end(), '\n') == 4);
  CHECK(csv.find("ocv_unsettled") != std::string::npos);
}

TEST_CASE("an unknown serial is the server's 404, exit 1") {
  testing::FakeServer server([](const client::HttpRequest&) {
    return testing::json_response(404, R"({"title":"Not found","status":404,"detail":"no battery NB-X"})");
  });
  testing::Terminal term;
  CHECK(term.run({"history", "NB-X"}, {server.transport(), nullptr}) == kExitFailure);
  CHECK(term.err.str().find("no battery NB-X") != std::string::npos);
}
