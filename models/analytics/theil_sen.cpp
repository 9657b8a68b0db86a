#include "models/analytics/theil_sen.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <vector>

namespace pbfleet::analytics {
namespace {

// Value at a 1-based fractional rank of the (unsorted) slopes, interpolated
// between neighbours; partially reorders `v`.
double at_rank(std::vector<double>& v, double rank) {
  const double r = std::clamp(rank, 1.0, static_cast<double>(v.size())) - 1.0;
  const auto lo = static_cast<std::size_t>(std::floor(r));
  std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(lo), v.end());
  const double a = v[lo];
  if (lo + 1 >= v.size() || r == static_cast<double>(lo)) return a;
  const double b = *std::min_element(v.begin() + static_cast<std::ptrdiff_t>(lo) + 1, v.end());
  return a + (r - static_cast<double>(lo)) * (b - a);
}

// Median of a copy of the values.
double median(std::vector<double> v) {
  return at_rank(v, 0.5 * (static_cast<double>(v.size()) + 1.0));
}

std::vector<double> pairwise_slopes(std::span<const double> x, std::span<const double> y) {
  std::vector<double> slopes;
  slopes.reserve(x.size() * (x.size() - 1) / 2);
  for (std::size_t i = 0; i < x.size(); ++i) {
    for (std::size_t j = i + 1; j < x.size(); ++j) {
      if (x[j] != x[i]) slopes.push_back((y[j] - y[i]) / (x[j] - x[i]));
    }
  }
  return slopes;
}

double same_sign_share(const std::vector<double>& slopes, double slope) {
  if (slope == 0.0) return 0.5;
  const auto agree = std::count_if(slopes.begin(), slopes.end(),
                                   [slope](double s) { return (s > 0.0) == (slope > 0.0) && s != 0.0; });
  return static_cast<double>(agree) / static_cast<double>(slopes.size());
}

}  // namespace

double normal_quantile(double p) {
  assert(p > 0.0 && p < 1.0);
  double lo = -40.0, hi = 40.0;
  constexpr int kSteps = 100;  // 80 / 2^100: exact to double precision
  for (int i = 0; i < kSteps; ++i) {
    const double mid = 0.5 * (lo + hi);
    const double phi = 0.5 * std::erfc(-mid / std::sqrt(2.0));
    (phi < p ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

std::optional<TrendFit> theil_sen(std::span<const double> x, std::span<const double> y, double confidence) {
  assert(x.size() == y.size());
  assert(confidence > 0.0 && confidence < 1.0);
  if (x.size() < 2) return std::nullopt;
  auto slopes = pairwise_slopes(x, y);
  if (slopes.empty()) return std::nullopt;
  TrendFit fit;
  fit.points = static_cast<int>(x.size());
  fit.confidence = confidence;
  const auto count = static_cast<double>(slopes.size());
  fit.slope = at_rank(slopes, 0.5 * (count + 1.0));
  fit.centre_x = median(std::vector<double>(x.begin(), x.end()));
  fit.intercept = median(std::vector<double>(y.begin(), y.end())) - fit.slope * fit.centre_x;
  fit.same_sign_fraction = same_sign_share(slopes, fit.slope);
  // Rank interval (Sen 1968; Hollander & Wolfe, Nonparametric Statistical
  // Methods, 2nd ed. 1999): C = z(1 - alpha/2) sqrt(Var S) with
  // Var S = k (2n + 5) / 9, k the pairs with distinct x (= n(n-1)(2n+5)/18
  // when no x is tied); limits at the ranks floor((k - C)/2) and
  // ceil((k + C)/2 + 1), clamped to 1..k (conservative: never narrower).
  const double n = fit.points;
  const double c = normal_quantile(0.5 + 0.5 * confidence) * std::sqrt(count * (2.0 * n + 5.0) / 9.0);
  fit.slope_low = at_rank(slopes, std::floor((count - c) / 2.0));
  fit.slope_high = at_rank(slopes, std::ceil((count + c) / 2.0 + 1.0));
  return fit;
}

}  // namespace pbfleet::analytics
