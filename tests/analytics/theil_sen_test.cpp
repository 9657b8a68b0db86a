#include "models/analytics/theil_sen.hpp"

#include <doctest/doctest.h>

#include <algorithm>
#include <cmath>
#include <random>
#include <vector>

namespace pa = pbfleet::analytics;

TEST_CASE("Theil-Sen slope is the median of the pairwise slopes on a hand-checkable set") {
  // Worked by hand from the definition (Sen, JASA 63 (1968) 1379): the ten
  // pairwise slopes of these five points are 2, 0.5, 4/3, 0.75, -1, 1, 1/3,
  // 3, 1, -1; sorted: -1 -1 1/3 0.5 0.75 | 1 1 4/3 2 3; median (0.75+1)/2.
  const std::vector<double> x{1, 2, 3, 4, 5};
  const std::vector<double> y{2, 4, 3, 6, 5};
  const auto fit = pa::theil_sen(x, y, 0.90);
  REQUIRE(fit);
  CHECK(fit->points == 5);
  CHECK(fit->slope == doctest::Approx(0.875));
  // Intercept median(y) - slope * median(x) = 4 - 0.875 * 3 (Conover's
  // convention, common practice).
  CHECK(fit->intercept == doctest::Approx(1.375));
  // 8 of the 10 pairwise slopes are positive, like the median.
  CHECK(fit->same_sign_fraction == doctest::Approx(0.8));
  // Rank interval, hand-computed: k = 10 pairs, Var S = 10 * 15 / 9 = 16.67,
  // C = 1.645 * 4.082 = 6.715; ranks floor((10 - 6.715)/2) = 1 -> -1 and
  // ceil((10 + 6.715)/2 + 1) = 10 -> 3.
  CHECK(fit->slope_low == doctest::Approx(-1.0));
  CHECK(fit->slope_high == doctest::Approx(3.0));
  CHECK_FALSE(fit->significant_fall());
  CHECK_FALSE(fit->significant_rise());
}

TEST_CASE("Theil-Sen slope and 95 % interval match a published example with tied x") {
  // Example of the R package statpsych, ci.theil (method of Hollander &
  // Wolfe, Nonparametric Statistical Methods, 2nd ed., 1999): 15 points,
  // x tied at 28 (three times) and 40 (twice); documented result:
  // estimate 0.5, 95 % limits 0.3243243 and 0.75.
  const std::vector<double> y{21, 4, 9, 12, 35, 18, 10, 22, 24, 1, 6, 8, 13, 16, 19};
  const std::vector<double> x{67, 28, 30, 28, 52, 40, 25, 37, 44, 10, 14, 20, 28, 40, 51};
  const auto fit = pa::theil_sen(x, y, 0.95);
  REQUIRE(fit);
  CHECK(fit->slope == doctest::Approx(0.5));
  CHECK(fit->slope_low == doctest::Approx(0.3243243).epsilon(1e-6));
  CHECK(fit->slope_high == doctest::Approx(0.75));
  CHECK(fit->significant_rise());
}

TEST_CASE("one wild point does not move the Theil-Sen slope of an exact line") {
  // y = 2x + 1 with one reading mistyped as 100: 36 of the 45 pairwise slopes
  // are exactly 2, so the median is 2 (breakdown point about 29 %, Sen 1968).
  std::vector<double> x, y;
  for (int i = 0; i < 10; ++i) {
    x.push_back(i);
    y.push_back(2.0 * i + 1.0);
  }
  y[6] = 100.0;
  const auto fit = pa::theil_sen(x, y);
  REQUIRE(fit);
  CHECK(fit->slope == doctest::Approx(2.0));
  CHECK(fit->significant_rise());
}

