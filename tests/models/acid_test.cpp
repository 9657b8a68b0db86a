#include "models/acid.hpp"  // first: the header stands alone

#include <initializer_list>

#include <doctest/doctest.h>

#include "check_near.hpp"

using namespace pbfleet::models;

namespace {
// Water density at 25 degC, g/mL (CRC Handbook, density of water table):
// turns SG 25/25 back into an absolute density for comparison.
constexpr double kWater25 = 0.99707;
}  // namespace

TEST_CASE("molality follows from weight percent exactly") {
  // CRC Handbook 102nd ed., "Concentrative properties of aqueous solutions",
  // sulfuric acid, molality column: 10 % 1.133, 30 % 4.370, 40 % 6.797,
  // 50 % 10.196 mol/kg. Tolerance 0.0006: the table prints three decimals.
  CHECK_NEAR(molality_from_weight_percent(WeightPercent{10.0}).value, 1.133, 0.0006);
  CHECK_NEAR(molality_from_weight_percent(WeightPercent{30.0}).value, 4.370, 0.0006);
  CHECK_NEAR(molality_from_weight_percent(WeightPercent{40.0}).value, 6.797, 0.0006);
  CHECK_NEAR(molality_from_weight_percent(WeightPercent{50.0}).value, 10.196, 0.0006);
  CHECK(molality_from_weight_percent(WeightPercent{0.0}).value == 0.0);
}

TEST_CASE("weight percent from molality inverts the exact relation") {
  // Property over 0-12 mol/kg; tolerance 1e-12 (floating point only).
  for (double m = 0.0; m <= 12.0; m += 0.25) {
    const auto w = weight_percent_from_molality(Molality{m});
    CHECK_NEAR(molality_from_weight_percent(w).value, m, 1e-12);
  }
}

TEST_CASE("SG 25/25 reproduces the published densities of sulfuric acid at 25 degC") {
  // Reference notes section 3 (derived from CRC 102nd ed. 20 degC densities
  // by the Myhre, Nielsen & Saastad 1998 polynomial and by published linear
  // rho(T) fits; the two differ by up to 0.0013 at 25 degC): rho25 ranges
  // 10 % 1.0632-1.0637, 20 % 1.1363-1.1368, 30 % 1.2151-1.2160,
  // 40 % 1.2992-1.3005 g/cm3. Tolerance: the range widened by 0.0005 on
  // each side (the notes give 25 degC values as +/-0.001).
  struct Row { double wt, lo, hi; };
  for (const Row row : {Row{10, 1.0632, 1.0637}, Row{20, 1.1363, 1.1368}, Row{30, 1.2151, 1.2160},
                        Row{40, 1.2992, 1.3005}}) {
    const auto sg = sg_from_weight_percent(WeightPercent{row.wt});
    REQUIRE(sg.ok());
    const double rho25 = sg->value * kWater25;
    CHECK(rho25 >= row.lo - 0.0005);
    CHECK(rho25 <= row.hi + 0.0005);
  }
}

TEST_CASE("SG 25/25 sits below the 20 degC density of the CRC table at every row") {
  // CRC 102nd ed. 20 degC absolute densities: 30 % 1.2191, 40 % 1.3028.
  // Acid expands faster than water on warming, so SG 25/25 is below
  // rho20/rho_w20 (1.2213 and 1.3051, reference notes section 3) by 0.001-0.004.
  const double sg30 = sg_from_weight_percent(WeightPercent{30.0}).value().value;
  const double sg40 = sg_from_weight_percent(WeightPercent{40.0}).value().value;
  CHECK(sg30 < 1.2213);
  CHECK(sg30 > 1.2213 - 0.004);
  CHECK(sg40 < 1.3051);
  CHECK(sg40 > 1.3051 - 0.004);
}

