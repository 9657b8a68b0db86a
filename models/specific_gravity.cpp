// Temperature correction of hydrometer readings to a reference temperature.
//
// Two conventions, both linear in temperature:
//  - 25 degC reference (the model basis): 0.0007 SG per degC, added when the
//    electrolyte is warmer than 25 degC (common practice, no traceable
//    source). Physics check: 0.0007 per K matches the thermal expansion
//    dRho/dT of 30-40 wt% sulfuric acid, -0.00069 to -0.00073 g/cm3 per K
//    (linear rho(T) fits in the sulfate routines of a published atmospheric
//    aerosol-model code, 2001).
//  - 80 degF reference: 0.004 SG per 10 degF, added above 80 degF and
//    subtracted below (US Army TM 5-4210-230-14&P-1, battery section).
//    0.004 per 10 degF is 0.00072 per degC, the same physics.
#include "models/specific_gravity.hpp"

namespace pbfleet::models {
namespace {

constexpr double kSgPerDegCAt25 = 0.0007;             // common practice
constexpr double kSgPer10DegFAt80 = 0.004;             // TM 5-4210-230-14&P-1
constexpr double kSgPerDegCAt80 = kSgPer10DegFAt80 * 9.0 / 50.0;  // per degC = per 10 degF * 9/5 / 10

double coefficient_per_degc(SgReference reference) {
  return reference == SgReference::c25 ? kSgPerDegCAt25 : kSgPerDegCAt80;
}

}  // namespace

Celsius reference_temperature(SgReference reference) {
  return reference == SgReference::c25 ? Celsius{25.0} : celsius_from_fahrenheit(80.0);
}

SpecificGravity correct_sg(SpecificGravity measured, Celsius electrolyte, SgReference reference) {
  const double delta_c = electrolyte.value - reference_temperature(reference).value;
  return SpecificGravity{measured.value + coefficient_per_degc(reference) * delta_c};
}

SpecificGravity reading_at_temperature(SpecificGravity corrected, Celsius electrolyte,
                                       SgReference reference) {
  const double delta_c = electrolyte.value - reference_temperature(reference).value;
  return SpecificGravity{corrected.value - coefficient_per_degc(reference) * delta_c};
}

}  // namespace pbfleet::models
