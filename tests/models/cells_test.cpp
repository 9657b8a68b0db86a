#include "models/cells.hpp"  // first: the header stands alone

#include <vector>

#include <initializer_list>

#include <doctest/doctest.h>

#include "check_near.hpp"

using namespace pbfleet::models;

namespace {
std::vector<SpecificGravity> cells(std::initializer_list<double> values) {
  std::vector<SpecificGravity> out;
  for (const double v : values) out.push_back(SpecificGravity{v});
  return out;
}
}  // namespace

TEST_CASE("a cell 0.060 below the others is flagged as the weak cell") {
  // Starting batteries: more than 0.050 between highest and lowest cell
  // (common practice); Army wording: one cell 0.050 below the others that
  // recharging does not cure means replace (US Army TM 5-3740-214-14).
  const auto readings = cells({1.265, 1.260, 1.200, 1.262, 1.265, 1.258});
  const auto result = check_cells(readings);
  CHECK_NEAR(result.spread, 0.065, 1e-9);
  CHECK(result.exceeds);
  REQUIRE(result.weak_cell.has_value());
  CHECK(*result.weak_cell == 2);
}

TEST_CASE("an even battery is not flagged") {
  const auto result = check_cells(cells({1.265, 1.255, 1.250, 1.262, 1.265, 1.258}));
  CHECK_NEAR(result.spread, 0.015, 1e-9);
  CHECK_FALSE(result.exceeds);
  CHECK_FALSE(result.weak_cell.has_value());
}

TEST_CASE("a spread of exactly 0.050 is within the starting-battery limit") {
  const auto result = check_cells(cells({1.265, 1.215}));
  CHECK_FALSE(result.exceeds);
}

TEST_CASE("the stricter Army limit flags a 0.030 spread") {
  // US Army TM 9-6140-200-14: more than 0.025 between any two cells of a
  // fully charged battery makes it unserviceable.
  CHECK(kStationarySpreadLimit == 0.025);
  const auto readings = cells({1.280, 1.275, 1.250});
  CHECK(check_cells(readings, kStationarySpreadLimit).exceeds);
  CHECK(*check_cells(readings, kStationarySpreadLimit).weak_cell == 2);
  CHECK_FALSE(check_cells(readings).exceeds);
}

TEST_CASE("the limit is configurable") {
  // US Army TM 55-2210-224-12 (rail): more than 0.020 may indicate a dead cell.
  CHECK(check_cells(cells({1.250, 1.228}), 0.020).exceeds);
}
