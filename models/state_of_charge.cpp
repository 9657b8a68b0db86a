// State of charge from SG and OCV, the common-practice cross-check tables
// and the weighted combination of both estimates.
#include "models/state_of_charge.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>

#include "models/interpolate.hpp"
#include "models/nernst.hpp"
#include "models/specific_gravity.hpp"
#include "models/text_format.hpp"

namespace pbfleet::models {
namespace {

// --- Cross-check tables, 12 V, SOC 0/25/50/75/100 % ------------------------
constexpr std::array<double, 5> kTableSoc{0.0, 25.0, 50.0, 75.0, 100.0};

// Flooded (and EFB) OCV at 80 degF: 11.89 / 12.06 / 12.24 / 12.45 / 12.65 V
// (common practice, no traceable source).
constexpr std::array<double, 5> kFloodedOcv{11.89, 12.06, 12.24, 12.45, 12.65};
// AGM and gel OCV: 11.80 / 12.00 / 12.30 / 12.60 / 12.85 V (common practice,
// no traceable source; these types run denser acid, hence the higher top).
constexpr std::array<double, 5> kAgmOcv{11.80, 12.00, 12.30, 12.60, 12.85};
// Flooded SG referred to 80 degF: 1.120 / 1.155 / 1.190 / 1.225 / 1.265
// (US Army TM 5-4210-230-14&P-1, battery section). EFB uses the same table
// (common practice).
constexpr std::array<double, 5> kFloodedSg80{1.120, 1.155, 1.190, 1.225, 1.265};
// AGM and gel SG: straight line between the common-practice discharged and
// full values 1.150 / 1.300 (common practice; derived from the defaults in
// battery.cpp, so it is NOT an independent check for these types).
constexpr std::array<double, 5> kAgmSg80{1.150, 1.1875, 1.225, 1.2625, 1.300};

bool uses_agm_tables(Chemistry chemistry) {
  return chemistry == Chemistry::agm || chemistry == Chemistry::gel;
}

// --- Uncertainties ----------------------------------------------------------
// Model residual against Bode's measured OCV fit, per cell (nernst.cpp).
constexpr double kModelErrorVPerCell = 0.002;
// Step for the numerical dSOC/dOCV.
constexpr double kOcvStepV = 0.005;

double soc_unclamped(SpecificGravity sg, const BatterySpec& spec) {
  assert(spec.full_charge_sg.value > spec.discharged_sg.value);
  const double span = spec.full_charge_sg.value - spec.discharged_sg.value;
  return 100.0 * (sg.value - spec.discharged_sg.value) / span;
}

std::optional<double> soc_unclamped_from_ocv(Volts ocv, Celsius t, const BatterySpec& spec) {
  const auto sg = sg_from_ocv(ocv, spec.cells, t);
  if (!sg) return std::nullopt;
  return soc_unclamped(*sg, spec);
}

double clamp_percent(double value) { return std::clamp(value, 0.0, 100.0); }

std::string disagreement_note(const SocInputs& in, double sg_soc, double ocv_soc) {
  const double gap = std::abs(sg_soc - ocv_soc);
  std::string note = "SOC from SG (" + detail::fixed(sg_soc, 0) + " %) and from OCV (" +
                     detail::fixed(ocv_soc, 0) + " %) differ by " + detail::fixed(gap, 0) +
                     " points, more than the " + detail::fixed(in.disagreement_tolerance_pct, 0) +
                     "-point tolerance. ";
  if (ocv_soc > sg_soc) {
    note += in.ocv_settled
                ? "Likely causes: surface charge left from charging or driving, a hydrometer "
                  "or temperature-correction error, or diluted electrolyte after watering."
                : "Likely cause: surface charge, since the battery had not rested long enough; "
                  "also possible: a hydrometer or temperature-correction error.";
  } else {
    note += "Likely causes: a weak or shorted cell pulling the OCV down, or a hydrometer or "
            "temperature-correction error.";
  }
  return note + " Re-read after a full rest.";
}

}  // namespace

Percent soc_from_sg(SpecificGravity corrected, const BatterySpec& spec) {
  return Percent{clamp_percent(soc_unclamped(corrected, spec))};
}

Result<Percent> soc_from_ocv(Volts ocv, Celsius t, const BatterySpec& spec) {
  const auto sg = sg_from_ocv(ocv, spec.cells, t);
  if (!sg) return sg.error();
  return soc_from_sg(*sg, spec);
}

Percent table_soc_from_ocv(Volts ocv_12v, Chemistry chemistry) {
  const auto& ocv = uses_agm_tables(chemistry) ? kAgmOcv : kFloodedOcv;
  return Percent{detail::linear_clamped(ocv, kTableSoc, ocv_12v.value)};
}

Percent table_soc_from_sg(SpecificGravity corrected, Chemistry chemistry) {
  // The tables are referred to 80 degF; the input is referred to 25 degC.
  const auto sg80 = reading_at_temperature(corrected, reference_temperature(SgReference::f80),
                                           SgReference::c25);
  const auto& sg = uses_agm_tables(chemistry) ? kAgmSg80 : kFloodedSg80;
  return Percent{detail::linear_clamped(sg, kTableSoc, sg80.value)};
}

// Default kDefaultSgSocUncertaintyPct = 4 follows from this with the flooded
// span (0.005 / 0.145 = 3.4 points) plus about 1 point for a 2 degC
// temperature-reading error (2 x 0.0007).
double sg_soc_uncertainty_pct(const BatterySpec& spec, double sg_error) {
  const double span = spec.full_charge_sg.value - spec.discharged_sg.value;
  assert(span > 0.0);
  return 100.0 * sg_error / span;
}

// Default kDefaultOcvSocUncertaintyPct = 5 is this at mid-charge for a 12 V
// flooded battery: about 7.6 mV per SOC point, 0.03 V meter error plus the
// model's 2 mV per cell.
Result<double> ocv_soc_uncertainty_pct(Volts ocv, Celsius t, const BatterySpec& spec,
                                       Volts meter_error) {
  const auto mid = soc_unclamped_from_ocv(ocv, t, spec);
  if (!mid) return sg_from_ocv(ocv, spec.cells, t).error();
  const auto up = soc_unclamped_from_ocv(Volts{ocv.value + kOcvStepV}, t, spec);
  const auto down = soc_unclamped_from_ocv(Volts{ocv.value - kOcvStepV}, t, spec);
  double slope_pct_per_v = 0.0;
  if (up && down) {
    slope_pct_per_v = (*up - *down) / (2.0 * kOcvStepV);
  } else if (up) {
    slope_pct_per_v = (*up - *mid) / kOcvStepV;
  } else if (down) {
    slope_pct_per_v = (*mid - *down) / kOcvStepV;
  }
  const double model_error = kModelErrorVPerCell * spec.cells;
  const double total_error = std::hypot(meter_error.value, model_error);
  return std::abs(slope_pct_per_v) * total_error;
}

bool ocv_is_settled(std::optional<Hours> rest, Hours threshold) {
  return rest.has_value() && rest->value >= threshold.value;
}

// Inverse-variance weighting of the two estimates. An unsettled OCV gets at
// least kUnsettledOcvUncertaintyPct (20 points): surface charge commonly
// lifts a 12 V OCV by 0.1-0.2 V after charging or driving, 12-25 points
// (common practice), so its weight drops by a factor of about 16.
CombinedSoc combine_soc(const SocInputs& inputs) {
  assert(inputs.from_sg || inputs.from_ocv);
  const double sg_sigma = inputs.sg_uncertainty_pct.value_or(kDefaultSgSocUncertaintyPct);
  double ocv_sigma = inputs.ocv_uncertainty_pct.value_or(kDefaultOcvSocUncertaintyPct);
  if (!inputs.ocv_settled) ocv_sigma = std::max(ocv_sigma, kUnsettledOcvUncertaintyPct);

  CombinedSoc out;
  if (!inputs.from_ocv) {
    out.soc = *inputs.from_sg;
    out.uncertainty_pct = sg_sigma;
    return out;
  }
  if (!inputs.from_sg) {
    out.soc = *inputs.from_ocv;
    out.uncertainty_pct = ocv_sigma;
    return out;
  }
  const double sg_soc = inputs.from_sg->value;
  const double ocv_soc = inputs.from_ocv->value;
  const double w_sg = 1.0 / (sg_sigma * sg_sigma);
  const double w_ocv = 1.0 / (ocv_sigma * ocv_sigma);
  out.soc = Percent{clamp_percent((w_sg * sg_soc + w_ocv * ocv_soc) / (w_sg + w_ocv))};
  out.uncertainty_pct = 1.0 / std::sqrt(w_sg + w_ocv);
  const double gap = std::abs(sg_soc - ocv_soc);
  if (gap > inputs.disagreement_tolerance_pct) {
    out.disagreement = true;
    out.uncertainty_pct = std::max(out.uncertainty_pct, gap / 2.0);
    out.note = disagreement_note(inputs, sg_soc, ocv_soc);
  }
  return out;
}

}  // namespace pbfleet::models
