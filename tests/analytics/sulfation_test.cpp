#include "models/analytics/sulfation.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <random>
#include <string>

#include "tests/analytics/synthetic.hpp"

namespace pa = pbfleet::analytics;
namespace pm = pbfleet::models;
using namespace pa::testing;

namespace {

const pa::AnalyticsSettings kSettings;
constexpr int kWeeks = 26;

// Weekly readings after a charge for half a year; the full-charge SG falls
// by `drop_per_30d` (truth) with +/- 0.002 of deterministic reading noise.
pa::BatteryHistory weekly_after_charge(const char* serial, double drop_per_30d) {
  pa::BatteryHistory h;
  h.battery = flooded_battery(serial);
  for (int i = 0; i < kWeeks; ++i) {
    const double age_days = 7.0 * (kWeeks - 1 - i);
    const double day = 7.0 * i;
    Truth t{.cell_sg = 1.265 - drop_per_30d * day / 30.0 + wiggle(i, 0.002),
            .electrolyte_c = 2.0 + (i % 5) * 2.0,
            .after_charge = true};
    h.readings.push_back(reading_from_truth(days_before_now(age_days), t));
  }
  return h;
}

// Weekly settled readings at a fixed SG from `from_days_ago` to `to_days_ago`.
void add_weekly(pa::BatteryHistory& h, double sg, int from_days_ago, int to_days_ago) {
  for (int d = from_days_ago; d >= to_days_ago; d -= 7) {
    h.readings.push_back(reading_from_truth(days_before_now(d), Truth{.cell_sg = sg}));
  }
}

bool any_reason_contains(const pa::SulfationAssessment& a, std::string_view part) {
  return std::any_of(a.reasons.begin(), a.reasons.end(),
                     [&](const std::string& s) { return s.find(part) != std::string::npos; });
}

bool has_action(const pa::SulfationAssessment& a, pa::Action act) {
  return std::find(a.actions.begin(), a.actions.end(), act) != a.actions.end();
}

}  // namespace

TEST_CASE("a healthy battery shows no sulfation and needs nothing") {
  const auto a = pa::assess_sulfation(weekly_after_charge("H-1", 0.0), test_now(), kSettings);
  CHECK(a.level == pa::SulfationClass::none);
  CHECK(a.trend_basis == pa::TrendBasis::after_charge);
  REQUIRE(a.sg_trend);
  CHECK_FALSE(a.sg_trend->significant_fall());
  CHECK(std::abs(a.sg_trend->slope * 30.0) < 0.001);
  CHECK(a.undercharge_days == 0.0);
  CHECK(a.charges_seen == kWeeks);
  CHECK(a.charges_not_recovered == 0);
  CHECK(a.actions.empty());
}

TEST_CASE("a slowly sulfating battery shows a falling trend of about the true slope") {
  // Truth: full-charge SG falls 0.004 per 30 days (0.024 over the half year,
  // not yet past the 0.030 recovery gap).
  const auto a = pa::assess_sulfation(weekly_after_charge("S-1", 0.004), test_now(), kSettings);
  REQUIRE(a.sg_trend);
  CHECK(a.sg_trend->slope * 30.0 == doctest::Approx(-0.004).epsilon(0.25));
  CHECK(a.sg_trend->significant_fall());
  CHECK(a.sg_trend->same_sign_fraction > 0.8);
  CHECK(a.level == pa::SulfationClass::advancing);
  CHECK(any_reason_contains(a, "full-charge SG falling"));
  // Flooded: recharge, equalise (with its caution), then a load test.
  REQUIRE(a.actions.size() == 3);
  CHECK(a.actions[0] == pa::Action::recharge);
  CHECK(a.actions[1] == pa::Action::equalise);
  CHECK(a.actions[2] == pa::Action::load_test);
  REQUIRE(std::find(a.cautions.begin(), a.cautions.end(), pa::kEqualiseCaution) != a.cautions.end());
  CHECK(pa::kEqualiseCaution.find("hydrogen") != std::string_view::npos);
  CHECK(pa::kEqualiseCaution.find("maker's instructions, local codes and licensed practice") !=
        std::string_view::npos);
}

TEST_CASE("assessing from cached derived readings gives the same verdict") {
  const auto h = weekly_after_charge("S-3", 0.004);
  const auto derived = pa::derive_all(h.readings, h.battery.spec, kSettings);
  const auto cached = pa::assess_sulfation(h, derived, test_now(), kSettings);
  const auto fresh = pa::assess_sulfation(h, test_now(), kSettings);
  CHECK(cached.level == fresh.level);
  REQUIRE(cached.sg_trend);
  CHECK(cached.sg_trend->slope == fresh.sg_trend->slope);
  CHECK(cached.reasons == fresh.reasons);
}