TEST_CASE("battery SGs map to the published acid strengths") {
  // Reference notes section 4 (wt % at SG 25/25 from the Myhre et al. 1998
  // density polynomial, J. Chem. Eng. Data 43, 617): 1.100 14.6, 1.150 21.3,
  // 1.200 27.6, 1.225 30.7, 1.250 33.7, 1.265 35.5, 1.280 37.2, 1.300 39.5.
  // Tolerance 0.3 wt %: the polynomial fits CRC within 0.0008 g/cm3
  // (0.12 wt %), 25 degC values carry +/-0.001 (0.15 wt %), plus rounding.
  struct Row { double sg, wt; };
  for (const Row row : {Row{1.100, 14.6}, Row{1.150, 21.3}, Row{1.200, 27.6}, Row{1.225, 30.7},
                        Row{1.250, 33.7}, Row{1.265, 35.5}, Row{1.280, 37.2}, Row{1.300, 39.5}}) {
    const auto w = weight_percent_from_sg(SpecificGravity{row.sg});
    REQUIRE(w.ok());
    CHECK_NEAR(w->value, row.wt, 0.3);
  }
}

TEST_CASE("molality of full-charge acid is about 5.6 mol/kg") {
  // Reference notes section 4: SG 1.265 -> 5.60 mol/kg, 1.200 -> 3.89
  // (derived, Myhre et al. 1998). Tolerance 0.05 mol/kg (0.3 wt % above).
  CHECK_NEAR(molality_from_sg(SpecificGravity{1.265}).value().value, 5.60, 0.05);
  CHECK_NEAR(molality_from_sg(SpecificGravity{1.200}).value().value, 3.89, 0.05);
}

TEST_CASE("SG outside the density table is an error naming sg and the range") {
  for (const double sg : {0.999, 1.396, 1.5}) {
    const auto w = weight_percent_from_sg(SpecificGravity{sg});
    REQUIRE_FALSE(w.ok());
    CHECK(w.error().field == "sg");
    CHECK(w.error().allowed == "1.000 to 1.395");
  }
  CHECK_FALSE(molality_from_sg(SpecificGravity{1.41}).ok());
  CHECK_FALSE(sg_from_weight_percent(WeightPercent{55.0}).ok());
  CHECK_FALSE(sg_from_weight_percent(WeightPercent{-1.0}).ok());
  const auto m = sg_from_molality(Molality{11.0});
  REQUIRE_FALSE(m.ok());
  CHECK(m.error().field == "molality");
}

TEST_CASE("the table ends are water and 50 wt % acid") {
  // Pure water has SG 1.000 on any same-temperature basis (definition).
  CHECK_NEAR(weight_percent_from_sg(kMinTableSg).value().value, 0.0, 1e-9);
  // Top of the table: 50 wt % (CRC 102nd ed. last row used) lies just above kMaxTableSg.
  CHECK(weight_percent_from_sg(kMaxTableSg).value().value > 49.5);
  CHECK(weight_percent_from_sg(kMaxTableSg).value().value <= 50.0);
}

TEST_CASE("SG to weight percent to molality rises monotonically") {
  // Property over the whole table in steps of 0.0005.
  double last_w = -1.0;
  double last_m = -1.0;
  for (int i = 0; i < 790; ++i) {
    const double sg = 1.000 + 0.0005 * i;  // 1.000 to 1.3945
    const double w = weight_percent_from_sg(SpecificGravity{sg}).value().value;
    const double m = molality_from_sg(SpecificGravity{sg}).value().value;
    CHECK(w > last_w);
    CHECK(m > last_m);
    last_w = w;
    last_m = m;
  }
}

TEST_CASE("inverse of the composition model returns the input within 1e-6") {
  // Property: sg -> wt % -> sg and m -> sg -> m over the whole table.
  for (int i = 0; i < 395; ++i) {
    const double sg = 1.000 + 0.001 * i;  // 1.000 to 1.394
    const auto w = weight_percent_from_sg(SpecificGravity{sg});
    REQUIRE(w.ok());
    CHECK_NEAR(sg_from_weight_percent(*w).value().value, sg, 1e-6);
  }
  for (int i = 1; i <= 200; ++i) {
    const double m = 0.05 * i;  // 0.05 to 10 mol/kg
    const auto sg = sg_from_molality(Molality{m});
    REQUIRE(sg.ok());
    CHECK_NEAR(molality_from_sg(*sg).value().value, m, 1e-6);
  }
}
