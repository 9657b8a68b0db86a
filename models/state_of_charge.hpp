// State of charge from corrected SG and from OCV, the common-practice
// cross-check tables, and the combination of both with a disagreement flag.
#pragma once

#include <optional>
#include <span>
#include <string>

#include "models/battery.hpp"
#include "models/result.hpp"
#include "models/units.hpp"

namespace pbfleet::models {

// Rest below which an OCV still carries surface charge: 4 h default
// (common practice; 6-24 h is better and the threshold is configurable).
inline constexpr Hours kDefaultSettledRest{4.0};
// SG and OCV estimates further apart than this are flagged (percentage points).
inline constexpr double kDefaultSocDisagreementPct = 15.0;

// SOC (%) from SG 25/25, linear in acid content between the battery's
// discharged and full-charge SG; clamped to 0..100.
Percent soc_from_sg(SpecificGravity corrected, const BatterySpec& spec);
// SOC (%) from a battery OCV at electrolyte temperature t, through the inverse
// Nernst model to SG and then soc_from_sg. Error when the OCV is outside what
// any acid concentration produces.
Result<Percent> soc_from_ocv(Volts ocv, Celsius t, const BatterySpec& spec);

// Common-practice cross-check tables (12 V, 25 % steps, per chemistry),
// interpolated linearly and clamped. Values and their tags in the .cpp.
Percent table_soc_from_ocv(Volts ocv_12v, Chemistry chemistry);
Percent table_soc_from_sg(SpecificGravity corrected, Chemistry chemistry);

// True when the battery rested long enough for its OCV to be trusted.
bool ocv_is_settled(std::optional<Hours> rest, Hours threshold = kDefaultSettledRest);

struct SocInputs {
  std::optional<Percent> from_sg;
  std::optional<Percent> from_ocv;
  bool ocv_settled = true;
  double disagreement_tolerance_pct = kDefaultSocDisagreementPct;
};

struct CombinedSoc {
  Percent soc{0.0};
  double uncertainty_pct = 0.0;  // +/- percentage points
  bool disagreement = false;     // SG and OCV further apart than tolerance
  std::string note;              // why, in words, when disagreement is set
};

// Weighted combination of the SG- and OCV-based SOC. An unsettled OCV gets a
// low weight. REQUIRES: at least one of from_sg / from_ocv.
CombinedSoc combine_soc(const SocInputs& inputs);

}  // namespace pbfleet::models
