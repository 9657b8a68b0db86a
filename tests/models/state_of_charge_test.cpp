#include "models/state_of_charge.hpp"  // first: the header stands alone

#include <optional>
#include <string>

#include <initializer_list>

#include <doctest/doctest.h>

#include "check_near.hpp"
#include "models/specific_gravity.hpp"

using namespace pbfleet::models;

namespace {

const BatterySpec kFlooded = default_spec(Chemistry::flooded);
constexpr Celsius k25{25.0};

// An SG published on the 80 degF scale, expressed on the model's 25 degC basis.
SpecificGravity from_80f(double sg80) {
  return correct_sg(SpecificGravity{sg80}, reference_temperature(SgReference::f80));
}

// SocInputs spelled out, so every field is set on purpose.
SocInputs inputs(std::optional<double> sg, std::optional<double> ocv, bool settled = true,
                 double tolerance = kDefaultSocDisagreementPct) {
  SocInputs in;
  if (sg) in.from_sg = Percent{*sg};
  if (ocv) in.from_ocv = Percent{*ocv};
  in.ocv_settled = settled;
  in.disagreement_tolerance_pct = tolerance;
  return in;
}

double soc_ocv(double v, const BatterySpec& spec = kFlooded) {
  return soc_from_ocv(Volts{v}, k25, spec).value().value;
}

}  // namespace

TEST_CASE("SOC from SG follows the Army SG table for a flooded battery") {
  // US Army TM 5-4210-230-14&P-1, battery section, SG at 80 degF:
  // 100 % 1.265, 75 % 1.225, 50 % 1.190, 25 % 1.155, 0 % 1.120.
  // Tolerance 3 points: the table's steps are 0.035-0.040, not exactly even
  // (one step of 0.005 is 3.4 points on a 0.145 span).
  struct Row { double sg80, soc; };
  for (const Row row : {Row{1.265, 100}, Row{1.225, 75}, Row{1.190, 50}, Row{1.155, 25},
                        Row{1.120, 0}}) {
    CHECK_NEAR(soc_from_sg(from_80f(row.sg80), kFlooded).value, row.soc, 3.0);
  }
}

TEST_CASE("SOC from SG follows the TM 5-1185 table for a battery that is full at 1.280") {
  // US Army TM 5-1185, battery section, SG at 80 degF: 1.280 100 %,
  // 1.250 75 %, 1.220 50 %, 1.190 25 %, 1.160 almost discharged.
  // Tolerance 1 point: the published table is evenly spaced (0.030 per 25 %).
  BatterySpec spec = kFlooded;
  spec.full_charge_sg = from_80f(1.280);
  spec.discharged_sg = from_80f(1.160);
  struct Row { double sg80, soc; };
  for (const Row row : {Row{1.280, 100}, Row{1.250, 75}, Row{1.220, 50}, Row{1.190, 25}}) {
    CHECK_NEAR(soc_from_sg(from_80f(row.sg80), spec).value, row.soc, 1.0);
  }
}

TEST_CASE("SOC from SG is clamped to 0..100") {
  CHECK(soc_from_sg(SpecificGravity{1.300}, kFlooded).value == 100.0);
  CHECK(soc_from_sg(SpecificGravity{1.050}, kFlooded).value == 0.0);
}

TEST_CASE("the flooded SG cross-check table gives its rows back") {
  // TM 5-4210-230-14&P-1 SG column (80 degF), fed in on the 25 degC basis.
  // Tolerance 0.5 points: the basis conversion is exact, only rounding remains.
  struct Row { double sg80, soc; };
  for (const Row row : {Row{1.265, 100}, Row{1.225, 75}, Row{1.190, 50}, Row{1.155, 25},
                        Row{1.120, 0}}) {
    CHECK_NEAR(table_soc_from_sg(from_80f(row.sg80), Chemistry::flooded).value, row.soc, 0.5);
    CHECK_NEAR(table_soc_from_sg(from_80f(row.sg80), Chemistry::efb).value, row.soc, 0.5);
  }
}

TEST_CASE("the flooded OCV cross-check table gives its rows back") {
  // Common practice (no traceable source), flooded 12 V at 80 degF:
  // 12.65 100 %, 12.45 75 %, 12.24 50 %, 12.06 25 %, 11.89 0 %. Exact rows.
  struct Row { double v, soc; };
  for (const Row row : {Row{12.65, 100}, Row{12.45, 75}, Row{12.24, 50}, Row{12.06, 25},
                        Row{11.89, 0}}) {
    CHECK_NEAR(table_soc_from_ocv(Volts{row.v}, Chemistry::flooded).value, row.soc, 1e-9);
  }
  CHECK(table_soc_from_ocv(Volts{13.0}, Chemistry::flooded).value == 100.0);
  CHECK(table_soc_from_ocv(Volts{11.0}, Chemistry::flooded).value == 0.0);
}

TEST_CASE("the AGM OCV table tops out higher than the flooded one") {
  // Common practice (no traceable source): AGM and gel read about 12.8-12.9 V
  // when full; 12.65 V is then well short of full.
  CHECK_NEAR(table_soc_from_ocv(Volts{12.85}, Chemistry::agm).value, 100.0, 1e-9);
  CHECK(table_soc_from_ocv(Volts{12.65}, Chemistry::agm).value < 90.0);
  CHECK(table_soc_from_ocv(Volts{12.65}, Chemistry::gel).value < 90.0);
}