TEST_CASE("an exact falling line gives its slope with every pair agreeing") {
  std::vector<double> x, y;
  for (int i = 0; i < 12; ++i) {
    x.push_back(7.0 * i);
    y.push_back(1.265 - 0.0001 * 7.0 * i);
  }
  const auto fit = pa::theil_sen(x, y);
  REQUIRE(fit);
  CHECK(fit->slope == doctest::Approx(-0.0001));
  CHECK(fit->same_sign_fraction == doctest::Approx(1.0));
  CHECK(fit->significant_fall());
  CHECK(fit->at(0.0) == doctest::Approx(1.265));
  CHECK(fit->at(70.0, -0.0002) == doctest::Approx(fit->at(fit->centre_x) - 0.0002 * (70.0 - fit->centre_x)));
}

TEST_CASE("a trend needs two points with different x") {
  const std::vector<double> one{1.0};
  CHECK_FALSE(pa::theil_sen(one, one));
  const std::vector<double> same_x{3.0, 3.0, 3.0};
  const std::vector<double> ys{1.0, 2.0, 3.0};
  CHECK_FALSE(pa::theil_sen(same_x, ys));
}

TEST_CASE("normal quantiles match the printed table") {
  // Upper percentage points of the standard normal distribution:
  // z(0.95) = 1.644854, z(0.975) = 1.959964, z(0.995) = 2.575829
  // (Abramowitz & Stegun, Handbook of Mathematical Functions, Table 26.5;
  // from memory).
  CHECK(pa::normal_quantile(0.95) == doctest::Approx(1.644854).epsilon(1e-6));
  CHECK(pa::normal_quantile(0.975) == doctest::Approx(1.959964).epsilon(1e-6));
  CHECK(pa::normal_quantile(0.995) == doctest::Approx(2.575829).epsilon(1e-6));
  CHECK(pa::normal_quantile(0.5) == doctest::Approx(0.0));
}

TEST_CASE("slope and interval are exactly the order statistics of the sorted pairwise slopes") {
  // The definition worked by brute force (sort every pairwise slope) on
  // seeded random sets of 2 to 300 points, with tied x and tied slopes, at
  // three confidence levels: the selection must give the same doubles.
  std::mt19937 rng(8);
  std::uniform_int_distribution<int> day(0, 400);
  std::uniform_int_distribution<int> sg(0, 30);
  for (int trial = 0; trial < 300; ++trial) {
    const int n = 2 + trial % 299;
    std::vector<double> x, y;
    for (int i = 0; i < n; ++i) {
      x.push_back(day(rng));
      y.push_back(1.200 + 0.001 * sg(rng));
    }
    std::vector<double> slopes;
    for (int i = 0; i < n; ++i)
      for (int j = i + 1; j < n; ++j)
        if (x[j] != x[i]) slopes.push_back((y[j] - y[i]) / (x[j] - x[i]));
    if (slopes.empty()) continue;
    std::sort(slopes.begin(), slopes.end());
    const double k = static_cast<double>(slopes.size());
    const auto at = [&](double rank) {  // 1-based, fractional ranks interpolated
      const double r = std::clamp(rank, 1.0, k) - 1.0;
      const auto lo = static_cast<std::size_t>(std::floor(r));
      if (lo + 1 >= slopes.size() || r == static_cast<double>(lo)) return slopes[lo];
      return slopes[lo] + (r - static_cast<double>(lo)) * (slopes[lo + 1] - slopes[lo]);
    };
    for (const double confidence : {0.5, 0.90, 0.99}) {
      CAPTURE(n);
      CAPTURE(confidence);
      const auto fit = pa::theil_sen(x, y, confidence);
      REQUIRE(fit);
      const double c = pa::normal_quantile(0.5 + 0.5 * confidence) * std::sqrt(k * (2.0 * n + 5.0) / 9.0);
      CHECK(fit->slope == at(0.5 * (k + 1.0)));
      CHECK(fit->slope_low == at(std::floor((k - c) / 2.0)));
      CHECK(fit->slope_high == at(std::ceil((k + c) / 2.0 + 1.0)));
    }
  }
}
