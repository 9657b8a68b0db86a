// Temperature correction of hydrometer readings.
//
// SG basis of the whole model: density of the electrolyte relative to the
// density of water AT THE SAME TEMPERATURE, referred to 25 degC
// ("SG 25/25"). A hydrometer reading taken at another electrolyte
// temperature is brought to the reference with a linear correction.
#pragma once

#include "models/units.hpp"

namespace pbfleet::models {

enum class SgReference {
  c25,  // 25 degC (77 degF): model basis, 0.0007 per degC
  f80,  // 80 degF (26.7 degC): common shop practice, 0.004 per 10 degF
};

// Reference temperature of a correction convention.
Celsius reference_temperature(SgReference reference);

// Hydrometer reading at `electrolyte` referred to the reference temperature:
// warmer electrolyte reads low and is corrected upward. Coefficients and
// their sources are in the .cpp.
SpecificGravity correct_sg(SpecificGravity measured, Celsius electrolyte,
                           SgReference reference = SgReference::c25);

// The reading a hydrometer would show at `electrolyte` for a given corrected
// SG (inverse of correct_sg; used by the demo generator).
SpecificGravity reading_at_temperature(SpecificGravity corrected, Celsius electrolyte,
                                       SgReference reference = SgReference::c25);

}  // namespace pbfleet::models
