// Robust straight-line trend: the Theil-Sen estimator.
//
// Slope = median of the slopes of all pairs of points with distinct x
// (Theil 1950; Sen, "Estimates of the regression coefficient based on
// Kendall's tau", JASA 63 (1968) 1379). Its confidence interval is the
// distribution-free rank interval of Sen 1968 in the form given by Hollander
// & Wolfe, "Nonparametric Statistical Methods" (2nd ed., 1999), with the
// normal approximation to Kendall's S and whole ranks (conservative).
#pragma once

#include <optional>
#include <span>

namespace pbfleet::analytics {

struct TrendFit {
  int points = 0;                  // n
  double slope = 0.0;              // median pairwise slope, y units per x unit
  double intercept = 0.0;          // median(y) - slope * median(x)
  double centre_x = 0.0;           // median(x): the fitted line passes (centre_x, median(y))
  double slope_low = 0.0;          // lower end of the confidence interval
  double slope_high = 0.0;         // upper end
  double confidence = 0.0;         // level of [slope_low, slope_high], e.g. 0.90
  // Share of pairwise slopes with the same sign as `slope` (0.5..1; a
  // plain-words confidence: 1.0 means every pair agrees on the direction).
  double same_sign_fraction = 0.0;

  // True when the whole interval lies below zero (a downward trend at the
  // stated confidence), or above zero for significant_rise().
  [[nodiscard]] bool significant_fall() const { return slope_high < 0.0; }
  [[nodiscard]] bool significant_rise() const { return slope_low > 0.0; }
  // y on the fitted line at x.
  [[nodiscard]] double at(double x) const { return intercept + slope * x; }
  // y at x on a line of another slope through the same centre point (for
  // the band drawn from slope_low / slope_high).
  [[nodiscard]] double at(double x, double other_slope) const {
    return at(centre_x) + other_slope * (x - centre_x);
  }
};

// Theil-Sen fit of y on x at a two-sided confidence level in (0, 1).
// nullopt when fewer than 2 points or all x are equal.
// REQUIRES: x.size() == y.size().
std::optional<TrendFit> theil_sen(std::span<const double> x, std::span<const double> y,
                                  double confidence = 0.90);

// Standard normal quantile (inverse CDF) for p in (0, 1), by Newton steps on
// Phi(z) = erfc(-z / sqrt 2) / 2; absolute error below 1e-9.
double normal_quantile(double p);

}  // namespace pbfleet::analytics
