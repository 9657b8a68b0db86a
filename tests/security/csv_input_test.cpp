// CSV bodies on POST /v1/readings (RELIABILITY-TESTS row 18, the server
// side): a BOM and CRLF are accepted; a broken quote, an unknown column, an
// extra cell in a row, an empty document and an out-of-range value are
// refused with a problem naming the column (and row), and nothing is stored.
#include <doctest/doctest.h>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;

constexpr const char* kHeader = "reading_id,serial,taken_at,ocv_v,cell_sg,electrolyte_temp,note";
constexpr const char* kCells = "1.265;1.265;1.265;1.265;1.265;1.265";

std::string row(const std::string& id, const std::string& serial = "NY-0001",
                const std::string& cells = kCells) {
  return id + "," + serial + ",2026-01-05T06:00:00Z,12.62," + cells + ",41F,\"round, north\"";
}

// The problem's errors[] holds an entry for `field` (and `row` when > 0).
bool names(const HttpReply& reply, const std::string& field, int row_number) {
  for (const auto& e : reply.json().value("errors", json::array()))
    if (e.value("field", "") == field && (row_number == 0 || e.value("row", 0) == row_number)) return true;
  return false;
}

}  // namespace

TEST_CASE("CSV with a BOM and CRLF line ends is accepted") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto crew = fleet.client("crew");
  const std::string doc = "\xEF\xBB\xBF" + std::string(kHeader) + "\r\n" + row("csv-1") + "\r\n" +
                          row("csv-2") + "\r\n";
  auto reply = crew.send("POST", "/v1/readings", doc, "text/csv");
  CHECK_MESSAGE(reply.status == 201, reply.body);
  CHECK(reply.json()["stored"] == 2);
  // The quoted comma survives as text; 41 F is kept as entered.
  SqliteProbe db(fleet.db());
  CHECK(db.column("SELECT note FROM readings WHERE reading_id = 'csv-1'").at(0) == "round, north");
  CHECK(db.column("SELECT electrolyte_unit FROM readings WHERE reading_id = 'csv-1'").at(0) == "F");
}

TEST_CASE("broken CSV is refused naming the column and row, and nothing is stored") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto crew = fleet.client("crew");
  const std::string h = std::string(kHeader) + "\n";
  struct Case {
    std::string name, doc;
    int status;
    std::string slug, field;
    int row;
  };
  const std::vector<Case> cases{
      {"a broken quote", h + row("q-1") + "\n" + "q-2,NY-0001,\"2026-01-05T06:00:00Z,12.6\n", 400,
       "malformed-body", "", 0},
      {"an unknown column", "reading_id,serial,taken_at,ocv_v,colour\nx,NY-0001,2026-01-05T06:00:00Z,12.6,red\n",
       400, "malformed-body", "colour", 0},
      {"no serial column", "reading_id,taken_at,ocv_v\nx,2026-01-05T06:00:00Z,12.6\n", 400,
       "malformed-body", "serial", 0},
      {"an extra cell in row 2", h + row("e-1") + "\n" + row("e-2") + ",surplus\n", 422,
       "validation-failed", "", 2},
      {"SG out of range in row 2", h + row("r-1") + "\n" + row("r-2", "NY-0001", "1.265;1.265;0.9;1.265;1.265;1.265") + "\n",
       422, "validation-failed", "cell_sg/2", 2},
      {"unknown serial in row 1", h + row("s-1", "ZZ-0000") + "\n", 422, "validation-failed", "serial", 1},
      {"a temperature in kelvin", h + "k-1,NY-0001,2026-01-05T06:00:00Z,12.62," + kCells + ",278K,\n",
       422, "validation-failed", "electrolyte_temp", 1},
      {"an empty document", "", 400, "malformed-body", "", 0},
      {"a header only", h, 422, "validation-failed", "/", 0},
  };
  for (const auto& c : cases) {
    CAPTURE(c.name);
    auto reply = crew.send("POST", "/v1/readings", c.doc, "text/csv");
    CHECK(problem_mismatch(reply, c.status, c.slug) == "");
    if (!c.field.empty() || c.row > 0) CHECK_MESSAGE(names(reply, c.field, c.row), reply.body);
    CHECK(stored_readings(fleet) == 0);
  }
}

}  // namespace pbfleet::testing
