// Cell-to-cell spread of corrected SG; limits are cited in cells.hpp.
#include "models/cells.hpp"

#include <algorithm>
#include <cassert>

namespace pbfleet::models {

CellSpread check_cells(std::span<const SpecificGravity> corrected, double limit) {
  assert(corrected.size() >= 2);
  const auto [lowest, highest] = std::minmax_element(corrected.begin(), corrected.end());
  CellSpread out;
  out.spread = highest->value - lowest->value;
  // Readings have three decimals; the guard keeps 0.050 at a 0.050 limit unflagged.
  out.exceeds = out.spread > limit + 1e-9;
  if (out.exceeds) out.weak_cell = static_cast<int>(lowest - corrected.begin());
  return out;
}

}  // namespace pbfleet::models
