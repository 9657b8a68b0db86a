#include "models/analytics/derive.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <string_view>

#include "models/state_of_charge.hpp"
#include "tests/analytics/synthetic.hpp"

namespace pa = pbfleet::analytics;
namespace pm = pbfleet::models;
using namespace pa::testing;

namespace {

bool has_word(const pa::DerivedReading& d, std::string_view word) {
  const auto words = d.flags.words();
  return std::find(words.begin(), words.end(), word) != words.end();
}

const pm::BatterySpec kSpec = flooded_battery("T-1").spec;
const pa::AnalyticsSettings kSettings;

}  // namespace

TEST_CASE("a fully charged, rested battery read cold derives back to its true SG and full charge") {
  const auto r = reading_from_truth(test_now(), Truth{.cell_sg = 1.265, .electrolyte_c = 5.0});
  const auto d = pa::derive(r, kSpec, kSettings);
  REQUIRE(d.corrected_sg);
  // Cold electrolyte reads high; the correction brings it back to the truth
  // the reading was generated from.
  CHECK(r.cells[0].value > 1.265);
  CHECK(*d.corrected_sg == doctest::Approx(1.265).epsilon(0.0003));
  REQUIRE(d.soc_percent);
  CHECK(*d.soc_percent == doctest::Approx(100.0).epsilon(0.03));
  CHECK(d.ocv_settled == true);
  CHECK(d.trusted);
  CHECK(d.flags.empty());
  CHECK_FALSE(d.weak_cell);
}

TEST_CASE("a battery at the published 75 % SG reads about 75 % SOC") {
  // Flooded 12 V table: SG 1.225 = 75 % SOC at 80 degF
  // (US Army TM 5-4210-230-14&P-1, battery section). The model's line between
  // 1.120 and 1.265 gives 72 %; the 80 degF vs 25 degC reference adds 0.001.
  const auto r = reading_from_truth(test_now(), Truth{.cell_sg = 1.225, .electrolyte_c = 25.0});
  const auto d = pa::derive(r, kSpec, kSettings);
  REQUIRE(d.soc_from_sg_percent);
  CHECK(*d.soc_from_sg_percent == doctest::Approx(75.0).epsilon(0.05));
}

TEST_CASE("SG shown to the 80 degF reference follows the Army correction example") {
  // Reading 1.250 at 20 degF corrects to 1.226 at 80 degF: 0.004 per 10 degF
  // (US Army TM 5-4210-230-14&P-1, battery section; worked example in the
  // reference values, section 5).
  pa::ReadingPoint r;
  r.taken_at = test_now();
  r.cells = pa::CellSgs{1.250, 1.250, 1.250, 1.250, 1.250, 1.250};
  r.electrolyte_c = pm::celsius_from_fahrenheit(20.0).value;
  pa::AnalyticsSettings s;
  s.sg_reference = pm::SgReference::f80;
  const auto d = pa::derive(r, kSpec, s);
  REQUIRE(d.corrected_sg);
  CHECK(*d.corrected_sg == doctest::Approx(1.226).epsilon(0.001));
  CHECK(d.corrected_cell_sg.size() == 6);
}

TEST_CASE("a dead cell is flagged and named, 1-based") {
  Truth t;
  t.cells_sg = {1.265, 1.265, 1.260, 1.150, 1.265, 1.262};
  const auto d = pa::derive(reading_from_truth(test_now(), t), kSpec, kSettings);
  // Spread > 0.050 flags a starting battery (common practice); the
  // Army's wording: one cell 0.050 below the others (TM 5-3740-214-14).
  CHECK(has_word(d, "cell_spread"));
  REQUIRE(d.weak_cell);
  CHECK(*d.weak_cell == 4);
  REQUIRE(d.cell_spread);
  CHECK(*d.cell_spread == doctest::Approx(0.115).epsilon(0.01));
}

