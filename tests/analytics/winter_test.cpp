#include "models/analytics/winter.hpp"

#include <doctest/doctest.h>

#include <string>

#include "tests/analytics/synthetic.hpp"

namespace pa = pbfleet::analytics;
namespace pm = pbfleet::models;
using namespace pa::testing;

namespace {

const pa::AnalyticsSettings kSettings;

pa::ColdSpec cold_in(int days_ahead, std::optional<double> low = std::nullopt) {
  pa::ColdSpec c;
  c.cold_date = std::chrono::floor<std::chrono::days>(test_now()) + std::chrono::days{days_ahead};
  if (low) c.low = pm::Celsius{*low};
  return c;
}

pa::WinterRisk judge(const pa::BatteryContext& b, const std::vector<pa::ReadingPoint>& readings,
                     const pa::ColdSpec& cold) {
  return pa::assess_winter(pa::WinterInput{&b, readings}, cold, test_now(), kSettings);
}

bool any_reason_contains(const pa::WinterRisk& r, std::string_view part) {
  for (const auto& s : r.reasons) {
    if (s.find(part) != std::string::npos) return true;
  }
  return false;
}

}  // namespace

TEST_CASE("a healthy battery is ok for the winter with room to spare") {
  const auto b = flooded_battery("NY-001", 800.0, 400.0);
  const std::vector readings{reading_from_truth(days_before_now(2), Truth{.cell_sg = 1.265})};
  const auto r = judge(b, readings, cold_in(14));
  CHECK(r.level == pa::RiskLevel::ok);
  REQUIRE(r.crank_margin);
  CHECK(*r.crank_margin > kSettings.crank_watch_margin);
  REQUIRE(r.freeze_margin_c);
  CHECK(*r.freeze_margin_c > 20.0);
  REQUIRE(r.projected_soc_percent);
  CHECK(*r.projected_soc_percent < *r.soc_at_reading_percent);
  CHECK(*r.projected_soc_percent > 90.0);
  CHECK(r.low_c == -25.0);
  CHECK(r.action == "none");
  CHECK(r.cautions.empty());
}

TEST_CASE("electrolyte at SG 1.150 freezes at -30 C but not at -10 C") {
  // SG 1.150 freezes at +5 degF = -15 C (US Army TM 5-1185, battery section;
  // CRC Handbook 102nd ed. freezing-point data give -15.5 C, reference
  // values section 7). No rated CCA: only freezing is judged.
  const auto b = flooded_battery("NY-002", 0.0, 0.0);
  const std::vector readings{reading_from_truth(test_now(), Truth{.cell_sg = 1.150})};
  const auto mild = judge(b, readings, cold_in(0, -10.0));
  const auto hard = judge(b, readings, cold_in(0, -30.0));
  REQUIRE(mild.freezing_point_c);
  CHECK(*mild.freezing_point_c == doctest::Approx(-15.0).epsilon(0.14));  // within 2 C
  REQUIRE(mild.freeze_margin_c);
  CHECK(*mild.freeze_margin_c > 0.0);
  CHECK(mild.level != pa::RiskLevel::act_now);
  CHECK_FALSE(any_reason_contains(mild, "freezes at"));
  REQUIRE(hard.freeze_margin_c);
  CHECK(*hard.freeze_margin_c < 0.0);
  CHECK(hard.level == pa::RiskLevel::act_now);
  CHECK(any_reason_contains(hard, "freezes at"));
  CHECK(any_reason_contains(hard, "cranking not judged"));
}

TEST_CASE("a half-charged battery that will not crank at the low must act now, with the numbers in words") {
  const auto b = flooded_battery("NY-003", 800.0, 420.0);
  const std::vector readings{reading_from_truth(days_before_now(1), Truth{.cell_sg = 1.190})};
  const auto r = judge(b, readings, cold_in(7));
  CHECK(r.level == pa::RiskLevel::act_now);
  REQUIRE(r.crank_margin);
  CHECK(*r.crank_margin < 1.0);
  REQUIRE_FALSE(r.reasons.empty());
  CHECK(r.reasons.front().rfind("projected ", 0) == 0);
  CHECK(r.reasons.front().find("SOC at -25 C; available ") != std::string::npos);
  CHECK(r.reasons.front().find(" A needed") != std::string::npos);
  // Recharging would save it: full charge cranks.
  CHECK_FALSE(r.replacement_expected);
  CHECK(r.action.find("recharge") != std::string::npos);
  REQUIRE(r.cautions.size() == 1);
  CHECK(r.cautions[0].find("hydrogen") != std::string_view::npos);
}

