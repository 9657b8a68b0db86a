// The decimals pbfleet publishes derived values with, in the service's
// answers and the CLI's JSON alike.
//
// Each is finer than what the quantity is measured to (a hydrometer reads
// to 0.001 SG, a meter to 0.01 V, a thermometer to 0.1 C), so rounding
// never shows in a decision; it keeps answers free of floating-point noise
// such as a cell spread of 0.005999999999999783. Entered measurements are
// never rounded: they are given back as entered.
#pragma once

#include <cmath>
#include <optional>

namespace pbfleet::models::wire {

inline constexpr int kSgDecimals = 4;       // specific gravity, SG spreads
inline constexpr int kVoltDecimals = 4;     // volts
inline constexpr int kAmpDecimals = 1;      // amperes (cranking current)
inline constexpr int kDerivedDecimals = 3;  // percentages, degrees, days, ratios

// The double nearest to `value` rounded to `decimals` places (halves away
// from zero). Answers round every derived value of every reading, so the
// scales are a table, not std::pow.
inline double rounded(double value, int decimals) {
  static constexpr double kScale[] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6};
  const double scale = decimals >= 0 && decimals <= 6 ? kScale[decimals] : std::pow(10.0, decimals);
  return std::round(value * scale) / scale;
}
inline std::optional<double> rounded(const std::optional<double>& value, int decimals) {
  return value ? std::optional<double>(rounded(*value, decimals)) : std::nullopt;
}

}  // namespace pbfleet::models::wire
