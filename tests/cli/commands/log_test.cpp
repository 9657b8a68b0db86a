#include "cli/commands/log.hpp"

#include <doctest/doctest.h>

#include "tests/cli/fake_server.hpp"

using namespace pbfleet::cli;
using client::HttpRequest;
using client::Json;

namespace {

// Stores whatever comes and answers with derived values like pbfleetd.
testing::FakeServer store_server(const char* flags = R"(["ocv_unsettled"])", bool settled = false) {
  return testing::FakeServer([=](const HttpRequest& r) {
    auto sent = Json::parse(r.body);
    Json derived{{"corrected_sg", 1.241}, {"soc_percent", 81.0}, {"soc_uncertainty_percent", 4.0},
                 {"ocv_settled", settled}, {"flags", Json::parse(flags)}};
    Json reading{{"reading_id", sent["reading_id"]}, {"serial", sent["serial"]}, {"derived", derived}};
    return testing::json_response(201, Json{{"stored", 1}, {"replayed", 0}, {"readings", Json::array({reading})}}.dump());
  });
}

using testing::seams;

}  // namespace

TEST_CASE("log from flags sends one reading with the temperature in the unit typed") {
  auto server = store_server();
  testing::Terminal term;
  term.io.env["USER"] = "kari";
  REQUIRE(term.run({"log", "NB-2023-0001", "--cell-sg", "1.250,1.245,1.250,1.190,1.250,1.245", "--temp", "41F",
                    "--ocv", "12.41", "--rest-hours", "2"}, seams(server)) == 0);
  auto sent = Json::parse(server.requests.at(0).body);
  CHECK(sent["serial"] == "NB-2023-0001");
  CHECK(sent["electrolyte_temp_f"] == 41.0);
  CHECK_FALSE(sent.contains("electrolyte_temp_c"));
  CHECK(sent["cell_sg"].size() == 6);
  CHECK(sent["taken_at"] == "2026-12-01T12:00:00Z");
  CHECK(sent["logged_by"] == "kari");
  CHECK(sent["source"] == "cli");
  CHECK(sent["reading_id"].get<std::string>().rfind("rd-", 0) == 0);
  CHECK(term.out.str().find("corrected SG    1.241") != std::string::npos);
  CHECK(term.out.str().find("ocv_unsettled") != std::string::npos);
  CHECK(term.err.str().find("warning: the OCV is not settled") != std::string::npos);
}

TEST_CASE("logging the same reading twice sends the same id, so the server keeps one") {
  auto server = store_server("[]", true);
  for (int i = 0; i < 2; ++i) {
    testing::Terminal term;
    REQUIRE(term.run({"log", "NB-1", "--sg", "1.250", "--temp", "5C"}, seams(server)) == 0);
    CHECK(term.err.str().empty());  // settled, no flags: no warning
  }
  CHECK(Json::parse(server.requests[0].body)["reading_id"] == Json::parse(server.requests[1].body)["reading_id"]);
}

TEST_CASE("a low-SOC reading brings the recharge advice with its safety caution") {
  auto server = store_server(R"(["low_soc"])", true);
  testing::Terminal term;
  REQUIRE(term.run({"log", "NB-1", "--sg", "1.190", "--temp", "20C"}, seams(server)) == 0);
  CHECK(term.out.str().find("Recommendation: recharge") != std::string::npos);
  CHECK(term.out.str().find("Safety:") != std::string::npos);
}

TEST_CASE("SG without a temperature is refused locally, naming the --temp flag") {
  auto server = store_server();
  testing::Terminal term;
  CHECK(term.run({"log", "NB-1", "--sg", "1.250"}, seams(server)) == kExitRejected);
  CHECK(server.requests.empty());
  CHECK(term.err.str().find("--temp") != std::string::npos);
}

TEST_CASE("an out-of-range reading is refused locally with exit 3 and nothing is sent") {
  auto server = store_server();
  testing::Terminal term;
  CHECK(term.run({"log", "NB-1", "--sg", "1.550"}, seams(server)) == kExitRejected);
  CHECK(server.requests.empty());
  CHECK(term.err.str().find("1.000") != std::string::npos);  // the allowed range is named
}

TEST_CASE("without values and without a terminal, log is a usage error") {
  testing::Terminal term("1.250\n", /*tty=*/false);
  CHECK(term.run({"log", "NB-1"}) == kExitUsage);
}

TEST_CASE("on a terminal, log asks cell by cell and asks again after a bad answer") {
  auto server = store_server("[]", true);
  // temperature (bad, then 41F), 6 cells (one typo), OCV, rest.
  testing::Terminal term("hot\n41F\n1.265\n1.2x\n1.260\n1.250\n1.255\n1.260\n1.265\n12.55\n20\n", /*tty=*/true);
  REQUIRE(term.run({"log", "NB-1"}, seams(server)) == 0);
  auto sent = Json::parse(server.requests.at(0).body);
  CHECK(sent["cell_sg"] == Json::array({1.265, 1.260, 1.250, 1.255, 1.260, 1.265}));
  CHECK(sent["electrolyte_temp_f"] == 41.0);
  CHECK(sent["ocv_v"] == 12.55);
  CHECK(sent["rest_h"] == 20.0);
  auto asked = term.err.str();
  CHECK(asked.find("Cell 6 SG: ") != std::string::npos);
  CHECK(asked.find("'hot' is not a temperature") != std::string::npos);
  CHECK(asked.find("'1.2x' is not a number from 1 to 1.4") != std::string::npos);
}

TEST_CASE("on a terminal, a blank first cell skips SG and an OCV alone is enough") {
  auto server = store_server("[]", true);
  testing::Terminal term("5C\n\n12.60\n24\n", true);
  REQUIRE(term.run({"log", "NB-1"}, seams(server)) == 0);
  auto sent = Json::parse(server.requests.at(0).body);
  CHECK_FALSE(sent.contains("cell_sg"));
  CHECK(sent["ocv_v"] == 12.60);
}
