// What pbfleet knows about a battery type: chemistry, cells, acid limits,
// ratings. Defaults per chemistry are common practice; any of them can be
// overridden per battery type.
#pragma once

#include <optional>
#include <string_view>

#include "models/result.hpp"
#include "models/units.hpp"

namespace pbfleet::models {

enum class Chemistry { flooded, efb, agm, gel };

// "flooded", "efb", "agm", "gel" (case-insensitive) -> Chemistry; nullopt otherwise.
std::optional<Chemistry> parse_chemistry(std::string_view text);
// Lower-case wire name of a chemistry.
std::string_view to_string(Chemistry chemistry);

// Cells in series for a nominal voltage: 2 V cell per cell (4 V = 2, 6 V = 3,
// 12 V = 6, 24 V = 12). Error for anything that is not a whole number of cells.
Result<int> cells_for_nominal_voltage(Volts nominal);

struct BatterySpec {
  Chemistry chemistry = Chemistry::flooded;
  int cells = 6;
  SpecificGravity full_charge_sg{1.265};  // corrected to 25 degC
  SpecificGravity discharged_sg{1.120};   // corrected to 25 degC, SOC 0 %
  Amperes rated_cca{0.0};                 // SAE J537 at -18 degC; 0 = unknown
  std::optional<double> reserve_capacity_min;  // minutes at 25 A, 27 degC
  std::optional<double> capacity_ah;           // 20 h rate

  bool operator==(const BatterySpec&) const = default;
};

// Default spec for a chemistry and cell count (full / discharged SG per
// chemistry, common practice), with no ratings.
BatterySpec default_spec(Chemistry chemistry, int cells = 6);

}  // namespace pbfleet::models
