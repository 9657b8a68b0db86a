#include "models/estimate.hpp"  // first: the header stands alone

#include <algorithm>
#include <string>

#include <initializer_list>

#include <doctest/doctest.h>

#include "check_near.hpp"

using namespace pbfleet::models;

namespace {

EstimateInput flooded_input(double sg, double ocv, double rest_h = 24.0) {
  EstimateInput in;
  in.spec = default_spec(Chemistry::flooded);
  in.cell_sg.assign(6, SpecificGravity{sg});
  in.ocv = Volts{ocv};
  in.rest = Hours{rest_h};
  in.electrolyte = Celsius{25.0};
  return in;
}

bool has_flag(const EstimateOutput& out, std::string_view flag) {
  return std::find(out.flags.begin(), out.flags.end(), flag) != out.flags.end();
}

bool notes_mention(const EstimateOutput& out, const std::string& text) {
  return std::any_of(out.notes.begin(), out.notes.end(),
                     [&](const std::string& n) { return n.find(text) != std::string::npos; });
}

}  // namespace

TEST_CASE("a full flooded battery at rest comes out full, with no flags") {
  // SG 1.265 at 25 degC is full for a flooded battery (TM 5-4210 table) and
  // reads about 12.6-12.7 V (common practice).
  const auto out = estimate(flooded_input(1.265, 12.66));
  REQUIRE(out.ok());
  CHECK_NEAR(*out->corrected_sg, 1.265, 1e-12);
  CHECK_NEAR(*out->acid_wt_percent, 35.5, 0.3);  // Myhre et al. 1998 via reference notes
  CHECK(*out->ocv_model_v >= 12.6);
  CHECK(*out->ocv_model_v <= 12.7);
  CHECK_NEAR(out->soc_percent, 100.0, 3.0);
  CHECK(out->soc_uncertainty_percent > 0.0);
  CHECK(out->soc_uncertainty_percent < 5.0);
  CHECK(*out->ocv_settled);
  CHECK_FALSE(out->disagreement);
  CHECK(out->flags.empty());
  CHECK(*out->cell_spread == 0.0);
  CHECK_FALSE(out->weak_cell.has_value());
}

TEST_CASE("cold hydrometer readings are corrected before use") {
  // 1.250 read at 20 degF is 1.226 on the 80 degF scale (TM 5-4210 example);
  // on the 25 degC scale it is 1.250 + 0.0007 x (-6.67 - 25) = 1.2278.
  auto in = flooded_input(1.250, 12.45);
  in.electrolyte = celsius_from_fahrenheit(20.0);
  const auto out = estimate(in);
  REQUIRE(out.ok());
  CHECK_NEAR(*out->corrected_sg, 1.2278, 0.0001);
  CHECK_NEAR(*out->table_soc_from_sg_percent, 75.0, 3.0);  // TM 5-4210: 1.225 = 75 %
}

TEST_CASE("a short rest marks the OCV unsettled and gives it little weight") {
  const auto out = estimate(flooded_input(1.190, 12.55, 0.5));
  REQUIRE(out.ok());
  CHECK_FALSE(*out->ocv_settled);
  CHECK(has_flag(*out, kFlagOcvUnsettled));
  // The combined SOC stays near the SG value (about 48 %).
  CHECK_NEAR(out->soc_percent, *out->soc_from_sg_percent, 3.0);
  CHECK(has_flag(*out, kFlagSocDisagreement));
  CHECK(notes_mention(*out, "surface charge"));
}

TEST_CASE("a weak cell is reported by its 1-based number") {
  auto in = flooded_input(1.265, 12.55);
  in.cell_sg[3] = SpecificGravity{1.190};
  const auto out = estimate(in);
  REQUIRE(out.ok());
  CHECK(has_flag(*out, kFlagCellSpread));
  CHECK(*out->weak_cell == 4);
  CHECK_NEAR(*out->cell_spread, 0.075, 1e-9);
}

TEST_CASE("weak acid before a hard frost raises a freeze risk with a safety caution") {
  // SG 1.150 freezes near -15 degC (TM 5-1185: +5 degF); a -20 degC low is below it.
  auto in = flooded_input(1.150, 12.05);
  in.low = Celsius{-20.0};
  const auto out = estimate(in);
  REQUIRE(out.ok());
  CHECK(*out->freeze_point_c < -13.0);
  CHECK(*out->freeze_point_c > -18.0);
  CHECK(*out->freeze_margin_c < 0.0);
  CHECK(has_flag(*out, kFlagFreezeRisk));
  CHECK(has_flag(*out, kFlagLowSoc));
  CHECK(notes_mention(*out, "hydrogen"));
  CHECK(notes_mention(*out, "eye protection"));
  CHECK(notes_mention(*out, "makers"));
}

TEST_CASE("a half-charged small battery will not crank a diesel in deep cold") {
  auto in = flooded_input(1.190, 12.24);
  in.spec.rated_cca = Amperes{400.0};
  in.low = Celsius{-25.0};
  in.engine = EngineKind::diesel;
  in.displacement_l = 3.0;
  const auto out = estimate(in);
  REQUIRE(out.ok());
  REQUIRE(out->crank_margin.has_value());
  CHECK(*out->crank_margin < 1.0);
  CHECK(*out->required_cca_at_low > 366.0);  // 2 x 3.0 x 61.0237 at -18 degC, more at -25
  CHECK(has_flag(*out, kFlagWillNotCrank));
  CHECK(notes_mention(*out, "hydrogen"));
}

