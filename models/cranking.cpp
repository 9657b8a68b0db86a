// Cold cranking: available cranking current and the engine's demand.
//
// Available vs temperature: cranking power of a fully charged battery is
// 100 % at 80 degF, 65 % at 32 degF and 40 % at 0 degF (US Army TM 5-1185,
// battery section, "30-32 degF"; US Army TM 5-4210-230-14&P-1 gives 65 % at
// 32 degF). Re-anchored so the fraction is 1.0 at the CCA test temperature,
// -18 degC (SAE J537; EN 50342-1), because a rated CCA is by definition what
// a new, fully charged battery holds there (30 s to 7.2 V under SAE J537).
// Piecewise linear between the points; below 0 degF the lowest segment is
// extended (conservative: the fraction keeps falling), floored at 0; above
// 80 degF it is held.
//
// State-of-charge factor (common practice, no traceable source): 1.00 at
// 100 %, 0.85 at 75 %, 0.65 at 50 %, 0.40 at 25 %, 0.10 at 0 %, linear in
// between. The shape follows the falling OCV and rising internal resistance
// of a discharged battery; treat crank margins below 50 % SOC as indicative.
//
// Engine demand vs temperature (common practice, no traceable source): 100 %
// at 80 degF, 155 % at 32 degF, 210 % at 0 degF (cold, thick oil), re-anchored
// to 1.0 at -18 degC like the supply side; the lowest segment is extended
// below 0 degF, held above 80 degF.
//
// Sizing rule (common practice, no traceable source): at least 1 CCA per
// cubic inch of displacement for a gasoline engine, 2 for a diesel;
// 1 L = 61.0237 in^3 (exact: 1 in = 25.4 mm).
#include "models/cranking.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <cctype>
#include <string>

#include "models/interpolate.hpp"

namespace pbfleet::models {
namespace {

// Temperatures of the published points: 0, 32 and 80 degF in degC.
constexpr std::array<double, 3> kPointTempsC{celsius_from_fahrenheit(0.0).value,
                                         celsius_from_fahrenheit(32.0).value,
                                         celsius_from_fahrenheit(80.0).value};
constexpr std::array<double, 3> kAvailableShare{0.40, 0.65, 1.00};  // TM 5-1185
constexpr std::array<double, 3> kDemandShare{2.10, 1.55, 1.00};      // common practice

constexpr std::array<double, 5> kSocPoints{0.0, 25.0, 50.0, 75.0, 100.0};
constexpr std::array<double, 5> kSocFactor{0.10, 0.40, 0.65, 0.85, 1.00};  // common practice

constexpr double kCubicInchesPerLitre = 61.0237;
constexpr double kCcaPerCubicInchGasoline = 1.0;
constexpr double kCcaPerCubicInchDiesel = 2.0;

// Piecewise linear in temperature: extended below the coldest point, held
// above the warmest.
double share_at(const std::array<double, 3>& share, double t_c) {
  if (t_c >= kPointTempsC.back()) return share.back();
  return detail::linear_extrapolated(kPointTempsC, share, t_c);
}

double temperature_fraction(Celsius t) {
  const double at_test = share_at(kAvailableShare, kCcaTestTemperature.value);
  return std::max(0.0, share_at(kAvailableShare, t.value) / at_test);
}

double soc_factor(Percent soc) {
  return detail::linear_clamped(kSocPoints, kSocFactor, soc.value);
}

}  // namespace

double available_cca_fraction(Celsius t, Percent soc) {
  return temperature_fraction(t) * soc_factor(soc);
}

Amperes available_cca(Amperes rated_cca, Celsius t, Percent soc) {
  return Amperes{rated_cca.value * available_cca_fraction(t, soc)};
}

std::optional<EngineKind> parse_engine_kind(std::string_view text) {
  std::string lower(text);
  std::transform(lower.begin(), lower.end(), lower.begin(),
                 [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
  if (lower == "gasoline" || lower == "petrol") return EngineKind::gasoline;
  if (lower == "diesel") return EngineKind::diesel;
  return std::nullopt;
}

std::string_view to_string(EngineKind kind) {
  return kind == EngineKind::diesel ? "diesel" : "gasoline";
}

Amperes required_cca_for_engine(EngineKind kind, double displacement_l) {
  assert(displacement_l > 0.0);
  const double per_cubic_inch =
      kind == EngineKind::diesel ? kCcaPerCubicInchDiesel : kCcaPerCubicInchGasoline;
  return Amperes{per_cubic_inch * displacement_l * kCubicInchesPerLitre};
}

Amperes required_current_at(Amperes required_at_test, Celsius t) {
  const double at_test = share_at(kDemandShare, kCcaTestTemperature.value);
  return Amperes{required_at_test.value * share_at(kDemandShare, t.value) / at_test};
}

double crank_margin(Amperes available, Amperes required) {
  assert(required.value > 0.0);
  return available.value / required.value;
}

}  // namespace pbfleet::models
