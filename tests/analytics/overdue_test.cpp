#include "models/analytics/overdue.hpp"

#include <doctest/doctest.h>

#include "tests/analytics/synthetic.hpp"

namespace pa = pbfleet::analytics;
using namespace pa::testing;

TEST_CASE("a battery unread for more than 10 days is overdue, one read this week is not") {
  // Weekly rounds plus a few days' grace (common practice).
  CHECK(pa::is_overdue(days_before_now(15), test_now(), 10));
  CHECK(pa::is_overdue(days_before_now(10.5), test_now(), 10));
  CHECK_FALSE(pa::is_overdue(days_before_now(10), test_now(), 10));
  CHECK_FALSE(pa::is_overdue(days_before_now(3), test_now(), 10));
  CHECK(pa::is_overdue(std::nullopt, test_now(), 10));
}

TEST_CASE("overdue batteries are grouped by depot, longest silence first") {
  auto fresh = flooded_battery("NY-1");
  auto stale = flooded_battery("NY-2");
  auto staler = flooded_battery("NY-3");
  auto never = flooded_battery("H-1");
  never.depot_id = 2;
  never.depot_name = "Harbour";
  never.installed_on = std::chrono::floor<std::chrono::days>(days_before_now(30));
  auto retired = flooded_battery("H-2");
  retired.depot_id = 2;
  retired.depot_name = "Harbour";
  retired.in_service = false;
  const std::vector<pa::LastSeen> fleet{{&fresh, days_before_now(3)},
                                        {&stale, days_before_now(15)},
                                        {&staler, days_before_now(40)},
                                        {&never, std::nullopt},
                                        {&retired, days_before_now(200)}};
  const auto report = pa::overdue_report(fleet, test_now(), 10);
  REQUIRE(report.size() == 2);
  CHECK(report[0].depot_name == "Harbour");
  REQUIRE(report[0].batteries.size() == 1);
  CHECK(report[0].batteries[0].serial == "H-1");
  CHECK(report[0].batteries[0].never_read);
  REQUIRE(report[0].batteries[0].days_overdue_basis);
  CHECK(*report[0].batteries[0].days_overdue_basis == doctest::Approx(30.0 + 8.0 / 24.0));
  CHECK(report[1].depot_name == "North Yard");
  REQUIRE(report[1].batteries.size() == 2);
  CHECK(report[1].batteries[0].serial == "NY-3");
  CHECK(*report[1].batteries[0].days_overdue_basis == doctest::Approx(40.0));
  CHECK(report[1].batteries[1].serial == "NY-2");
  CHECK_FALSE(report[1].batteries[1].never_read);
}

TEST_CASE("a fleet read on time has nothing overdue") {
  auto b = flooded_battery("NY-1");
  const std::vector<pa::LastSeen> fleet{{&b, days_before_now(6)}};
  CHECK(pa::overdue_report(fleet, test_now(), 10).empty());
}