TEST_CASE("water added holds back the spread alarm until the next charge") {
  Truth low_cell;
  low_cell.cells_sg = {1.265, 1.265, 1.265, 1.265, 1.205, 1.265};
  auto watered = reading_from_truth(days_before_now(14), low_cell);
  watered.water_added = true;
  auto next_week = reading_from_truth(days_before_now(7), low_cell);
  auto after_charge = reading_from_truth(test_now(), low_cell);
  after_charge.after_charge = true;
  const std::vector<pa::ReadingPoint> readings{watered, next_week, after_charge};
  const auto d = pa::derive_all(readings, kSpec, kSettings);
  REQUIRE(d.size() == 3);
  CHECK(has_word(d[0], "water_added_hold"));
  CHECK_FALSE(has_word(d[0], "cell_spread"));
  CHECK_FALSE(d[0].weak_cell);
  CHECK(has_word(d[1], "water_added_hold"));
  // Charging mixes the watered cell: a spread that remains is real.
  CHECK(has_word(d[2], "cell_spread"));
  CHECK(d[2].weak_cell == 5);
}

TEST_CASE("an OCV read right after charging is flagged as surface charge and not trusted") {
  // True state: SG 1.200, about 55 % SOC. The crew reads 12.90 V half an
  // hour after the charger came off: above what even full-charge acid gives.
  auto r = reading_from_truth(test_now(), Truth{.cell_sg = 1.200, .rest_h = 0.5, .after_charge = true});
  r.ocv_v = 12.90;
  const auto d = pa::derive(r, kSpec, kSettings);
  CHECK(has_word(d, "surface_charge_suspected"));
  CHECK(has_word(d, "ocv_unsettled"));
  CHECK_FALSE(d.trusted);
  // The SOC falls back on the hydrometer, which surface charge does not lift.
  REQUIRE(d.soc_percent);
  CHECK(*d.soc_percent < 65.0);
}

TEST_CASE("an unsettled OCV far above the SG estimate is suspected surface charge even without a charge note") {
  auto r = reading_from_truth(test_now(), Truth{.cell_sg = 1.180, .rest_h = 1.0});
  // About 0.2 V of surface charge lifted by driving: 12-25 SOC points
  // (common practice).
  r.ocv_v = r.ocv_v.value() + 0.25;
  const auto d = pa::derive(r, kSpec, kSettings);
  CHECK(has_word(d, "surface_charge_suspected"));
  CHECK_FALSE(d.trusted);
}

TEST_CASE("a settled OCV alone is trusted and gives an SG equivalent") {
  const auto r = reading_from_truth(test_now(), Truth{.cell_sg = 1.225, .rest_h = 24.0, .with_sg = false});
  const auto d = pa::derive(r, kSpec, kSettings);
  CHECK(d.trusted);
  CHECK_FALSE(d.corrected_sg);
  REQUIRE(d.sg_equivalent);
  CHECK(*d.sg_equivalent == doctest::Approx(1.225).epsilon(0.002));
}

TEST_CASE("an OCV without a recorded rest counts as unsettled") {
  auto r = reading_from_truth(test_now(), Truth{.cell_sg = 1.225, .with_sg = false});
  r.rest_h = std::nullopt;
  const auto d = pa::derive(r, kSpec, kSettings);
  CHECK(d.ocv_settled == false);
  CHECK(has_word(d, "ocv_unsettled"));
  CHECK_FALSE(d.trusted);
}

TEST_CASE("a missing electrolyte temperature is assumed and flagged") {
  auto r = reading_from_truth(test_now(), Truth{.cell_sg = 1.265, .electrolyte_c = 25.0});
  r.electrolyte_c = std::nullopt;
  const auto d = pa::derive(r, kSpec, kSettings);
  CHECK(has_word(d, "temperature_assumed"));
  CHECK(d.electrolyte_c == 25.0);
}

TEST_CASE("a battery below the 75 % threshold is flagged low") {
  // 12.4 V / 75 %: below it, load test or recharge (US Army TM 5-3805-262-20).
  const auto d = pa::derive(reading_from_truth(test_now(), Truth{.cell_sg = 1.190}), kSpec, kSettings);
  CHECK(has_word(d, "low_soc"));
}