TEST_CASE("a battery too small for its engine even when full is an expected replacement") {
  const auto b = flooded_battery("NY-004", 450.0, 500.0);
  const std::vector readings{reading_from_truth(days_before_now(1), Truth{.cell_sg = 1.265})};
  const auto r = judge(b, readings, cold_in(7));
  CHECK(r.level == pa::RiskLevel::act_now);
  CHECK(r.replacement_expected);
  REQUIRE(r.crank_margin_full);
  CHECK(*r.crank_margin_full < 1.0);
  CHECK(any_reason_contains(r, "would not crank even fully charged"));
  CHECK(r.action.rfind("will not crank at the low even fully charged", 0) == 0);
}

TEST_CASE("a surface-charged latest reading is passed over for the last settled one") {
  const auto b = flooded_battery("NY-005");
  const auto settled = reading_from_truth(days_before_now(8), Truth{.cell_sg = 1.240});
  auto charged = reading_from_truth(days_before_now(1), Truth{.cell_sg = 1.200, .rest_h = 0.5, .after_charge = true});
  charged.ocv_v = 12.95;
  const auto r = judge(b, {settled, charged}, cold_in(7));
  REQUIRE(r.reading_at);
  CHECK(*r.reading_at == settled.taken_at);
  // Data age counts the newest reading of any kind.
  REQUIRE(r.data_age_days);
  CHECK(*r.data_age_days == doctest::Approx(1.0));

  const auto only = judge(b, {charged}, cold_in(7));
  CHECK(only.level == pa::RiskLevel::no_data);
  CHECK_FALSE(only.projected_soc_percent);
  CHECK(any_reason_contains(only, "no trusted reading"));
}

TEST_CASE("stale data is said and watched") {
  const auto b = flooded_battery("NY-006");
  const std::vector readings{reading_from_truth(days_before_now(23), Truth{.cell_sg = 1.265})};
  const auto r = judge(b, readings, cold_in(7));
  REQUIRE(r.data_age_days);
  CHECK(*r.data_age_days == doctest::Approx(23.0));
  CHECK(any_reason_contains(r, "latest reading 23 days old"));
  CHECK(r.level == pa::RiskLevel::watch);
  CHECK(r.action == "take a settled reading (rest 4 h or more) on the next round");
  CHECK(r.cautions.empty());
}

TEST_CASE("a thin crank margin on a fresh settled reading asks for a load test, not another reading") {
  // 800 A rated, 500 A needed at -18 C: fully charged at -25 C it keeps a
  // margin between 1 and the 1.25 watch line (common practice headroom).
  const auto b = flooded_battery("NY-010", 800.0, 500.0);
  const std::vector readings{reading_from_truth(days_before_now(1), Truth{.cell_sg = 1.265})};
  const auto r = judge(b, readings, cold_in(3));
  REQUIRE(r.crank_margin);
  CHECK(*r.crank_margin >= 1.0);
  CHECK(*r.crank_margin < kSettings.crank_watch_margin);
  CHECK(r.level == pa::RiskLevel::watch);
  CHECK(r.action.find("load-test") != std::string::npos);
  REQUIRE(r.cautions.size() == 2);
  CHECK(r.cautions[1] == pa::kLoadTestCaution);
}

TEST_CASE("self-discharge at 80 F matches the Army's 0.001 SG per day") {
  // Wet-charged batteries lose about 0.001 SG per day at 80 degF in the
  // first 10 days (US Army TM 9-6140-200-14): on the 1.120-1.265 span that
  // is 0.69 % SOC per day, 6.9 points in 10 days. A one-value "low" equal to
  // the reading temperature makes the profile constant at 80 degF.
  const double t80 = pm::celsius_from_fahrenheit(80.0).value;
  const auto b = flooded_battery("NY-007");
  const std::vector readings{reading_from_truth(test_now(), Truth{.cell_sg = 1.265, .electrolyte_c = t80})};
  const auto r = judge(b, readings, cold_in(10, t80));
  REQUIRE(r.projected_soc_percent);
  CHECK(*r.soc_at_reading_percent - *r.projected_soc_percent == doctest::Approx(6.9).epsilon(0.15));
}

