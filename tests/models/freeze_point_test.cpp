#include "models/freeze_point.hpp"  // first: the header stands alone

#include <initializer_list>

#include <doctest/doctest.h>

#include "check_near.hpp"
#include "models/acid.hpp"
#include "models/specific_gravity.hpp"

using namespace pbfleet::models;

namespace {

SpecificGravity from_80f(double sg80) {
  return correct_sg(SpecificGravity{sg80}, reference_temperature(SgReference::f80));
}
double freeze_c_80f(double sg80) { return freezing_point(from_80f(sg80)).value().value; }
double f_to_c(double f) { return celsius_from_fahrenheit(f).value; }

}  // namespace

TEST_CASE("freezing points follow the CRC depression table by weight percent") {
  // CRC Handbook 102nd ed., "Concentrative properties of aqueous solutions",
  // sulfuric acid freezing-point depression: 10 % 4.64, 16 % 9.26,
  // 20 % 13.64, 24 % 19.85, 28 % 29.65, 30 % 36.21, 32 % 44.76, 34 % 55.28 degC.
  // Tolerance 0.01 degC: table nodes, two printed decimals.
  struct Row { double wt, depression; };
  for (const Row row : {Row{10, 4.64}, Row{16, 9.26}, Row{20, 13.64}, Row{24, 19.85},
                        Row{28, 29.65}, Row{30, 36.21}, Row{32, 44.76}, Row{34, 55.28}}) {
    const auto sg = sg_from_weight_percent(WeightPercent{row.wt});
    REQUIRE(sg.ok());
    CHECK_NEAR(freezing_point(*sg).value().value, -row.depression, 0.01);
  }
}

TEST_CASE("freezing points agree with the Army battery tables") {
  // US Army TM 5-1185 / OD1002 (SG at 80 degF): 1.100 +19 degF, 1.150 +5 degF,
  // 1.200 -16 degF, 1.250 -62 degF. US Army TM 10-6140-200-14: 1.160 +1 degF,
  // 1.220 -31 degF. Tolerance 3 degC: the reference notes find the CRC-based
  // curve within about 2 degC of the Army tables, which are rounded to whole
  // degF and read on a hydrometer.
  CHECK_NEAR(freeze_c_80f(1.100), f_to_c(19.0), 3.0);
  CHECK_NEAR(freeze_c_80f(1.150), f_to_c(5.0), 3.0);
  CHECK_NEAR(freeze_c_80f(1.160), f_to_c(1.0), 3.0);
  CHECK_NEAR(freeze_c_80f(1.200), f_to_c(-16.0), 3.0);
  CHECK_NEAR(freeze_c_80f(1.220), f_to_c(-31.0), 3.0);
  CHECK_NEAR(freeze_c_80f(1.250), f_to_c(-62.0), 3.0);
}

TEST_CASE("fully charged acid freezes near -68 degC") {
  // US Army TM 5-1185: SG 1.280 (80 degF) freezes at -90 degF = -67.8 degC
  // (TM 10-6140-200-14: -95 degF). Tolerance 0.05 degC at the data's last point.
  CHECK_NEAR(freeze_c_80f(1.280), f_to_c(-90.0), 0.05);
}

TEST_CASE("freezing points match the CRC-derived column of the reference notes") {
  // Reference notes section 7, CRC-derived (SG at 80 degF, wt % via Myhre
  // et al. 1998): 1.200 -28.7, 1.225 -39.2 degC. Tolerance 1 degC: a
  // different density route moves wt % by up to 0.2.
  CHECK_NEAR(freeze_c_80f(1.200), -28.7, 1.0);
  CHECK_NEAR(freeze_c_80f(1.225), -39.2, 1.0);
}

TEST_CASE("water freezes at 0 degC") {
  // Definition of the Celsius scale (ice point at 1 atm).
  CHECK_NEAR(freezing_point(SpecificGravity{1.000}).value().value, 0.0, 1e-9);
}

TEST_CASE("the freezing point falls as the acid gets stronger") {
  // Property over the data's range.
  double previous = 1.0;
  for (int i = 0; i <= 280; ++i) {
    const double sg = 1.000 + 0.001 * i;
    const double fp = freezing_point(SpecificGravity{sg}).value().value;
    CHECK(fp < previous);
    previous = fp;
  }
}

TEST_CASE("freeze margin is positive when the low stays above the freezing point") {
  // SG 1.265 freezes far below -30 degC; SG 1.100 freezes near -8 degC.
  CHECK(freeze_margin_c(SpecificGravity{1.265}, Celsius{-30.0}).value() > 20.0);
  const auto weak = freeze_margin_c(SpecificGravity{1.100}, Celsius{-20.0});
  REQUIRE(weak.ok());
  CHECK(*weak < 0.0);
  CHECK_NEAR(*weak, -20.0 - freezing_point(SpecificGravity{1.100}).value().value, 1e-12);
}

TEST_CASE("SG beyond the freezing-point data is an error naming sg") {
  for (const double sg : {0.990, 1.290, 1.330}) {
    const auto fp = freezing_point(SpecificGravity{sg});
    REQUIRE_FALSE(fp.ok());
    CHECK(fp.error().field == "sg");
    CHECK(fp.error().allowed == "1.000 to 1.281");
  }
  CHECK_FALSE(freeze_margin_c(SpecificGravity{1.300}, Celsius{-30.0}).ok());
}