TEST_CASE("a full battery with a stated need cranks at a moderate low") {
  auto in = flooded_input(1.265, 12.66);
  in.spec.rated_cca = Amperes{700.0};
  in.low = Celsius{-10.0};
  in.required_cca = Amperes{400.0};
  const auto out = estimate(in);
  REQUIRE(out.ok());
  CHECK(*out->crank_margin > 1.0);
  CHECK_FALSE(has_flag(*out, kFlagWillNotCrank));
  CHECK_FALSE(has_flag(*out, kFlagFreezeRisk));
}

TEST_CASE("OCV alone gives an SOC with its uncertainty") {
  EstimateInput in;
  in.ocv = Volts{12.30};
  in.rest = Hours{12.0};
  const auto out = estimate(in);
  REQUIRE(out.ok());
  CHECK_FALSE(out->corrected_sg.has_value());
  REQUIRE(out->soc_from_ocv_percent.has_value());
  CHECK_NEAR(out->soc_percent, *out->soc_from_ocv_percent, 1e-9);
  // 12.30 V: common-practice flooded table gives about 57 %.
  CHECK_NEAR(*out->table_soc_from_ocv_percent, 57.0, 6.0);
  CHECK(out->soc_uncertainty_percent >= 3.0);
  CHECK(out->freeze_point_c.has_value());  // from the SG the SOC implies
}

TEST_CASE("an OCV beyond the acid model is flagged, not rejected") {
  EstimateInput in;
  in.ocv = Volts{10.2};  // a shorted cell, common in old batteries
  in.rest = Hours{24.0};
  const auto out = estimate(in);
  REQUIRE(out.ok());
  CHECK(has_flag(*out, kFlagOcvOutsideModel));
  CHECK(out->soc_percent == 0.0);
  CHECK(notes_mention(*out, "shorted cell"));
}

TEST_CASE("bad input is an error naming the field and the allowed range") {
  auto too_high = flooded_input(1.265, 40.0);
  auto r = estimate(too_high);
  REQUIRE_FALSE(r.ok());
  CHECK(r.error().field == "ocv_v");
  CHECK(r.error().allowed == "above 0 up to 15.00 V");

  auto wrong_count = flooded_input(1.265, 12.6);
  wrong_count.cell_sg.resize(4);
  CHECK(estimate(wrong_count).error().field == "cell_sg");

  auto bad_sg = flooded_input(1.265, 12.6);
  bad_sg.cell_sg[2] = SpecificGravity{1.5};
  r = estimate(bad_sg);
  CHECK(r.error().field == "cell_sg[2]");
  CHECK(r.error().allowed == "1.000 to 1.400");

  EstimateInput nothing;
  CHECK(estimate(nothing).error().field == "cell_sg");

  auto cold = flooded_input(1.265, 12.6);
  cold.low = Celsius{-75.0};
  r = estimate(cold);
  CHECK(r.error().field == "low_c");
  CHECK(r.error().allowed == "-60.0 to 80.0 degC");

  auto engine_only = flooded_input(1.265, 12.6);
  engine_only.engine = EngineKind::gasoline;
  CHECK(estimate(engine_only).error().field == "displacement_l");

  auto bad_spec = flooded_input(1.265, 12.6);
  bad_spec.spec.full_charge_sg = SpecificGravity{1.110};
  CHECK(estimate(bad_spec).error().field == "full_sg");
}

TEST_CASE("a reading that corrects outside the acid tables is an error naming the cell") {
  // 1.390 at 60 degC corrects to 1.4145 (0.0007 per degC), beyond 50 wt %.
  auto in = flooded_input(1.390, 12.6);
  in.electrolyte = Celsius{60.0};
  const auto r = estimate(in);
  REQUIRE_FALSE(r.ok());
  CHECK(r.error().field == "cell_sg[0]");
  CHECK(r.error().allowed.find("1.000 to 1.395") != std::string::npos);
}

TEST_CASE("validation lists every problem at once") {
  EstimateInput in;
  in.spec.cells = 30;
  in.electrolyte = Celsius{120.0};
  in.rest = Hours{-1.0};
  const auto errors = validate_estimate_input(in);
  const auto has = [&](const std::string& field) {
    return std::any_of(errors.begin(), errors.end(), [&](const FieldError& e) { return e.field == field; });
  };
  CHECK(has("cells"));
  CHECK(has("electrolyte_temp_c"));
  CHECK(has("rest_h"));
  CHECK(has("cell_sg"));  // neither SG nor OCV
  for (const auto& e : errors) CHECK_FALSE(e.allowed.empty());
}

TEST_CASE("without a rated CCA the crank margin is left out and the notes say why") {
  auto in = flooded_input(1.265, 12.66);
  in.low = Celsius{-20.0};
  in.required_cca = Amperes{400.0};
  const auto out = estimate(in);
  REQUIRE(out.ok());
  CHECK_FALSE(out->crank_margin.has_value());
  CHECK_FALSE(out->available_cca.has_value());
  CHECK(notes_mention(*out, "rated CCA is unknown"));
}
