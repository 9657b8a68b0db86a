// Composition of the electrolyte: SG 25/25 <-> weight percent H2SO4 <->
// molality. Density data and interpolation method are cited in the .cpp.
#pragma once

#include "models/result.hpp"
#include "models/units.hpp"

namespace pbfleet::models {

// Range the composition tables cover (SG 25/25): pure water to 50 wt %
// H2SO4, the last row of the CRC density table used (SG 25/25 1.3956,
// rounded down).
inline constexpr SpecificGravity kMinTableSg{1.000};
inline constexpr SpecificGravity kMaxTableSg{1.395};

// Weight percent H2SO4 of an electrolyte with this SG 25/25.
// Error (field "sg") outside the density table's range.
Result<WeightPercent> weight_percent_from_sg(SpecificGravity sg25);
// SG 25/25 of an electrolyte of this composition. Error outside the table.
Result<SpecificGravity> sg_from_weight_percent(WeightPercent w);

// Molality (mol/kg water) from weight percent; exact: m = 1000 w / (M (100 - w)).
Molality molality_from_weight_percent(WeightPercent w);
// Weight percent from molality; exact inverse of the above.
WeightPercent weight_percent_from_molality(Molality m);

// SG 25/25 -> molality; error outside the table.
Result<Molality> molality_from_sg(SpecificGravity sg25);
// Molality -> SG 25/25; error outside the table.
Result<SpecificGravity> sg_from_molality(Molality m);

}  // namespace pbfleet::models
