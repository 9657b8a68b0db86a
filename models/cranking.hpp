// Cold cranking: what the battery can deliver and what the engine needs.
//
// The rated CCA is anchored to the SAE J537 / EN 50342-1 test: fully charged,
// -18 degC, 30 s (SAE) to the end voltage. Fit points are cited in the .cpp.
#pragma once

#include <optional>
#include <string_view>

#include "models/units.hpp"

namespace pbfleet::models {

// CCA test temperature of SAE J537 and EN 50342-1.
inline constexpr Celsius kCcaTestTemperature{-18.0};

// Fraction of the rated CCA available at electrolyte temperature t and SOC
// (1.0 at the test temperature and full charge; may exceed 1 when warmer).
// US Army TM 5-1185 temperature points times a common-practice SOC factor.
double available_cca_fraction(Celsius t, Percent soc);
// Available cranking current (A) = rated CCA x available fraction.
Amperes available_cca(Amperes rated_cca, Celsius t, Percent soc);

enum class EngineKind { gasoline, diesel };
// "gasoline" (or "petrol"), "diesel", case-insensitive -> EngineKind; nullopt otherwise.
std::optional<EngineKind> parse_engine_kind(std::string_view text);
// Lower-case wire name of an engine kind.
std::string_view to_string(EngineKind kind);

// Cranking current the engine needs at the CCA test temperature (A), from
// its displacement in litres (common-practice sizing rule: 1 CCA per cubic
// inch gasoline, 2 diesel). REQUIRES: displacement_l > 0.
Amperes required_cca_for_engine(EngineKind kind, double displacement_l);
// Cranking current needed at temperature t, scaled from the need at the CCA
// test temperature (cold oil raises it; common practice).
Amperes required_current_at(Amperes required_at_test, Celsius t);

// Crank margin = available / required at the low (dimensionless). > 1 means
// it should crank. REQUIRES: required > 0.
double crank_margin(Amperes available, Amperes required);

}  // namespace pbfleet::models
