// `pbfleet import` end to end against a fake server: dry run, local
// rejection, chunked sending, and the row-by-row report of a refusal.
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>

#include <doctest/doctest.h>

#include "cli/commands/context.hpp"
#include "tests/cli/fake_server.hpp"

using namespace pbfleet::cli;
using client::HttpRequest;
using client::Json;

namespace {

struct CsvFile {
  std::string path;
  explicit CsvFile(const std::string& text) {
    char pattern[] = "/tmp/pbfleet-import-XXXXXX";
    int fd = mkstemp(pattern);
    ::close(fd);
    path = pattern;
    std::ofstream(path) << text;
  }
  ~CsvFile() { std::remove(path.c_str()); }
};

std::string round_csv(int rows) {
  std::string csv = "serial,taken_at,ocv_v,cell_sg,electrolyte_temp,rest_h\r\n";
  for (int i = 0; i < rows; ++i) {
    csv += "NB-" + std::to_string(i) + ",2026-11-30T07:15:00Z,12.60,1.265;1.260;1.265;1.262;1.265;1.260,5C,12\r\n";
  }
  return csv;
}

client::HttpResponse accept_all(const HttpRequest& r) {
  auto n = Json::parse(r.body).size();
  return testing::json_response(201, Json{{"stored", n}, {"replayed", 0}, {"readings", Json::array()}}.dump());
}

using testing::seams;

}  // namespace

TEST_CASE("import --dry-run checks every row and sends nothing") {
  CsvFile file(round_csv(3));
  testing::FakeServer server(accept_all);
  testing::Terminal term;
  REQUIRE(term.run({"import", file.path, "--dry-run"}, seams(server)) == 0);
  CHECK(server.requests.empty());
  CHECK(term.out.str() == "3 rows are valid; nothing was sent (dry run)\n");
}

TEST_CASE("a file with bad rows is refused whole, exit 3, each row named on stderr") {
  auto csv = round_csv(2) + "NB-9,2026-11-30T07:15:00Z,12.60,1.265;1.960,5C,12\r\n";
  CsvFile file(csv);
  testing::FakeServer server(accept_all);
  testing::Terminal term;
  CHECK(term.run({"import", file.path}, seams(server)) == kExitRejected);
  CHECK(server.requests.empty());
  CHECK(term.err.str().find("row 3") != std::string::npos);
  CHECK(term.err.str().find("nothing was sent") != std::string::npos);
}

TEST_CASE("import --json reports local errors as JSON on stdout too") {
  CsvFile file(round_csv(1) + "NB-9,yesterday,12.60,,5C,12\r\n");
  testing::FakeServer server(accept_all);
  testing::Terminal term;
  CHECK(term.run({"import", file.path, "--json"}, seams(server)) == kExitRejected);
  auto j = Json::parse(term.out.str());
  CHECK(j["ok"] == false);
  CHECK(j["errors"][0]["row"] == 2);
  CHECK(j["errors"][0]["field"] == "taken_at");
}

TEST_CASE("a large file goes in chunks, no progress bar when stderr is not a terminal") {
  CsvFile file(round_csv(1200));
  testing::FakeServer server(accept_all);
  testing::Terminal term;
  REQUIRE(term.run({"import", file.path, "--chunk", "500"}, seams(server)) == 0);
  CHECK(server.requests.size() == 3);
  CHECK(term.out.str() == "imported 1200 rows: 1200 new, 0 already stored\n");
  CHECK(term.err.str().empty());
}

// Flags the second reading of every chunk: "low_soc" and "cell_spread".
client::HttpResponse flag_second(const HttpRequest& r) {
  const auto n = Json::parse(r.body).size();
  Json readings = Json::array();
  for (std::size_t i = 0; i < n; ++i) {
    readings.push_back({{"reading_id", "r" + std::to_string(i)},
                        {"replayed", false},
                        {"flags", i == 1 ? Json{"low_soc", "cell_spread"} : Json::array()}});
  }
  return testing::json_response(201, Json{{"stored", n}, {"replayed", 0}, {"readings", readings}}.dump());
}

