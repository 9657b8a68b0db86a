#include "models/solve.hpp"  // first: the header stands alone

#include <cmath>

#include <initializer_list>

#include <doctest/doctest.h>

#include "check_near.hpp"

using pbfleet::models::detail::solve_increasing;

TEST_CASE("the bracketed solver finds the root of an increasing function") {
  const auto root = solve_increasing([](double x) { return x * x * x; }, 0.0, 3.0, 2.0);
  REQUIRE(root.has_value());
  CHECK_NEAR(*root, std::cbrt(2.0), 1e-11);
}

TEST_CASE("the bracketed solver handles a steep, badly scaled function") {
  const auto root = solve_increasing([](double x) { return std::exp(20.0 * x); }, 0.0, 2.0, 5.0);
  REQUIRE(root.has_value());
  CHECK_NEAR(*root, std::log(5.0) / 20.0, 1e-11);
}

TEST_CASE("the bracketed solver refuses a target outside the bracket") {
  CHECK_FALSE(solve_increasing([](double x) { return x; }, 0.0, 1.0, 1.5).has_value());
  CHECK_FALSE(solve_increasing([](double x) { return x; }, 0.0, 1.0, -0.1).has_value());
  CHECK(*solve_increasing([](double x) { return x; }, 0.0, 1.0, 1.0) == 1.0);
}
