#include "models/analytics/history_view.hpp"

#include <doctest/doctest.h>

#include "tests/analytics/synthetic.hpp"

namespace pa = pbfleet::analytics;
using namespace pa::testing;

namespace {

pa::BatteryHistory three_weeks() {
  pa::BatteryHistory h;
  h.battery = flooded_battery("V-1");
  Truth low_cell;
  low_cell.cells_sg = {1.265, 1.265, 1.265, 1.200, 1.265, 1.265};
  auto watered = reading_from_truth(days_before_now(14), low_cell);
  watered.water_added = true;
  h.readings.push_back(watered);
  h.readings.push_back(reading_from_truth(days_before_now(7), low_cell));
  h.readings.push_back(reading_from_truth(test_now(), Truth{.cell_sg = 1.240, .after_charge = true}));
  h.events.push_back({days_before_now(400), pa::EventKind::fitted, "fitted to TR-104"});
  return h;
}

}  // namespace

TEST_CASE("the history view shows raw and corrected values side by side") {
  const auto view = pa::history_view(three_weeks(), pa::AnalyticsSettings{});
  CHECK(view.serial == "V-1");
  REQUIRE(view.rows.size() == 3);
  const auto& last = view.rows[2];
  REQUIRE(last.raw_mean_sg);
  REQUIRE(last.derived.corrected_sg);
  // Read at 5 C: the raw hydrometer value is above the corrected one.
  CHECK(*last.raw_mean_sg > *last.derived.corrected_sg);
  CHECK(*last.derived.corrected_sg == doctest::Approx(1.240).epsilon(0.0003));
  CHECK(last.raw_cell_sg.size() == 6);
  REQUIRE(last.electrolyte_c);
  CHECK(*last.electrolyte_c == doctest::Approx(5.0));
  CHECK(last.after_charge);
  REQUIRE(view.min_corrected_sg);
  REQUIRE(view.max_corrected_sg);
  CHECK(*view.min_corrected_sg < *view.max_corrected_sg);
  REQUIRE(view.min_soc_percent);
  CHECK(*view.min_soc_percent <= *view.max_soc_percent);
}

TEST_CASE("the history view merges events from readings and records in time order") {
  const auto view = pa::history_view(three_weeks(), pa::AnalyticsSettings{});
  REQUIRE(view.events.size() == 3);
  CHECK(view.events[0].kind == pa::EventKind::fitted);
  CHECK(view.events[1].kind == pa::EventKind::water_added);
  CHECK(view.events[2].kind == pa::EventKind::charged);
  CHECK(pa::to_string(view.events[2].kind) == "charged");
}

TEST_CASE("a window keeps the water hold that started before it") {
  const auto view = pa::history_view(three_weeks(), pa::AnalyticsSettings{}, days_before_now(8));
  REQUIRE(view.rows.size() == 2);
  CHECK(view.rows[0].derived.flags.has(pa::Flag::water_added_hold));
  CHECK_FALSE(view.rows[0].derived.flags.has(pa::Flag::cell_spread));
  // Events outside the window are left out.
  REQUIRE(view.events.size() == 1);
  CHECK(view.events[0].kind == pa::EventKind::charged);
}