TEST_CASE("load-test minimum falls from 9.6 V when warm to 8.5 V at -18 C") {
  // 12 V battery at half CCA for 15 s (common practice, CONVENTIONS.md).
  CHECK(pa::load_test_minimum(pm::Celsius{21.0}, 6).value == doctest::Approx(9.6));
  CHECK(pa::load_test_minimum(pm::Celsius{30.0}, 6).value == doctest::Approx(9.6));
  CHECK(pa::load_test_minimum(pm::Celsius{-18.0}, 6).value == doctest::Approx(8.5));
  CHECK(pa::load_test_minimum(pm::Celsius{1.5}, 6).value == doctest::Approx(9.05));
  CHECK(pa::load_test_minimum(pm::Celsius{21.0}, 12).value == doctest::Approx(19.2));
}

TEST_CASE("a load test is judged only at 75 % SOC or more") {
  auto full = reading_from_truth(test_now(), Truth{.cell_sg = 1.265, .electrolyte_c = 25.0});
  full.load_test_end_v = 9.0;
  CHECK(has_word(pa::derive(full, kSpec, kSettings), "load_test_failed"));
  full.load_test_end_v = 10.1;
  CHECK(pa::derive(full, kSpec, kSettings).flags.empty());
  auto half = reading_from_truth(test_now(), Truth{.cell_sg = 1.190, .electrolyte_c = 25.0});
  half.load_test_end_v = 9.0;
  const auto d = pa::derive(half, kSpec, kSettings);
  CHECK(has_word(d, "load_test_at_low_soc"));
  CHECK_FALSE(has_word(d, "load_test_failed"));
}

TEST_CASE("a reading with neither SG nor OCV has no SOC and is not trusted") {
  pa::ReadingPoint r;
  r.taken_at = test_now();
  const auto d = pa::derive(r, kSpec, kSettings);
  CHECK(has_word(d, "no_soc"));
  CHECK_FALSE(d.soc_percent);
  CHECK_FALSE(d.trusted);
}

TEST_CASE("sg_for_soc inverts the model's SOC curve") {
  for (const double soc : {0.0, 12.5, 37.0, 75.0, 100.0}) {
    const auto sg = pa::sg_for_soc(pm::Percent{soc}, kSpec);
    CHECK(pm::soc_from_sg(sg, kSpec).value == doctest::Approx(soc).epsilon(1e-6));
  }
}

TEST_CASE("flag words are stable") {
  CHECK(pa::to_string(pa::Flag::ocv_unsettled) == "ocv_unsettled");
  CHECK(pa::to_string(pa::Flag::surface_charge_suspected) == "surface_charge_suspected");
  CHECK(pa::to_string(pa::Flag::soc_disagreement) == "soc_disagreement");
  CHECK(pa::to_string(pa::Flag::cell_spread) == "cell_spread");
  CHECK(pa::to_string(pa::Flag::water_added_hold) == "water_added_hold");
  CHECK(pa::to_string(pa::Flag::low_soc) == "low_soc");
  CHECK(pa::to_string(pa::Flag::no_soc) == "no_soc");
  pa::FlagSet set;
  set.set(pa::Flag::low_soc);
  set.set(pa::Flag::ocv_unsettled);
  CHECK(set.words() == std::vector<std::string_view>{"ocv_unsettled", "low_soc"});
}

TEST_CASE("a reading point stays compact and keeps hydrometer values exactly") {
  // 2.6 M readings must fit a report's memory budget.
  CHECK(sizeof(pa::ReadingPoint) <= 80);
  const pa::CellSgs cells{1.265, 1.150, 1.001};
  CHECK(cells.size() == 3);
  CHECK(cells[0].value == doctest::Approx(1.265).epsilon(1e-9));
  CHECK(cells[1].value == doctest::Approx(1.150).epsilon(1e-9));
  CHECK(cells[2].value == doctest::Approx(1.001).epsilon(1e-9));
  pa::Measured m;
  CHECK_FALSE(m.has_value());
  m = 12.65;
  CHECK(m.value() == doctest::Approx(12.65).epsilon(1e-6));
}