TEST_CASE("readings the server flags are listed after the counts, by file row, across chunks") {
  CsvFile file(round_csv(5));
  testing::FakeServer server(flag_second);
  testing::Terminal term;
  REQUIRE(term.run({"import", file.path, "--chunk", "3"}, seams(server)) == 0);
  REQUIRE(server.requests.size() == 2);
  CHECK(server.requests[0].prefer == "return=minimal");
  // Chunk rows 1-3 flag its second (row 2); chunk rows 4-5 flags row 5.
  CHECK(term.out.str() ==
        "imported 5 rows: 5 new, 0 already stored\n"
        "2 readings flagged:\n"
        "  row 2  NB-1  2026-11-30T07:15:00Z  low_soc; cell_spread\n"
        "  row 5  NB-4  2026-11-30T07:15:00Z  low_soc; cell_spread\n"
        "details: pbfleet history SERIAL\n");

  testing::Terminal json_term;
  REQUIRE(json_term.run({"import", file.path, "--chunk", "3", "--json"}, seams(server)) == 0);
  const auto j = Json::parse(json_term.out.str());
  REQUIRE(j["flagged"].size() == 2);
  CHECK(j["flagged"][1] == Json{{"row", 5}, {"serial", "NB-4"}, {"taken_at", "2026-11-30T07:15:00Z"},
                                {"flags", {"low_soc", "cell_spread"}}});
}

TEST_CASE("a long list of flagged readings stops after 20 lines and counts the rest, and --json keeps them all") {
  CsvFile file(round_csv(60));
  testing::FakeServer server(flag_second);
  testing::Terminal term;
  REQUIRE(term.run({"import", file.path, "--chunk", "2"}, seams(server)) == 0);  // 30 chunks, 30 flagged
  const std::string out = term.out.str();
  CHECK(out.find("30 readings flagged:\n") != std::string::npos);
  std::size_t lines = 0;
  for (std::size_t at = out.find("  row "); at != std::string::npos; at = out.find("  row ", at + 1)) ++lines;
  CHECK(lines == 20);
  CHECK(out.find("  ... and 10 more (--json lists every one)\n") != std::string::npos);
  testing::Terminal json_term;
  REQUIRE(json_term.run({"import", file.path, "--chunk", "2", "--json"}, seams(server)) == 0);
  CHECK(Json::parse(json_term.out.str())["flagged"].size() == 30);
}

TEST_CASE("on a terminal the progress bar goes to stderr, never stdout") {
  CsvFile file(round_csv(20));
  testing::FakeServer server(accept_all);
  testing::Terminal term("", /*tty=*/true);
  REQUIRE(term.run({"import", file.path, "--chunk", "10"}, seams(server)) == 0);
  CHECK(term.err.str().find("20/20 rows 100%") != std::string::npos);
  CHECK(term.out.str().find('\r') == std::string::npos);
}

TEST_CASE("a server refusal names file rows, says what was stored, and exits 3") {
  CsvFile file(round_csv(15));
  int calls = 0;
  testing::FakeServer server([&](const HttpRequest& r) {
    if (++calls == 2) {
      return testing::json_response(422, R"({"type":"https://pbfleet.invalid/problems/validation-failed",
        "title":"Validation failed","status":422,"detail":"1 reading rejected",
        "errors":[{"field":"/2/serial","detail":"no battery NB-12","allowed":"a registered serial"}]})");
    }
    return accept_all(r);
  });
  testing::Terminal term;
  CHECK(term.run({"import", file.path, "--chunk", "10"}, seams(server)) == kExitRejected);
  auto err = term.err.str();
  CHECK(err.find("rows up to 10 were stored (10 new, 0 already there)") != std::string::npos);
  CHECK(err.find("row 13  serial: no battery NB-12 (allowed: a registered serial)") != std::string::npos);
  CHECK(err.find("rows 11 to 15 were refused as a whole") != std::string::npos);
}

TEST_CASE("a missing file is a runtime error naming the file") {
  testing::Terminal term;
  CHECK(term.run({"import", "/nonexistent/round.csv"}) == kExitFailure);
  CHECK(term.err.str().find("/nonexistent/round.csv") != std::string::npos);
}
