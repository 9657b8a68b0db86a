// Freezing point (ice formation) of battery electrolyte versus SG.
//
// Up to 34 wt % H2SO4: freezing-point depression of aqueous sulfuric acid,
// CRC Handbook of Chemistry and Physics, 102nd ed. (2021), "Concentrative
// properties of aqueous solutions": 10 % 4.64, 16 % 9.26, 20 % 13.64,
// 24 % 19.85, 28 % 29.65, 30 % 36.21, 32 % 44.76, 34 % 55.28 degC (the CRC
// table stops at 34 %). Beyond 34 wt %: SG 1.280 (referred to 80 degF)
// freezes at -90 degF (-67.8 degC), US Army TM 5-1185, battery section
// (US Army TM 10-6140-200-14 gives -95 degF for the same SG). That point is
// placed at its weight percent through acid.cpp. Interpolated by monotone
// PCHIP in wt %; no extrapolation: above SG 1.281 (25/25) the data end.
#include "models/freeze_point.hpp"

#include <array>
#include <vector>

#include "models/acid.hpp"
#include "models/interpolate.hpp"
#include "models/specific_gravity.hpp"
#include "models/text_format.hpp"

namespace pbfleet::models {
namespace {

constexpr std::array<double, 9> kCrcWt{0, 10, 16, 20, 24, 28, 30, 32, 34};
constexpr std::array<double, 9> kCrcDepressionC{0.0,   4.64,  9.26,  13.64, 19.85,
                                                29.65, 36.21, 44.76, 55.28};
constexpr double kArmySg80 = 1.280;                      // TM 5-1185
constexpr double kArmyFreezeF = -90.0;                   // TM 5-1185

struct FreezeCurve {
  detail::MonotoneCubic depression;  // degC against wt %
  double max_sg25;                   // SG 25/25 of the last data point
};

const FreezeCurve& freeze_curve() {
  static const FreezeCurve curve = [] {
    const auto army_sg25 =
        correct_sg(SpecificGravity{kArmySg80}, reference_temperature(SgReference::f80));
    const double army_wt = weight_percent_from_sg(army_sg25).value().value;
    std::vector<double> wt(kCrcWt.begin(), kCrcWt.end());
    std::vector<double> depression(kCrcDepressionC.begin(), kCrcDepressionC.end());
    wt.push_back(army_wt);
    depression.push_back(-celsius_from_fahrenheit(kArmyFreezeF).value);
    return FreezeCurve{detail::MonotoneCubic(wt, depression), army_sg25.value};
  }();
  return curve;
}

}  // namespace

Result<Celsius> freezing_point(SpecificGravity sg25) {
  const auto& curve = freeze_curve();
  if (!(sg25 >= kMinTableSg && sg25.value <= curve.max_sg25)) {
    return Error{"sg",
                 "SG " + detail::fixed(sg25.value, 3) +
                     " (25/25) is outside the published freezing-point data",
                 detail::range_text(kMinTableSg.value, curve.max_sg25, 3)};
  }
  const double wt = weight_percent_from_sg(sg25).value().value;
  return Celsius{-curve.depression(wt)};
}

Result<double> freeze_margin_c(SpecificGravity sg25, Celsius low) {
  const auto freezes_at = freezing_point(sg25);
  if (!freezes_at) return freezes_at.error();
  return low.value - freezes_at->value;
}

}  // namespace pbfleet::models
