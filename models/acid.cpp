// Composition of aqueous sulfuric acid: SG 25/25 <-> weight percent <-> molality.
//
// Density data: CRC Handbook of Chemistry and Physics, 102nd ed. (2021),
// "Concentrative properties of aqueous solutions", sulfuric acid, absolute
// density at 20 degC, 10-50 wt %; pure water 0.99823 g/mL at 20 degC and
// 0.99707 g/mL at 25 degC (CRC Handbook, density of water table).
//
// Conversion to the model basis SG 25/25 = rho(25 degC) / rho_water(25 degC)
// is DERIVED here: rho25 = rho20 + 5 K * dRho/dT, with dRho/dT per wt %
//   0 %: -0.000232  (water, from the two CRC water densities above)
//  10 %: -0.00053, 20 %: -0.00065  (mid-points of the 25 degC densities of
//        the Myhre, Nielsen & Saastad 1998 polynomial, J. Chem. Eng. Data 43,
//        617, and the aerosol-code fits below, as tabulated in the project's
//        reference notes; those two differ by up to 0.001)
//  25-40 %: -0.00066, -0.00069, -0.00072, -0.00073 (linear rho(T) fits in the
//        sulfate routines of a published atmospheric aerosol-model code, 2001)
//  above 40 %: held at -0.00073 (extrapolation; 5 K of it moves SG by < 0.0005)
// interpolated linearly in wt %. The derived SG 25/25 carries about +/-0.001.
//
// Interpolation: monotone PCHIP of SG 25/25 against wt % (interpolate.hpp);
// the inverse (wt % from SG) solves that same curve on a bracket, so the two
// directions round-trip exactly. Molality is exact arithmetic with
// M(H2SO4) = 98.079 g/mol (CRC Handbook 102nd ed.).
#include "models/acid.hpp"

#include <array>
#include <cassert>
#include <vector>

#include "models/interpolate.hpp"
#include "models/solve.hpp"
#include "models/text_format.hpp"

namespace pbfleet::models {
namespace {

constexpr double kMolarMassH2so4GPerMol = 98.079;  // CRC Handbook 102nd ed.
constexpr double kWaterDensity20 = 0.99823;        // g/mL, CRC Handbook (water table)
constexpr double kWaterDensity25 = 0.99707;        // g/mL, CRC Handbook (water table)
constexpr double kTableDeltaK = 5.0;               // 20 degC -> 25 degC

// wt % and absolute density at 20 degC (g/cm3), CRC 102nd ed.; 0 % is
// water. The transcribed table has no rows between 0 and 10 % nor at 48 %:
// PCHIP bridges those gaps. Density is nearly linear in wt % below 10 %
// (secant slopes 0.0068 and 0.0070 per wt % on either side of the 10 % row),
// so the bridge should stay within about 0.001 SG; battery acid seldom
// falls below SG 1.070 (10 %).
constexpr std::array<double, 21> kWtPercent{0,  10, 12, 14, 16, 18, 20, 22, 24, 26, 28,
                                            30, 32, 34, 36, 38, 40, 42, 44, 46, 50};
constexpr std::array<double, 21> kDensity20{
    kWaterDensity20, 1.0661, 1.0802, 1.0947, 1.1094, 1.1245, 1.1398, 1.1554, 1.1714, 1.1872, 1.2031,
    1.2191,          1.2353, 1.2518, 1.2685, 1.2855, 1.3028, 1.3205, 1.3386, 1.3570, 1.3952};

// dRho/dT (g/cm3 per K) against wt %, see the header comment for sources.
constexpr std::array<double, 7> kSlopeWt{0, 10, 20, 25, 30, 35, 40};
constexpr std::array<double, 7> kSlope{-(kWaterDensity20 - kWaterDensity25) / kTableDeltaK,
                                       -0.00053, -0.00065, -0.00066, -0.00069, -0.00072,
                                       -0.00073};

double sg25_from_density20(double wt_percent, double rho20) {
  const double slope = detail::linear_clamped(kSlopeWt, kSlope, wt_percent);
  return (rho20 + kTableDeltaK * slope) / kWaterDensity25;
}

// SG 25/25 as a monotone cubic of wt %, built once.
const detail::MonotoneCubic& sg_curve() {
  static const detail::MonotoneCubic curve = [] {
    std::vector<double> sg;
    for (std::size_t i = 0; i < kWtPercent.size(); ++i) {
      sg.push_back(sg25_from_density20(kWtPercent[i], kDensity20[i]));
    }
    return detail::MonotoneCubic(kWtPercent, sg);
  }();
  return curve;
}

Error sg_range_error(SpecificGravity sg) {
  return Error{"sg",
               "SG " + detail::fixed(sg.value, 4) +
                   " (25/25) is outside the sulfuric-acid density table",
               detail::range_text(kMinTableSg.value, kMaxTableSg.value, 3)};
}

}  // namespace

Result<WeightPercent> weight_percent_from_sg(SpecificGravity sg25) {
  if (!(sg25 >= kMinTableSg && sg25 <= kMaxTableSg)) return sg_range_error(sg25);
  const auto& curve = sg_curve();
  // Solved on the one PCHIP piece that holds the root (the curve is
  // monotone): a few iterations instead of a search across the table.
  const auto [lo, hi] = curve.bracket_of_value(sg25.value);
  const auto w = detail::solve_increasing([&](double x) { return curve(x); }, lo, hi, sg25.value);
  assert(w.has_value());  // kMin/kMaxTableSg lie inside the curve's range
  return WeightPercent{*w};
}

Result<SpecificGravity> sg_from_weight_percent(WeightPercent w) {
  const auto& curve = sg_curve();
  // Solved once: the table's top SG as weight percent.
  static const double w_max = weight_percent_from_sg(kMaxTableSg).value().value;
  if (!(w.value >= curve.front() && w.value <= w_max)) {
    return Error{"wt_percent",
                 "weight percent " + detail::fixed(w.value, 2) +
                     " is outside the sulfuric-acid density table",
                 detail::range_text(curve.front(), w_max, 2, "wt %")};
  }
  return SpecificGravity{curve(w.value)};
}

Molality molality_from_weight_percent(WeightPercent w) {
  assert(w.value >= 0.0 && w.value < 100.0);
  return Molality{1000.0 * w.value / (kMolarMassH2so4GPerMol * (100.0 - w.value))};
}

WeightPercent weight_percent_from_molality(Molality m) {
  assert(m.value >= 0.0);
  const double acid_g = m.value * kMolarMassH2so4GPerMol;  // per 1000 g water
  return WeightPercent{100.0 * acid_g / (1000.0 + acid_g)};
}

Result<Molality> molality_from_sg(SpecificGravity sg25) {
  const auto w = weight_percent_from_sg(sg25);
  if (!w) return w.error();
  return molality_from_weight_percent(*w);
}

Result<SpecificGravity> sg_from_molality(Molality m) {
  if (!(m.value >= 0.0)) {
    return Error{"molality", "molality must not be negative", "0 mol/kg or more"};
  }
  const auto sg = sg_from_weight_percent(weight_percent_from_molality(m));
  if (!sg) {
    const double m_max = molality_from_sg(kMaxTableSg).value().value;
    return Error{"molality",
                 "molality " + detail::fixed(m.value, 3) +
                     " mol/kg is outside the sulfuric-acid density table",
                 detail::range_text(0.0, m_max, 3, "mol/kg")};
  }
  return sg;
}

}  // namespace pbfleet::models
