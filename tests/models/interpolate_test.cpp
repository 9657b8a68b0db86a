#include "models/interpolate.hpp"  // first: the header stands alone

#include <vector>

#include <initializer_list>

#include <doctest/doctest.h>

#include "check_near.hpp"

using pbfleet::models::detail::linear_clamped;
using pbfleet::models::detail::linear_extrapolated;
using pbfleet::models::detail::MonotoneCubic;

TEST_CASE("the monotone cubic passes through every node") {
  const std::vector<double> xs{0.0, 1.0, 2.5, 4.0, 7.0};
  const std::vector<double> ys{0.0, 0.5, 3.0, 3.1, 9.0};
  const MonotoneCubic curve(xs, ys);
  for (std::size_t i = 0; i < xs.size(); ++i) CHECK_NEAR(curve(xs[i]), ys[i], 1e-12);
}

TEST_CASE("the monotone cubic does not overshoot monotone data") {
  // Fritsch & Carlson (1980): PCHIP keeps monotone data monotone. The step
  // data below make an unconstrained cubic spline overshoot.
  const std::vector<double> xs{0, 1, 2, 3, 4, 5};
  const std::vector<double> ys{0, 0, 0, 1, 1, 1};
  const MonotoneCubic curve(xs, ys);
  double previous = curve(0.0);
  for (int i = 1; i <= 500; ++i) {
    const double now = curve(5.0 * i / 500.0);
    CHECK(now >= previous);
    CHECK(now >= 0.0);
    CHECK(now <= 1.0);
    previous = now;
  }
}

TEST_CASE("the monotone cubic reproduces a straight line") {
  const std::vector<double> xs{1, 2, 4, 8};
  const std::vector<double> ys{3, 5, 9, 17};  // y = 2x + 1
  const MonotoneCubic curve(xs, ys);
  for (double x = 1.0; x <= 8.0; x += 0.37) CHECK_NEAR(curve(x), 2.0 * x + 1.0, 1e-12);
}

TEST_CASE("linear helpers clamp or extend at the ends") {
  const std::vector<double> xs{0, 10, 20};
  const std::vector<double> ys{0, 5, 20};
  CHECK(linear_clamped(xs, ys, -5.0) == 0.0);
  CHECK(linear_clamped(xs, ys, 25.0) == 20.0);
  CHECK_NEAR(linear_clamped(xs, ys, 15.0), 12.5, 1e-12);
  CHECK_NEAR(linear_extrapolated(xs, ys, -10.0), -5.0, 1e-12);
  CHECK_NEAR(linear_extrapolated(xs, ys, 30.0), 35.0, 1e-12);
}
