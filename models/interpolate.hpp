// Interpolation of tabulated data (internal to models/).
//
// MonotoneCubic is the piecewise cubic Hermite interpolant with the
// Fritsch-Carlson shape-preserving slopes in the weighted-harmonic-mean form
// of Fritsch & Butland (1984) ("PCHIP"): it never overshoots between nodes,
// so monotone data stay monotone, which the inverse models rely on.
//   F. N. Fritsch, R. E. Carlson, "Monotone piecewise cubic interpolation",
//   SIAM J. Numer. Anal. 17 (1980) 238-246.
//   F. N. Fritsch, J. Butland, "A method for constructing local monotone
//   piecewise cubic interpolants", SIAM J. Sci. Stat. Comput. 5 (1984) 300-304.
#pragma once

#include <span>
#include <utility>
#include <vector>

namespace pbfleet::models::detail {

class MonotoneCubic {
 public:
  // REQUIRES: at least two nodes, xs strictly increasing, same sizes.
  MonotoneCubic(std::span<const double> xs, std::span<const double> ys);

  // Value at x. REQUIRES: front() <= x <= back() (callers check the range
  // and report it as an Error; asserted here).
  [[nodiscard]] double operator()(double x) const;

  // For increasing data: the node interval [x_i, x_i+1] whose values
  // bracket y (a root bracket for inverting the curve, one piece wide).
  // REQUIRES: ys increasing, ys.front() <= y <= ys.back().
  [[nodiscard]] std::pair<double, double> bracket_of_value(double y) const;

  [[nodiscard]] double front() const { return xs_.front(); }
  [[nodiscard]] double back() const { return xs_.back(); }

 private:
  std::vector<double> xs_;
  std::vector<double> ys_;
  std::vector<double> slopes_;  // dy/dx at each node
};

// Straight-line interpolation through (xs, ys); outside the nodes the value
// of the nearest end node is returned. REQUIRES: xs strictly increasing.
[[nodiscard]] double linear_clamped(std::span<const double> xs, std::span<const double> ys,
                                    double x);

// Straight-line interpolation that extends the first and last segments
// beyond the nodes. REQUIRES: xs strictly increasing, at least two nodes.
[[nodiscard]] double linear_extrapolated(std::span<const double> xs, std::span<const double> ys,
                                         double x);

}  // namespace pbfleet::models::detail