TEST_CASE("the Nernst SOC from OCV agrees with the common-practice OCV table") {
  // Cross-check of the model against the flooded 12 V table (common
  // practice, no traceable source): 12.65 100, 12.45 75, 12.24 50, 12.06 25,
  // 11.89 0 %. Tolerance 5 points: the table is a rule of thumb at 80 degF
  // and 5 points is about 40 mV, the meter error band.
  struct Row { double v, soc; };
  for (const Row row : {Row{12.65, 100}, Row{12.45, 75}, Row{12.24, 50}, Row{12.06, 25},
                        Row{11.89, 0}}) {
    CHECK_NEAR(soc_ocv(row.v), row.soc, 5.0);
  }
}

TEST_CASE("12.4 V is about three quarters charged") {
  // US Army TM 5-3805-262-20 voltage test: 12.4 V = 75 %, 12.2 V = 50 %
  // (its scale tops at 12.6 V rather than 12.65 V). Tolerance 10 points:
  // the manual's coarse 0.2 V steps against our full SG of 1.265.
  CHECK_NEAR(soc_ocv(12.4), 75.0, 10.0);
  CHECK_NEAR(soc_ocv(12.2), 50.0, 10.0);
}

TEST_CASE("about 80 mV of OCV spans 10 points of charge") {
  // Shop convention (common practice): ~80 mV per 10 % SOC on a 12 V
  // battery. Tolerance 2.5 points.
  CHECK_NEAR(soc_ocv(12.28) - soc_ocv(12.20), 10.0, 2.5);
}

TEST_CASE("a few tens of millivolts of meter error move the SOC by several points") {
  // Common practice: +/-0.03 V on a 12 V flooded battery is 3-6 points.
  const auto u = ocv_soc_uncertainty_pct(Volts{12.30}, k25, kFlooded);
  REQUIRE(u.ok());
  CHECK(*u >= 3.0);
  CHECK(*u <= 6.0);
  // Twice the meter error, about twice the uncertainty.
  const auto u2 = ocv_soc_uncertainty_pct(Volts{12.30}, k25, kFlooded, Volts{0.06});
  CHECK(*u2 > 1.7 * *u);
}

TEST_CASE("a hydrometer step of 0.005 is about 3.4 points on a flooded battery") {
  // 0.005 / (1.265 - 1.120) = 3.45 points (arithmetic on the TM 5-4210 span).
  CHECK_NEAR(sg_soc_uncertainty_pct(kFlooded), 3.45, 0.01);
}

TEST_CASE("SOC from an impossible OCV is an error") {
  const auto soc = soc_from_ocv(Volts{10.0}, k25, kFlooded);
  REQUIRE_FALSE(soc.ok());
  CHECK(soc.error().field == "ocv_v");
}

TEST_CASE("an OCV is settled after the threshold rest and not before") {
  // Default 4 h (common practice; 6-24 h is better).
  CHECK_FALSE(ocv_is_settled(Hours{3.9}));
  CHECK(ocv_is_settled(Hours{4.0}));
  CHECK(ocv_is_settled(Hours{24.0}));
  CHECK_FALSE(ocv_is_settled(std::nullopt));
  CHECK_FALSE(ocv_is_settled(Hours{5.0}, Hours{6.0}));
}

TEST_CASE("one estimate alone passes through with its own uncertainty") {
  const auto sg_only = combine_soc(inputs(62.0, std::nullopt));
  CHECK(sg_only.soc.value == 62.0);
  CHECK(sg_only.uncertainty_pct == kDefaultSgSocUncertaintyPct);
  CHECK_FALSE(sg_only.disagreement);
  const auto ocv_only = combine_soc(inputs(std::nullopt, 40.0, false));
  CHECK(ocv_only.soc.value == 40.0);
  CHECK(ocv_only.uncertainty_pct == kUnsettledOcvUncertaintyPct);
}

TEST_CASE("agreeing SG and OCV combine between the two with a smaller uncertainty") {
  const auto c = combine_soc(inputs(70.0, 76.0));
  CHECK(c.soc.value > 70.0);
  CHECK(c.soc.value < 76.0);
  CHECK(c.uncertainty_pct < kDefaultSgSocUncertaintyPct);
  CHECK_FALSE(c.disagreement);
  CHECK(c.note.empty());
}

TEST_CASE("an unsettled OCV counts for little") {
  const auto settled = combine_soc(inputs(60.0, 72.0));
  const auto unsettled =
      combine_soc(inputs(60.0, 72.0, false));
  CHECK(unsettled.soc.value < settled.soc.value);
  CHECK(unsettled.soc.value < 61.0);  // weight ratio (4/20)^2 = 1/25 -> about 60.5
}

TEST_CASE("SG and OCV far apart are flagged with the likely causes") {
  const auto high_ocv =
      combine_soc(inputs(40.0, 80.0, false));
  CHECK(high_ocv.disagreement);
  CHECK(high_ocv.uncertainty_pct >= 20.0);  // at least half the 40-point gap
  CHECK(high_ocv.note.find("surface charge") != std::string::npos);
  const auto low_ocv = combine_soc(inputs(90.0, 50.0));
  CHECK(low_ocv.disagreement);
  CHECK(low_ocv.note.find("weak or shorted cell") != std::string::npos);
  CHECK(low_ocv.note.find("hydrometer") != std::string::npos);
}

TEST_CASE("the disagreement tolerance is configurable") {
  const SocInputs in = inputs(50.0, 60.0, true, 5.0);
  CHECK(combine_soc(in).disagreement);
  CHECK_FALSE(combine_soc(inputs(50.0, 60.0)).disagreement);
}
