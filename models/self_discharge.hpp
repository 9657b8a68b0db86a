// Self-discharge projection: SOC expected after some days on open circuit.
#pragma once

#include <span>

#include "models/battery.hpp"
#include "models/units.hpp"

namespace pbfleet::models {

// Self-discharge rate (% of full charge per day) at temperature t for a
// chemistry; doubles per +10 degC (common practice). Anchors in the .cpp.
double self_discharge_pct_per_day(Chemistry chemistry, Celsius t);

// SOC after `days` at a constant temperature, starting from `start`.
Percent project_soc(Percent start, Days days, Celsius t, Chemistry chemistry);

// SOC after a profile of daily mean temperatures (one entry per day).
Percent project_soc(Percent start, std::span<const Celsius> daily_temps, Chemistry chemistry);

}  // namespace pbfleet::models
