// Illinois (modified regula falsi) root finder on a bracket; see solve.hpp.
#include "models/solve.hpp"

#include <cassert>
#include <cmath>

namespace pbfleet::models::detail {

std::optional<double> solve_increasing(const std::function<double(double)>& f, double lo,
                                       double hi, double target, double x_tolerance) {
  assert(lo < hi);
  double a = lo;
  double b = hi;
  double fa = f(a) - target;
  double fb = f(b) - target;
  if (fa == 0.0) return a;
  if (fb == 0.0) return b;
  if (fa > 0.0 || fb < 0.0) return std::nullopt;
  // Illinois iterations; the bisection fallback bounds the work even if the
  // function is badly scaled (each step at least halves every 4th iteration).
  constexpr int kMaxIterations = 200;
  int side = 0;  // which end was kept last time: -1 = a, +1 = b
  for (int i = 0; i < kMaxIterations && (b - a) > x_tolerance; ++i) {
    double c = (a * fb - b * fa) / (fb - fa);
    if (!(c > a && c < b) || i % 4 == 3) c = 0.5 * (a + b);
    const double fc = f(c) - target;
    if (fc == 0.0) return c;
    if (fc < 0.0) {
      a = c;
      fa = fc;
      if (side == -1) fb *= 0.5;  // b kept twice in a row: halve its weight
      side = -1;
    } else {
      b = c;
      fb = fc;
      if (side == +1) fa *= 0.5;
      side = +1;
    }
  }
  return 0.5 * (a + b);
}

}  // namespace pbfleet::models::detail