TEST_CASE("a longer or warmer wait before the cold date costs more charge") {
  const auto b = flooded_battery("NY-008");
  const std::vector readings{reading_from_truth(test_now(), Truth{.cell_sg = 1.265, .electrolyte_c = 15.0})};
  const auto soon = judge(b, readings, cold_in(7));
  const auto later = judge(b, readings, cold_in(60));
  CHECK(*later.projected_soc_percent < *soon.projected_soc_percent);
  const auto mild = judge(b, readings, cold_in(60, 10.0));
  CHECK(*mild.projected_soc_percent < *later.projected_soc_percent);
}

TEST_CASE("the low comes from the request, else the depot forecast, else the design low") {
  auto b = flooded_battery("NY-009");
  b.depot_id = 7;
  pa::ColdSpec c;
  CHECK(pa::low_for(b, c).value == -25.0);
  c.depot_lows[7] = pm::Celsius{-31.0};
  c.depot_lows[8] = pm::Celsius{-5.0};
  CHECK(pa::low_for(b, c).value == -31.0);
  c.low = pm::Celsius{-12.0};
  CHECK(pa::low_for(b, c).value == -12.0);
}

TEST_CASE("the fleet report ranks the worst first and counts per depot") {
  auto healthy = flooded_battery("A-1", 800.0, 400.0);
  auto weak = flooded_battery("A-2", 450.0, 500.0);
  auto unread = flooded_battery("B-1");
  unread.depot_id = 2;
  unread.depot_name = "Harbour";
  auto thin = flooded_battery("B-2", 800.0, 400.0);
  thin.depot_id = 2;
  thin.depot_name = "Harbour";
  auto retired = flooded_battery("B-3");
  retired.in_service = false;
  const std::vector full{reading_from_truth(days_before_now(2), Truth{.cell_sg = 1.265})};
  const std::vector low{reading_from_truth(days_before_now(2), Truth{.cell_sg = 1.225})};
  const std::vector<pa::WinterInput> inputs{
      {&healthy, full}, {&weak, full}, {&unread, {}}, {&thin, low}, {&retired, full}};
  const auto report = pa::winter_report(inputs, cold_in(7), test_now(), kSettings);
  REQUIRE(report.batteries.size() == 4);
  CHECK(report.batteries[0].serial == "A-2");
  CHECK(report.batteries[0].level == pa::RiskLevel::act_now);
  CHECK(report.batteries[1].serial == "B-2");
  CHECK(report.batteries[1].level == pa::RiskLevel::watch);
  CHECK(report.batteries[2].serial == "B-1");
  CHECK(report.batteries[2].level == pa::RiskLevel::no_data);
  CHECK(report.batteries[3].serial == "A-1");
  REQUIRE(report.depots.size() == 2);
  CHECK(report.depots[0].depot_name == "Harbour");
  CHECK(report.depots[0].batteries == 2);
  CHECK(report.depots[0].watch == 1);
  CHECK(report.depots[0].no_data == 1);
  CHECK(report.depots[1].depot_name == "North Yard");
  CHECK(report.depots[1].act_now == 1);
  CHECK(report.depots[1].ok == 1);
  CHECK(report.depots[1].expected_replacements == 1);
  REQUIRE(report.depots[1].oldest_data_days);
  CHECK(*report.depots[1].oldest_data_days == doctest::Approx(2.0));
}

TEST_CASE("risk level words are stable") {
  CHECK(pa::to_string(pa::RiskLevel::ok) == "ok");
  CHECK(pa::to_string(pa::RiskLevel::watch) == "watch");
  CHECK(pa::to_string(pa::RiskLevel::act_now) == "act_now");
  CHECK(pa::to_string(pa::RiskLevel::no_data) == "no_data");
}
