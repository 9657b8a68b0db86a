// Cell-to-cell checks on per-cell SG readings.
#pragma once

#include <optional>
#include <span>

#include "models/units.hpp"

namespace pbfleet::models {

// Max minus min corrected SG that flags a starting battery (common practice).
inline constexpr double kStartingSpreadLimit = 0.050;
// Stricter limit for stationary / Army batteries: 0.025 between any two cells
// of a fully charged battery (US Army TM 9-6140-200-14).
inline constexpr double kStationarySpreadLimit = 0.025;

struct CellSpread {
  double spread = 0.0;            // max - min corrected SG
  std::optional<int> weak_cell;   // 0-based index of the lowest cell when flagged
  bool exceeds = false;           // spread > limit
};

// Spread of corrected per-cell SG and the cell that deviates.
// REQUIRES: at least two cells.
CellSpread check_cells(std::span<const SpecificGravity> corrected, double limit = kStartingSpreadLimit);

}  // namespace pbfleet::models
