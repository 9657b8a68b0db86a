#include "models/analytics/theil_sen.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <limits>
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

// at_rank at three ranks low <= mid <= high at once, with the same values:
// after selecting the low and then the high order statistic, the values
// between them are exactly the order statistics in between, so the middle
// one (and its neighbour for a fractional rank) is selected in that band
// only. For Theil-Sen's interval ranks around the median this reads the
// slopes about 1.5 times instead of 3.5 times.
struct ThreeRanks {
  double low, mid, high;
};
ThreeRanks at_ranks(std::vector<double>& v, double low, double mid, double high) {
  const double top = static_cast<double>(v.size());
  const auto position = [&](double rank) { return std::clamp(rank, 1.0, top) - 1.0; };
  const double r_low = position(low), r_mid = position(mid), r_high = position(high);
  assert(r_low <= r_mid && r_mid <= r_high);
  const auto p_low = static_cast<std::size_t>(std::floor(r_low));
  const auto p_mid = static_cast<std::size_t>(std::floor(r_mid));
  const auto p_high = static_cast<std::size_t>(std::floor(r_high));
  const auto at = [&](std::size_t p) { return v.begin() + static_cast<std::ptrdiff_t>(p); };
  std::nth_element(v.begin(), at(p_low), v.end());
  if (p_high > p_low) std::nth_element(at(p_low + 1), at(p_high), v.end());
  if (p_mid > p_low && p_mid < p_high) std::nth_element(at(p_low + 1), at(p_mid), at(p_high));
  // The order statistic after p: the smallest value up to the next selected
  // position (or to the end when none is selected after p).
  const auto next_after = [&](std::size_t p) {
    const std::size_t stop = p < p_mid ? p_mid : (p < p_high ? p_high : v.size() - 1);
    return *std::min_element(at(p + 1), at(stop + 1));
  };
  const auto value = [&](double r, std::size_t p) {
    const double a = v[p];
    if (p + 1 >= v.size() || r == static_cast<double>(p)) return a;
    return a + (r - static_cast<double>(p)) * (next_after(p) - a);
  };
  return {value(r_low, p_low), value(r_mid, p_mid), value(r_high, p_high)};
}

// at_ranks for many values, with the same results: a fixed sample (every
// stride-th value) brackets the three ranks with a safety margin; one pass
// counts the values below the bracket and gathers those inside it, and the
// ranks are selected among the gathered ones when they fall inside (which
// the counts prove; else the whole set is used). Theil-Sen's ranks sit in a
// band around the median, so a fifth of the slopes is searched instead of
// all of them. Leaves `v` reordered and possibly shortened. (Sample-and-bracket selection after Floyd & Rivest, "Expected
// time bounds for selection", CACM 18 (1975) 165.)
constexpr std::size_t kBandMinimum = 4096;   // below this, plain at_ranks
constexpr std::size_t kSampleSize = 1024;
constexpr std::size_t kSampleMargin = 64;    // sample ranks; 4 standard deviations at 1024
ThreeRanks at_ranks_banded(std::vector<double>& v, double low, double mid, double high) {
  const std::size_t k = v.size();
  if (k < kBandMinimum) return at_ranks(v, low, mid, high);
  const double top = static_cast<double>(k);
  low = std::clamp(low, 1.0, top);
  mid = std::clamp(mid, 1.0, top);
  high = std::clamp(high, 1.0, top);
  std::vector<double> sample(kSampleSize);
  for (std::size_t i = 0; i < kSampleSize; ++i) sample[i] = v[i * k / kSampleSize];
  const auto sample_index = [&](double rank, bool upper) -> std::size_t {
    const double q = (rank - 1.0) / top * static_cast<double>(kSampleSize);
    const double shifted = upper ? std::ceil(q) + kSampleMargin : std::floor(q) - kSampleMargin;
    return static_cast<std::size_t>(std::clamp(shifted, 0.0, static_cast<double>(kSampleSize - 1)));
  };
  const std::size_t i_low = sample_index(low, false), i_high = sample_index(high, true);
  const auto at = [&](std::size_t i) { return sample.begin() + static_cast<std::ptrdiff_t>(i); };
  std::nth_element(sample.begin(), at(i_low), sample.end());
  const double lower = i_low == 0 ? -std::numeric_limits<double>::infinity() : sample[i_low];
  std::nth_element(at(i_low), at(i_high), sample.end());
  const double upper = i_high == kSampleSize - 1 ? std::numeric_limits<double>::infinity() : sample[i_high];
  // Count first (branch-free: the comparisons are unpredictable), so `v`
  // stays whole for the fallback; then gather the band in place.
  std::size_t below = 0, n = 0;
  for (const double x : v) {
    below += static_cast<std::size_t>(x < lower);
    n += static_cast<std::size_t>(x >= lower && x <= upper);
  }
  // 0-based positions below + [0, n) hold exactly order statistics
  // below + 1 .. below + n. The interpolating neighbour of the top rank
  // must be inside too, unless the band runs to the end.
  const auto first = static_cast<double>(below) + 1.0, last = static_cast<double>(below + n);
  const bool inside = first <= low && (std::floor(high) + 1.0 <= last || below + n == k);
  if (!inside) return at_ranks(v, low, mid, high);
  std::size_t kept = 0;
  for (std::size_t i = 0; i < k; ++i) {
    const double x = v[i];
    v[kept] = x;
    kept += static_cast<std::size_t>(x >= lower && x <= upper);
  }
  v.resize(kept);
  const double shift = static_cast<double>(below);
  return at_ranks(v, low - shift, mid - shift, high - shift);
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

// Pairwise slopes above and below zero.
struct Signs {
  std::size_t positive = 0, negative = 0;
};
Signs count_signs(const std::vector<double>& slopes) {
  Signs s;
  for (const double x : slopes) {
    s.positive += static_cast<std::size_t>(x > 0.0);
    s.negative += static_cast<std::size_t>(x < 0.0);
  }
  return s;
}

double same_sign_share(const Signs& signs, std::size_t count, double slope) {
  if (slope == 0.0) return 0.5;
  const std::size_t agree = slope > 0.0 ? signs.positive : signs.negative;
  return static_cast<double>(agree) / static_cast<double>(count);
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
  const Signs signs = count_signs(slopes);  // before the selection reorders and shortens
  // Rank interval (Sen 1968; Hollander & Wolfe, Nonparametric Statistical
  // Methods, 2nd ed. 1999): C = z(1 - alpha/2) sqrt(Var S) with
  // Var S = k (2n + 5) / 9, k the pairs with distinct x (= n(n-1)(2n+5)/18
  // when no x is tied); limits at the ranks floor((k - C)/2) and
  // ceil((k + C)/2 + 1), clamped to 1..k (conservative: never narrower).
  const double n = fit.points;
  const double c = normal_quantile(0.5 + 0.5 * confidence) * std::sqrt(count * (2.0 * n + 5.0) / 9.0);
  const auto ranks = at_ranks_banded(slopes, std::floor((count - c) / 2.0), 0.5 * (count + 1.0),
                              std::ceil((count + c) / 2.0 + 1.0));
  fit.slope = ranks.mid;
  fit.slope_low = ranks.low;
  fit.slope_high = ranks.high;
  fit.centre_x = median(std::vector<double>(x.begin(), x.end()));
  fit.intercept = median(std::vector<double>(y.begin(), y.end())) - fit.slope * fit.centre_x;
  fit.same_sign_fraction = same_sign_share(signs, static_cast<std::size_t>(count), fit.slope);
  return fit;
}

}  // namespace pbfleet::analytics
