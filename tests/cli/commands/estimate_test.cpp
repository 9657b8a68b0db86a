#include "cli/commands/estimate.hpp"

#include <doctest/doctest.h>

#include "tests/cli/fake_server.hpp"

using namespace pbfleet;
using namespace pbfleet::cli;
using client::Json;

TEST_CASE("estimate flags become model input: temperatures in either unit, chemistry, cells, engine") {
  EstimateFlags f;
  f.cell_sg = {1.250, 1.245, 1.250, 1.190, 1.250, 1.245};
  f.temp = "41F";
  f.low = "-13F";
  f.chemistry = "AGM";
  f.engine = "diesel";
  f.displacement_l = 7.7;
  auto in = estimate_input(f);
  REQUIRE(in.ok());
  CHECK(in->cell_sg.size() == 6);
  CHECK(in->electrolyte.value == doctest::Approx(5.0));   // 41 F = 5 C (definition)
  CHECK(in->low->value == doctest::Approx(-25.0));        // -13 F = -25 C
  CHECK(in->spec.chemistry == models::Chemistry::agm);
  CHECK(in->engine == models::EngineKind::diesel);
}

TEST_CASE("estimate flag errors name the flag and what is allowed") {
  EstimateFlags f;
  f.sg = 1.25;
  f.chemistry = "plasma";
  auto e = estimate_input(f);
  REQUIRE_FALSE(e.ok());
  CHECK(e.error().field == "--chemistry");
  CHECK(e.error().allowed == "flooded, efb, agm, gel");

  EstimateFlags g;
  g.cell_sg = {1.25, 1.25, 1.25};
  CHECK(estimate_input(g).error().field == "--cell-sg");

  EstimateFlags h;
  h.sg = 1.25;
  h.engine = "diesel";
  CHECK(estimate_input(h).error().field == "--displacement-l");
}

TEST_CASE("model fields are reported as the flags the user typed") {
  CHECK(flag_for_field("ocv_v") == "--ocv");
  CHECK(flag_for_field("cell_sg[3]", 6) == "--cell-sg (cell 4)");
  CHECK(flag_for_field("cell_sg[0]", 1) == "--sg");
  CHECK(flag_for_field("low_c") == "--low");
  CHECK(flag_for_field("something_else") == "something_else");
}

TEST_CASE("estimate --json prints one object with the documented keys") {
  testing::Terminal term;
  REQUIRE(term.run({"estimate", "--sg", "1.250", "--ocv", "12.50", "--rest-hours", "24", "--json"}) == 0);
  auto j = Json::parse(term.out.str());
  for (const char* key : {"corrected_sg", "acid_molality", "acid_wt_percent", "cell_emf_v", "ocv_model_v", "soc_percent",
                          "freeze_point_c", "soc_from_ocv_percent"}) {
    CAPTURE(key);
    CHECK(j.contains(key));
  }
  CHECK_FALSE(j.contains("cell_spread"));
  CHECK(term.err.str().empty());
}

TEST_CASE("estimate text shows units and gives the charging caution when a charge is due") {
  testing::Terminal term;
  // SG 1.190 at 25 C is about 50 % (US Army TM 5-4210 table: 1.190 = 50 %).
  REQUIRE(term.run({"estimate", "--sg", "1.190", "--temp", "25C"}) == 0);
  auto text = term.out.str();
  CHECK(text.find("mol/kg") != std::string::npos);
  CHECK(text.find("°C") != std::string::npos);
  CHECK(text.find("recharge") != std::string::npos);
  CHECK(text.find("\nSafety: ") != std::string::npos);
  CHECK(text.find("makers") != std::string::npos);  // defers to the makers
}

TEST_CASE("a healthy battery gets no recharge advice and no caution") {
  testing::Terminal term;
  REQUIRE(term.run({"estimate", "--sg", "1.265", "--temp", "25C", "--ascii"}) == 0);
  CHECK(term.out.str().find("recharge") == std::string::npos);
  CHECK(term.out.str().find("Safety") == std::string::npos);
  CHECK(term.out.str().find("°") == std::string::npos);  // --ascii
}

TEST_CASE("negative temperatures after --low and --temp parse as values, not options") {
  testing::Terminal term;
  REQUIRE(term.run({"estimate", "--sg", "1.250", "--temp", "-5", "--low", "-25C", "--json"}) == 0);
  auto j = Json::parse(term.out.str());
  CHECK(j["electrolyte_temp_c"] == -5.0);
  CHECK(j["low_c"] == -25.0);
}

TEST_CASE("estimate input outside the models' range exits 3 naming the flag and the range") {
  testing::Terminal term;
  CHECK(term.run({"estimate", "--sg", "1.9"}) == kExitRejected);
  CHECK(term.out.str().empty());
  CHECK(term.err.str().find("--sg") != std::string::npos);
  CHECK(term.err.str().find("allowed") != std::string::npos);
}
