#include "cli/import/batch.hpp"

#include <doctest/doctest.h>

#include "tests/cli/fake_server.hpp"

using namespace pbfleet;
using namespace pbfleet::cli;
using namespace pbfleet::cli::import;

namespace {

constexpr const char* kHeader = "serial,taken_at,ocv_v,cell_sg,electrolyte_temp,rest_h\n";

std::string round_csv(int rows) {
  std::string csv = kHeader;
  for (int i = 0; i < rows; ++i) {
    csv += "NB-" + std::to_string(1000 + i) + ",2026-11-30T07:15:00Z,12.60,1.265;1.260;1.265;1.262;1.265;1.260,41F,12\n";
  }
  return csv;
}

// Answers each chunk with stored = its size, like pbfleetd.
client::HttpResponse accept_all(const client::HttpRequest& r) {
  auto body = client::Json::parse(r.body);
  return testing::json_response(201, client::Json{{"stored", body.size()}, {"replayed", 0}, {"readings", client::Json::array()}}.dump());
}

}  // namespace

TEST_CASE("chunks cover every row once, in order, none larger than asked") {
  auto c = plan_chunks(1201, 500);
  REQUIRE(c.size() == 3);
  CHECK(c[0].first == 0);
  CHECK(c[0].count == 500);
  CHECK(c[2].first == 1000);
  CHECK(c[2].count == 201);
  CHECK(plan_chunks(0, 500).empty());
  CHECK(plan_chunks(500, 500).size() == 1);
}

TEST_CASE("a valid round is prepared with derived ids and the import source") {
  auto p = prepare_import(round_csv(3), testing::test_now());
  REQUIRE(p.ok());
  CHECK(p->errors.empty());
  REQUIRE(p->readings.size() == 3);
  CHECK(p->rows == std::vector<int>{1, 2, 3});
  CHECK(p->readings[0].reading_id.rfind("rd-", 0) == 0);
  CHECK(p->readings[0].reading_id != p->readings[1].reading_id);
  CHECK(p->readings[0].source == "import");
  // The same file prepared twice gives the same ids: a retry replays.
  CHECK(prepare_import(round_csv(3), testing::test_now())->readings[2].reading_id == p->readings[2].reading_id);
}

TEST_CASE("a given reading_id is kept") {
  auto p = prepare_import("reading_id,serial,taken_at,ocv_v\nmine-1,NB-1,2026-11-30T07:15:00Z,12.6\n", testing::test_now());
  REQUIRE(p.ok());
  CHECK(p->readings.at(0).reading_id == "mine-1");
}

TEST_CASE("every bad row is reported with its row number and field, in row order") {
  std::string csv = kHeader;
  csv += "NB-1,2026-11-30T07:15:00Z,12.60,1.265,20C,12\n";
  csv += "NB-2,2026-11-30T07:15:00Z,12.60,1.765,20C,12\n";   // SG above 1.400
  csv += "NB-3,not-a-time,12.60,1.265,20C,12\n";             // bad timestamp
  csv += "NB-4,2026-11-30T07:15:00Z,12.60,1.265,200C,12\n";  // electrolyte far too hot
  auto p = prepare_import(csv, testing::test_now());
  REQUIRE(p.ok());
  REQUIRE(p->errors.size() >= 3);
  CHECK(p->errors[0].row == 2);
  CHECK(p->errors[0].error.field.find("cell_sg") != std::string::npos);
  CHECK(p->errors[1].row == 3);
  CHECK(p->errors.back().row == 4);
  CHECK_FALSE(p->errors.back().error.allowed.empty());
}

TEST_CASE("a document with no header is refused as a whole") {
  CHECK_FALSE(prepare_import("", testing::test_now()).ok());
  CHECK_FALSE(prepare_import("bogus_column\n1\n", testing::test_now()).ok());
}

TEST_CASE("rows go out in chunks as JSON arrays and the counts add up") {
  auto p = prepare_import(round_csv(1201), testing::test_now());
  REQUIRE(p.ok());
  testing::FakeServer server(accept_all);
  client::Api api(server.transport(), "t");
  std::vector<std::size_t> progress;
  auto sent = send_readings(api, p->readings, 500, [&](std::size_t done) { progress.push_back(done); });
  CHECK_FALSE(sent.failed_chunk.has_value());
  CHECK(sent.stored == 1201);
  CHECK(sent.rows_done == 1201);
  CHECK(progress == std::vector<std::size_t>{500, 1000, 1201});
  REQUIRE(server.requests.size() == 3);
  auto first = client::Json::parse(server.requests[0].body);
  CHECK(first.size() == 500);
  CHECK(first[0]["serial"] == "NB-1000");
  CHECK(first[0]["electrolyte_temp_f"] == 41.0);
  CHECK(first[0]["reading_id"] == p->readings[0].reading_id);
  CHECK(server.requests[0].target == "/v1/readings");
  // Only the counts are read back, so the short answer is asked for.
  CHECK(server.requests[0].prefer == "return=minimal");
}

TEST_CASE("sending stops at the first refused chunk and says which one") {
  auto p = prepare_import(round_csv(12), testing::test_now());
  REQUIRE(p.ok());
  int calls = 0;
  testing::FakeServer server([&](const client::HttpRequest& r) {
    if (++calls == 2) {
      return testing::json_response(422, R"({"title":"Validation failed","status":422,
        "errors":[{"field":"/1/serial","detail":"no battery with this serial"}]})");
    }
    return accept_all(r);
  });
  client::Api api(server.transport(), "t");
  auto sent = send_readings(api, p->readings, 5, nullptr);
  REQUIRE(sent.failed_chunk.has_value());
  CHECK(sent.failed_chunk->first == 5);
  CHECK(sent.rows_done == 5);
  CHECK(server.requests.size() == 2);
  REQUIRE(sent.failure.problem.has_value());
  // "/1/..." in the second chunk is the 7th reading: file row 7.
  CHECK(file_row(sent.failure.problem->errors.at(0), *sent.failed_chunk, p->rows) == 7);
}

TEST_CASE("server rows map back to file rows, skipping blank lines in the file") {
  auto p = prepare_import(std::string(kHeader) + "NB-1,2026-11-30T07:15:00Z,12.6,,,\n\nNB-2,2026-11-30T07:15:00Z,12.6,,,\n",
                          testing::test_now());
  REQUIRE(p.ok());
  REQUIRE(p->rows.size() == 2);
  Chunk whole{0, 2};
  client::ProblemField by_row{"serial", "unknown", "", 2};
  CHECK(file_row(by_row, whole, p->rows) == p->rows[1]);
  CHECK(p->rows[1] == 3);
  client::ProblemField outside{"/7/serial", "unknown", "", std::nullopt};
  CHECK_FALSE(file_row(outside, whole, p->rows).has_value());
}
