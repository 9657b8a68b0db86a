// Freezing point of the electrolyte versus its SG (data cited in the .cpp).
#pragma once

#include "models/result.hpp"
#include "models/units.hpp"

namespace pbfleet::models {

// Temperature (degC) at which ice starts to form in electrolyte of this SG
// 25/25: CRC Handbook freezing-point depression to 34 wt %, US Army TM 5-1185
// beyond. Error (field "sg") outside the data's range, SG 1.000 to 1.281.
Result<Celsius> freezing_point(SpecificGravity sg25);

// Degrees C between the coming low and the freezing point: positive = safe
// margin, negative = expected to freeze.
Result<double> freeze_margin_c(SpecificGravity sg25, Celsius low);

}  // namespace pbfleet::models
