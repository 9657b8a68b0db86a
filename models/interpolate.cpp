// Monotone piecewise cubic Hermite interpolation (PCHIP) and straight-line
// helpers. Method references are in interpolate.hpp.
#include "models/interpolate.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <cstddef>

namespace pbfleet::models::detail {
namespace {

bool same_sign(double a, double b) { return (a > 0.0 && b > 0.0) || (a < 0.0 && b < 0.0); }

// Interior slope: weighted harmonic mean of the neighbouring secants
// (Fritsch & Butland 1984); zero at a local extremum of the data.
double interior_slope(double h0, double h1, double d0, double d1) {
  if (!same_sign(d0, d1)) return 0.0;
  const double w0 = 2.0 * h1 + h0;
  const double w1 = h1 + 2.0 * h0;
  return (w0 + w1) / (w0 / d0 + w1 / d1);
}

// End slope: one-sided three-point estimate, limited so the end interval
// keeps the data's shape (the usual PCHIP end condition).
double end_slope(double h0, double h1, double d0, double d1) {
  const double d = ((2.0 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
  if (!same_sign(d, d0)) return 0.0;
  if (!same_sign(d0, d1) && std::abs(d) > std::abs(3.0 * d0)) return 3.0 * d0;
  return d;
}

std::size_t segment_of(std::span<const double> xs, double x) {
  const auto it = std::upper_bound(xs.begin() + 1, xs.end() - 1, x);
  return static_cast<std::size_t>(it - xs.begin()) - 1;
}

}  // namespace

MonotoneCubic::MonotoneCubic(std::span<const double> xs, std::span<const double> ys)
    : xs_(xs.begin(), xs.end()), ys_(ys.begin(), ys.end()), slopes_(xs.size(), 0.0) {
  assert(xs_.size() >= 2 && xs_.size() == ys_.size());
  const std::size_t n = xs_.size();
  std::vector<double> h(n - 1);
  std::vector<double> secant(n - 1);
  for (std::size_t i = 0; i + 1 < n; ++i) {
    h[i] = xs_[i + 1] - xs_[i];
    assert(h[i] > 0.0);
    secant[i] = (ys_[i + 1] - ys_[i]) / h[i];
  }
  if (n == 2) {
    slopes_[0] = slopes_[1] = secant[0];
    return;
  }
  for (std::size_t i = 1; i + 1 < n; ++i) {
    slopes_[i] = interior_slope(h[i - 1], h[i], secant[i - 1], secant[i]);
  }
  slopes_[0] = end_slope(h[0], h[1], secant[0], secant[1]);
  slopes_[n - 1] = end_slope(h[n - 2], h[n - 3], secant[n - 2], secant[n - 3]);
}

double MonotoneCubic::operator()(double x) const {
  assert(x >= xs_.front() && x <= xs_.back());
  const std::size_t i = segment_of(xs_, x);
  const double h = xs_[i + 1] - xs_[i];
  const double t = (x - xs_[i]) / h;
  const double t2 = t * t;
  const double t3 = t2 * t;
  // Cubic Hermite basis functions.
  const double h00 = 2.0 * t3 - 3.0 * t2 + 1.0;
  const double h10 = t3 - 2.0 * t2 + t;
  const double h01 = -2.0 * t3 + 3.0 * t2;
  const double h11 = t3 - t2;
  return h00 * ys_[i] + h10 * h * slopes_[i] + h01 * ys_[i + 1] + h11 * h * slopes_[i + 1];
}

std::pair<double, double> MonotoneCubic::bracket_of_value(double y) const {
  assert(y >= ys_.front() && y <= ys_.back());
  const auto it = std::upper_bound(ys_.begin(), ys_.end(), y);
  const auto hi = it == ys_.end() ? ys_.size() - 1 : static_cast<std::size_t>(it - ys_.begin());
  return {xs_[hi - 1], xs_[hi]};
}

double linear_clamped(std::span<const double> xs, std::span<const double> ys, double x) {
  assert(!xs.empty() && xs.size() == ys.size());
  if (x <= xs.front()) return ys.front();
  if (x >= xs.back()) return ys.back();
  return linear_extrapolated(xs, ys, x);
}

double linear_extrapolated(std::span<const double> xs, std::span<const double> ys, double x) {
  assert(xs.size() >= 2 && xs.size() == ys.size());
  const std::size_t i = segment_of(xs, x);
  const double t = (x - xs[i]) / (xs[i + 1] - xs[i]);
  return ys[i] + t * (ys[i + 1] - ys[i]);
}

}  // namespace pbfleet::models::detail