TEST_CASE("equalising is never recommended for an AGM battery") {
  auto h = weekly_after_charge("S-2", 0.004);
  h.battery.spec = pm::default_spec(pm::Chemistry::agm, 6);
  h.battery.spec.full_charge_sg = pm::SpecificGravity{1.265};
  h.battery.spec.discharged_sg = pm::SpecificGravity{1.120};
  const auto a = pa::assess_sulfation(h, test_now(), kSettings);
  CHECK(a.level == pa::SulfationClass::advancing);
  CHECK_FALSE(has_action(a, pa::Action::equalise));
  CHECK(has_action(a, pa::Action::recharge));
}

TEST_CASE("too few readings give no trend and say so") {
  pa::BatteryHistory h;
  h.battery = flooded_battery("F-1");
  add_weekly(h, 1.265, 28, 0);  // 5 readings
  const auto a = pa::assess_sulfation(h, test_now(), kSettings);
  CHECK_FALSE(a.sg_trend);
  CHECK(a.trend_basis == pa::TrendBasis::none);
  CHECK(a.trend_points == 5);
  CHECK(any_reason_contains(a, "too few readings for a trend: 5 trusted of 8 needed"));
}

TEST_CASE("a battery kept at half charge for the whole window is undercharged for 90 days") {
  pa::BatteryHistory h;
  h.battery = flooded_battery("U-1");
  add_weekly(h, 1.190, 91, 0);  // about 48 % SOC, below the 75 % threshold
  const auto a = pa::assess_sulfation(h, test_now(), kSettings);
  CHECK(a.undercharge_days == doctest::Approx(90.0));
  CHECK(a.level == pa::SulfationClass::advancing);
  CHECK(any_reason_contains(a, "undercharged (below 75 %) for 90 of the last 90 days"));
  CHECK(has_action(a, pa::Action::recharge));
}

TEST_CASE("undercharge exposure ends when a full reading comes in") {
  pa::BatteryHistory h;
  h.battery = flooded_battery("U-2");
  add_weekly(h, 1.190, 91, 49);
  add_weekly(h, 1.265, 42, 0);
  const auto a = pa::assess_sulfation(h, test_now(), kSettings);
  CHECK(a.undercharge_days == doctest::Approx(48.0));
}

TEST_CASE("a battery that does not recover after charging is likely permanently sulfated") {
  pa::BatteryHistory h;
  h.battery = flooded_battery("R-1");
  for (int i = 0; i < 3; ++i) {
    h.readings.push_back(reading_from_truth(days_before_now(14 - 7 * i), Truth{.cell_sg = 1.215, .after_charge = true}));
  }
  const auto a = pa::assess_sulfation(h, test_now(), kSettings);
  CHECK(a.charges_seen == 3);
  CHECK(a.charges_not_recovered == 3);
  CHECK_FALSE(a.latest_charge_recovered);
  CHECK(a.level == pa::SulfationClass::likely_permanent);
  CHECK(any_reason_contains(a, "did not recover after 3 of 3 recorded charges"));
  REQUIRE(a.actions.size() == 2);
  CHECK(a.actions[0] == pa::Action::load_test);
  CHECK(a.actions[1] == pa::Action::replace);
}

TEST_CASE("a dead cell that charging does not cure names the cell and calls for replacement") {
  // One cell 0.050 below the others after recharging -> replace
  // (US Army TM 5-3740-214-14, battery test).
  pa::BatteryHistory h;
  h.battery = flooded_battery("D-1");
  Truth t{.after_charge = true};
  t.cells_sg = {1.265, 1.262, 1.140, 1.265, 1.260, 1.264};
  h.readings.push_back(reading_from_truth(days_before_now(0), t));
  const auto a = pa::assess_sulfation(h, test_now(), kSettings);
  CHECK(a.level == pa::SulfationClass::likely_permanent);
  REQUIRE(a.weak_cell);
  CHECK(*a.weak_cell == 3);
  CHECK(any_reason_contains(a, "cell 3 is weak"));
  CHECK(has_action(a, pa::Action::replace));
}

TEST_CASE("a cell drifting away from the others is an early sign") {
  pa::BatteryHistory h;
  h.battery = flooded_battery("C-1");
  for (int i = 0; i < kWeeks; ++i) {
    // Cell 2 drifts down 0.0012 a week; the other five rise a fifth of that
    // each, so the mean (and the full-charge trend) stays flat.
    const double rise = 0.0012 * i / 5.0;
    Truth t;
    t.cells_sg = {1.262 + rise, 1.255 - 0.0012 * i + wiggle(i, 0.001), 1.260 + rise,
                  1.262 + rise, 1.261 + rise, 1.262 + rise};
    h.readings.push_back(reading_from_truth(days_before_now(7.0 * (kWeeks - 1 - i)), t));
  }
  const auto a = pa::assess_sulfation(h, test_now(), kSettings);
  REQUIRE(a.spread_trend);
  CHECK(a.spread_trend->significant_rise());
  // Truth: spread grows 0.0012 + 0.00024 = 0.00144 a week.
  CHECK(a.spread_trend->slope * 30.0 == doctest::Approx(0.00144 * 30.0 / 7.0).epsilon(0.10));
  REQUIRE(a.sg_trend);
  CHECK_FALSE(a.sg_trend->significant_fall());
  CHECK(a.level == pa::SulfationClass::early);
  CHECK(any_reason_contains(a, "cell spread growing"));
}

