// Freezing point of the electrolyte versus its SG (data cited in the .cpp).
#pragma once

#include "models/result.hpp"
#include "models/units.hpp"

namespace pbfleet::models {

// Temperature at which ice starts to form in electrolyte of this SG 25/25.
// Error outside the data's range.
Result<Celsius> freezing_point(SpecificGravity sg25);

// Degrees C between the coming low and the freezing point: positive = safe
// margin, negative = expected to freeze.
Result<double> freeze_margin_c(SpecificGravity sg25, Celsius low);

}  // namespace pbfleet::models
