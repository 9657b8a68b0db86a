// Self-discharge on open circuit.
//
// Anchor: a wet, charged battery loses 0.001 SG per day at 80 degF (US Army
// TM 9-6140-200-14; the same table gives 0.0025 at 100 degF and 0.0003 at
// 50 degF, and US Army TM 5-1185 quotes about 0.001 per day over a month
// stored below 80 degF). Converted to percent of full charge with the flooded
// SG span 1.265 - 1.120 = 0.145 (battery.cpp): 0.69 % per day at 26.7 degC.
// Temperature: the rate doubles per +10 degC (common practice, no traceable
// source); the TM 9-6140 table itself implies x2.1 to x2.3 per 10 degC.
// Chemistry: EFB (calcium grids) about half, AGM and gel about a quarter of
// the flooded rate (common practice, no traceable source).
#include "models/self_discharge.hpp"

#include <algorithm>
#include <cmath>

#include "models/battery.hpp"

namespace pbfleet::models {
namespace {

constexpr double kAnchorSgPerDay = 0.001;  // TM 9-6140-200-14 at 80 degF
constexpr double kDoublingStepC = 10.0;    // common practice

double flooded_sg_span() {
  const auto spec = default_spec(Chemistry::flooded);
  return spec.full_charge_sg.value - spec.discharged_sg.value;
}

double chemistry_factor(Chemistry chemistry) {
  switch (chemistry) {
    case Chemistry::flooded: return 1.0;
    case Chemistry::efb: return 0.5;
    case Chemistry::agm:
    case Chemistry::gel: return 0.25;
  }
  return 1.0;
}

}  // namespace

double self_discharge_pct_per_day(Chemistry chemistry, Celsius t) {
  const double anchor_pct = 100.0 * kAnchorSgPerDay / flooded_sg_span();
  const double anchor_c = celsius_from_fahrenheit(80.0).value;
  const double doublings = (t.value - anchor_c) / kDoublingStepC;
  return chemistry_factor(chemistry) * anchor_pct * std::exp2(doublings);
}

Percent project_soc(Percent start, Days days, Celsius t, Chemistry chemistry) {
  const double lost = self_discharge_pct_per_day(chemistry, t) * std::max(0.0, days.value);
  return Percent{std::clamp(start.value - lost, 0.0, 100.0)};
}

Percent project_soc(Percent start, std::span<const Celsius> daily_temps, Chemistry chemistry) {
  double soc = std::clamp(start.value, 0.0, 100.0);
  for (const Celsius t : daily_temps) {
    soc = std::max(0.0, soc - self_discharge_pct_per_day(chemistry, t));
  }
  return Percent{soc};
}

}  // namespace pbfleet::models
