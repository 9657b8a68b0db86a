#include "cli/commands/render.hpp"

#include <doctest/doctest.h>

using namespace pbfleet::cli;
using client::Json;

TEST_CASE("headers carry units from the wire suffixes and trade abbreviations in capitals") {
  CHECK(column_header("soc_percent", true) == "SOC %");
  CHECK(column_header("design_low_c", true) == "design low °C");
  CHECK(column_header("design_low_c", false) == "design low C");
  CHECK(column_header("corrected_sg", true) == "corrected SG");
  CHECK(column_header("rated_cca_a", true) == "rated CCA A");
  CHECK(column_header("serial", true) == "serial");
}

TEST_CASE("cells: SG and spreads to 3 decimals, volts to 2, other numbers to 1, null as a dash") {
  CHECK(cell_text("corrected_sg", Json(1.2624)) == "1.262");
  CHECK(cell_text("ocv_v", Json(12.4567)) == "12.46");
  CHECK(cell_text("cell_spread", Json(0.041)) == "0.041");
  CHECK(cell_text("latest_spread", Json(0.06)) == "0.060");
  CHECK(cell_text("soc_percent", Json(81.25)) == "81.2");
  CHECK(cell_text("crank_margin", Json(0.876)) == "0.88");
  CHECK(cell_text("weak_cell", Json()) == "-");
  CHECK(cell_text("id", Json(7)) == "7");
  CHECK(cell_text("flags", Json::array({"low_soc", "cell_spread"})) == "low_soc; cell_spread");
  CHECK(cell_text("after_charge", Json(true)) == "yes");
}

TEST_CASE("tones: urgent levels red, watch yellow, low SOC and thin crank margins flagged") {
  CHECK(cell_tone("level", Json("act_now")) == format::Tone::bad);
  CHECK(cell_tone("level", Json("watch")) == format::Tone::warn);
  CHECK(cell_tone("level", Json("ok")) == format::Tone::good);
  CHECK(cell_tone("soc_percent", Json(40.0)) == format::Tone::bad);
  CHECK(cell_tone("projected_soc_percent", Json(70.0)) == format::Tone::warn);
  CHECK(cell_tone("crank_margin", Json(0.9)) == format::Tone::bad);
  CHECK(cell_tone("flags", Json::array({"low_soc"})) == format::Tone::warn);
  CHECK(cell_tone("serial", Json("NB-1")) == format::Tone::plain);
}

TEST_CASE("rows come from a bare array, from items, or from the first list of objects") {
  CHECK(rows_of(Json::parse(R"([{"a":1},{"a":2}])")).size() == 2);
  CHECK(rows_of(Json::parse(R"({"items":[{"a":1}],"next_cursor":null})")).size() == 1);
  CHECK(rows_of(Json::parse(R"({"cold_date":"2026-12-20","batteries":[{"a":1},{"a":2},{"a":3}]})")).size() == 3);
  CHECK(rows_of(Json::parse(R"({"x":1})")).empty());
}

TEST_CASE("a row holding one list of objects is spread into one row per element") {
  auto rows = rows_of(Json::parse(R"({"depots":[
      {"depot_name":"Harbour","batteries":[{"serial":"H-1"},{"serial":"H-2"}]},
      {"depot_name":"Valley","batteries":[{"serial":"V-1"}]}]})"));
  REQUIRE(rows.size() == 3);
  CHECK(rows[1]["depot_name"] == "Harbour");
  CHECK(rows[1]["serial"] == "H-2");
  CHECK(rows[2]["depot_name"] == "Valley");
}

TEST_CASE("tables show the preferred columns that exist, in that order, cautions are never columns") {
  std::vector<Json> rows = {Json::parse(R"({"serial":"NB-1","zzz":1,"level":"act_now","cautions":["Ventilate."]})")};
  auto t = rows_table(rows, {"level", "serial", "missing"}, true).render(format::Style{});
  CHECK(t.rfind("level    serial\n", 0) == 0);
  CHECK(t.find("zzz") == std::string::npos);
  auto all = rows_table(rows, {}, true).render(format::Style{});
  CHECK(all.find("zzz") != std::string::npos);
  CHECK(all.find("cautions") == std::string::npos);
}

TEST_CASE("safety cautions are gathered once each, in order") {
  std::vector<Json> rows = {Json::parse(R"({"cautions":["A","B"]})"), Json::parse(R"({"cautions":["B","C"]})")};
  CHECK(cautions_of(rows) == std::vector<std::string>{"A", "B", "C"});
  CHECK(render_cautions({"A"}) == "\nSafety: A\n");
  CHECK(render_cautions({}).empty());
}
