#include "models/analytics/replacement.hpp"

#include <doctest/doctest.h>

#include "models/analytics/derive.hpp"
#include "models/state_of_charge.hpp"
#include "tests/analytics/synthetic.hpp"

namespace pa = pbfleet::analytics;
namespace pm = pbfleet::models;
using namespace pa::testing;
using std::chrono::days;
using std::chrono::floor;

namespace {

const pa::AnalyticsSettings kSettings;
constexpr int kWeeks = 26;

pa::BatteryHistory sulfating(const char* serial, double drop_per_30d, double rated = 800.0, double need = 400.0) {
  pa::BatteryHistory h;
  h.battery = flooded_battery(serial, rated, need);
  for (int i = 0; i < kWeeks; ++i) {
    Truth t{.cell_sg = 1.265 - drop_per_30d * 7.0 * i / 30.0 + wiggle(i, 0.002), .after_charge = true};
    h.readings.push_back(reading_from_truth(days_before_now(7.0 * (kWeeks - 1 - i)), t));
  }
  return h;
}

pa::ReplacementForecast forecast(const pa::BatteryHistory& h) {
  return pa::forecast_replacement(h.battery, pa::assess_sulfation(h, test_now(), kSettings), test_now(), kSettings);
}

}  // namespace

TEST_CASE("a sulfating battery gets a replacement date near the true crossing, inside its band") {
  // Truth: full-charge SG 1.265 falling 0.004 per 30 days from the first
  // reading (175 days ago) reaches the 80 % capacity SG, 1.120 + 0.8 x 0.145
  // = 1.236, after 0.029 / 0.004 x 30 = 217.5 days: about 42 days from now.
  const auto f = forecast(sulfating("S-1", 0.004));
  CHECK(f.criterion == pa::ReplaceCriterion::capacity);
  CHECK(f.threshold_sg == doctest::Approx(1.236).epsilon(0.0005));
  REQUIRE(f.date);
  const auto true_date = floor<days>(test_now()) + days{42};
  CHECK(std::abs((*f.date - true_date).count()) <= 15);
  REQUIRE(f.earliest);
  REQUIRE(f.latest);
  CHECK(*f.earliest <= *f.date);
  CHECK(*f.date <= *f.latest);
  CHECK_FALSE(f.already_crossed);
  REQUIRE(f.slope_sg_per_30d);
  CHECK(*f.slope_sg_per_30d == doctest::Approx(-0.004).epsilon(0.25));
  CHECK(f.reason.find("(capacity) around ") != std::string::npos);
}

TEST_CASE("the cranking threshold is where the crank margin at the design low is 1") {
  // A 650 A battery on an engine needing 420 A at -18 C must stay nearly
  // full to crank at -25 C: its cranking threshold lies above the capacity one.
  const auto b = flooded_battery("C-1", 650.0, 420.0);
  const auto sg = pa::cranking_threshold_sg(b, pm::Celsius{-25.0});
  REQUIRE(sg);
  const double soc = pm::soc_from_sg(pm::SpecificGravity{*sg}, b.spec).value;
  const auto available = pm::available_cca(b.spec.rated_cca, pm::Celsius{-25.0}, pm::Percent{soc});
  const auto required = pm::required_current_at(*b.required_cca, pm::Celsius{-25.0});
  CHECK(pm::crank_margin(available, required) == doctest::Approx(1.0).epsilon(0.002));
  const auto f = forecast(sulfating("C-1", 0.004, 650.0, 420.0));
  CHECK(f.criterion == pa::ReplaceCriterion::cranking);
  CHECK(f.threshold_sg == doctest::Approx(*sg));
  CHECK(f.threshold_sg > pa::sg_for_soc(pm::Percent{80.0}, b.spec).value);
  CHECK(f.reason.find("cranking at -25 C") != std::string::npos);
}

TEST_CASE("a cranking threshold needs the rated CCA and the engine need") {
  CHECK_FALSE(pa::cranking_threshold_sg(flooded_battery("N-1", 0.0, 400.0), pm::Celsius{-25.0}));
  CHECK_FALSE(pa::cranking_threshold_sg(flooded_battery("N-2", 800.0, 0.0), pm::Celsius{-25.0}));
  auto by_engine = flooded_battery("N-3", 800.0, 0.0);
  by_engine.engine = pm::EngineKind::diesel;
  by_engine.displacement_l = 7.7;
  CHECK(pa::cranking_threshold_sg(by_engine, pm::Celsius{-25.0}));
}

TEST_CASE("a battery that will not crank even when full has already crossed") {
  const auto f = forecast(sulfating("X-1", 0.004, 450.0, 500.0));
  CHECK(f.criterion == pa::ReplaceCriterion::cranking);
  CHECK(f.already_crossed);
  REQUIRE(f.date);
  CHECK(*f.date == floor<days>(test_now()));
}

TEST_CASE("a healthy battery gets no replacement date") {
  const auto f = forecast(sulfating("H-1", 0.0));
  CHECK_FALSE(f.date);
  CHECK_FALSE(f.already_crossed);
  CHECK_FALSE(f.reason.empty());
}

TEST_CASE("without enough readings there is no forecast, and the reason says why") {
  pa::BatteryHistory h;
  h.battery = flooded_battery("F-1");
  h.readings.push_back(reading_from_truth(test_now(), Truth{.cell_sg = 1.265}));
  const auto f = forecast(h);
  CHECK_FALSE(f.date);
  CHECK(f.reason == "no trend yet: 1 trusted readings of 8 needed");
}

TEST_CASE("the budget list runs by date, undated last") {
  std::vector<pa::BatteryHistory> fleet{sulfating("A", 0.0), sulfating("B", 0.002), sulfating("C", 0.004)};
  const auto list = pa::replacement_report(fleet, test_now(), kSettings);
  REQUIRE(list.size() == 3);
  CHECK(list[0].serial == "C");
  REQUIRE(list[0].date);
  CHECK(list[1].serial == "B");
  REQUIRE(list[1].date);
  CHECK(*list[0].date < *list[1].date);
  CHECK(list[2].serial == "A");
  CHECK_FALSE(list[2].date);
}
