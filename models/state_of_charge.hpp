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

// Default +/- uncertainties of the two SOC estimates, in percentage points
// (reasoning in the .cpp; both common practice).
inline constexpr double kDefaultSgSocUncertaintyPct = 4.0;
inline constexpr double kDefaultOcvSocUncertaintyPct = 5.0;
// Uncertainty given to an OCV read before the battery settled.
inline constexpr double kUnsettledOcvUncertaintyPct = 20.0;
// Shop voltmeter read to two decimals: +/- 0.03 V on the battery (common practice).
inline constexpr Volts kDefaultOcvMeterError{0.03};
// Hydrometer read to its 0.005 graduation (common practice).
inline constexpr double kDefaultHydrometerError = 0.005;

// SOC (%) from SG 25/25, linear in SG between the battery's discharged and
// full-charge SG (as the published SG tables are); clamped to 0..100.
// REQUIRES: spec.full_charge_sg > spec.discharged_sg.
Percent soc_from_sg(SpecificGravity corrected, const BatterySpec& spec);
// SOC (%) from a battery OCV (V) at electrolyte temperature t, through the
// inverse Nernst model (nernst.hpp) to SG and then soc_from_sg. Error (field
// "ocv_v") when the OCV is outside what any acid concentration produces.
Result<Percent> soc_from_ocv(Volts ocv, Celsius t, const BatterySpec& spec);

// Common-practice cross-check tables (12 V, 25 % steps, per chemistry),
// interpolated linearly and clamped. Values and their tags in the .cpp.
// SOC (%) from the OCV of a 12 V battery at about 80 degF (common practice).
Percent table_soc_from_ocv(Volts ocv_12v, Chemistry chemistry);
// SOC (%) from SG 25/25 via the 80 degF SG table of US Army TM 5-4210-230-14&P-1
// (flooded, EFB); AGM/gel from their common-practice end points.
Percent table_soc_from_sg(SpecificGravity corrected, Chemistry chemistry);

// +/- SOC points that a hydrometer error of `sg_error` means for this battery.
double sg_soc_uncertainty_pct(const BatterySpec& spec, double sg_error = kDefaultHydrometerError);
// +/- SOC points that a voltmeter error of `meter_error` means at this OCV,
// through the inverse Nernst model (about 80 mV spans 10 % on a 12 V
// flooded battery). Error as soc_from_ocv.
Result<double> ocv_soc_uncertainty_pct(Volts ocv, Celsius t, const BatterySpec& spec,
                                       Volts meter_error = kDefaultOcvMeterError);

// True when the battery rested long enough for its OCV to be trusted.
// An unknown rest counts as not settled.
bool ocv_is_settled(std::optional<Hours> rest, Hours threshold = kDefaultSettledRest);

struct SocInputs {
  std::optional<Percent> from_sg;
  std::optional<Percent> from_ocv;
  bool ocv_settled = true;
  double disagreement_tolerance_pct = kDefaultSocDisagreementPct;
  // +/- points of each estimate; the defaults above when not given.
  std::optional<double> sg_uncertainty_pct;
  std::optional<double> ocv_uncertainty_pct;
};

struct CombinedSoc {
  Percent soc{0.0};
  double uncertainty_pct = 0.0;  // +/- percentage points
  bool disagreement = false;     // SG and OCV further apart than tolerance
  std::string note;              // why, in words, when disagreement is set
};

// Inverse-variance combination of the SG- and OCV-based SOC (%). An unsettled
// OCV gets at least kUnsettledOcvUncertaintyPct, hence a low weight; a gap
// beyond the tolerance sets `disagreement`, widens the uncertainty to half
// the gap and names the likely causes in `note`.
// REQUIRES: at least one of from_sg / from_ocv.
CombinedSoc combine_soc(const SocInputs& inputs);

}  // namespace pbfleet::models