TEST_CASE("a failed load test at full charge means replace") {
  pa::BatteryHistory h;
  h.battery = flooded_battery("L-1");
  auto r = reading_from_truth(test_now(), Truth{.cell_sg = 1.265, .electrolyte_c = 20.0});
  r.load_test_a = 400.0;
  r.load_test_end_v = 8.7;
  h.readings.push_back(r);
  const auto a = pa::assess_sulfation(h, test_now(), kSettings);
  CHECK(a.load_test_failed);
  CHECK(a.level == pa::SulfationClass::likely_permanent);
  CHECK(a.actions == std::vector<pa::Action>{pa::Action::replace});
  CHECK(any_reason_contains(a, "failed a load test"));
}

TEST_CASE("the fleet list puts the worst class first and leaves retired batteries out") {
  std::vector<pa::BatteryHistory> fleet{weekly_after_charge("A", 0.0), weekly_after_charge("B", 0.004),
                                        weekly_after_charge("C", 0.004)};
  fleet[2].battery.in_service = false;
  const auto list = pa::sulfation_report(fleet, test_now(), kSettings);
  REQUIRE(list.size() == 2);
  CHECK(list[0].serial == "B");
  CHECK(list[1].serial == "A");
}

TEST_CASE("class and action words are stable") {
  CHECK(pa::to_string(pa::SulfationClass::none) == "none");
  CHECK(pa::to_string(pa::SulfationClass::early) == "early");
  CHECK(pa::to_string(pa::SulfationClass::advancing) == "advancing");
  CHECK(pa::to_string(pa::SulfationClass::likely_permanent) == "likely_permanent");
  CHECK(pa::to_string(pa::Action::equalise) == "equalise");
  CHECK(pa::to_string(pa::TrendBasis::after_charge) == "after_charge");
}

// The basis the server keeps per battery (SulfationBasis) gives the same
// assessment as the whole history at any later "now": random histories of
// mixed rested, unsettled, after-charge and low-SOC readings, judged from
// the newest reading's day to a year later.
TEST_CASE("an assessment from a kept basis equals one from the whole history, at any later now") {
  std::mt19937 rng(4242);
  std::uniform_real_distribution<double> unit(0.0, 1.0);
  int compared = 0, exposed = 0;
  for (int battery = 0; battery < 60; ++battery) {
    pa::BatteryHistory h;
    h.battery = flooded_battery("B-1");
    const int count = 1 + static_cast<int>(unit(rng) * 120);
    for (int i = 0; i < count; ++i) {
      Truth t{.cell_sg = 1.150 + 0.115 * unit(rng),
              .electrolyte_c = -10.0 + 35.0 * unit(rng),
              .rest_h = unit(rng) < 0.3 ? 1.0 : 12.0,
              .with_sg = unit(rng) < 0.7,
              .after_charge = unit(rng) < 0.25};
      h.readings.push_back(reading_from_truth(days_before_now(7.0 * (count - i) + 3.0 * unit(rng)), t));
    }
    std::sort(h.readings.begin(), h.readings.end(),
              [](const auto& a, const auto& b) { return a.taken_at < b.taken_at; });
    const pa::SulfationBasis basis = pa::sulfation_basis(h, kSettings);
    for (const double later_days : {-0.9, 0.0, 3.0, 45.0, 89.5, 200.0, 365.0}) {
      const auto now = h.readings.back().taken_at +
                       std::chrono::duration_cast<std::chrono::seconds>(std::chrono::duration<double, std::ratio<86400>>(later_days));
      CAPTURE(battery);
      CAPTURE(later_days);
      const auto whole = pa::assess_sulfation(h, now, kSettings);
      const auto kept = pa::assess_sulfation(h.battery, basis, now, kSettings);
      CHECK(kept.undercharge_days == doctest::Approx(whole.undercharge_days).epsilon(1e-12));
      CHECK(kept.level == whole.level);
      CHECK(kept.reasons == whole.reasons);
      CHECK(kept.actions == whole.actions);
      CHECK(kept.trend_points == whole.trend_points);
      CHECK(kept.charges_seen == whole.charges_seen);
      CHECK(kept.weak_cell == whole.weak_cell);
      ++compared;
      exposed += whole.undercharge_days > 0.0;
    }
  }
  CHECK(compared == 60 * 7);
  CHECK(exposed > 30);  // the exposure path was exercised, not only zeros
}
