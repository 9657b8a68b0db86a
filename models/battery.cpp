// Battery description: chemistry names, cell count, per-chemistry defaults.
#include "models/battery.hpp"

#include <array>
#include <cctype>
#include <cmath>
#include <string>

#include "models/text_format.hpp"

namespace pbfleet::models {
namespace {

struct ChemistryName {
  Chemistry chemistry;
  std::string_view name;
};
constexpr std::array<ChemistryName, 4> kChemistryNames{{
    {Chemistry::flooded, "flooded"},
    {Chemistry::efb, "efb"},
    {Chemistry::agm, "agm"},
    {Chemistry::gel, "gel"},
}};

// A lead-acid cell is nominally 2 V (any battery text; the couple's EMF is
// about 2.0-2.1 V, see nernst.cpp).
constexpr double kNominalVoltsPerCell = 2.0;
// 1 to 24 cells (2 V to 48 V nominal): the wire format's limit (kMaxCells).
constexpr int kMinCells = 1;
constexpr int kMaxCells = 24;

bool equal_ignoring_case(std::string_view a, std::string_view b) {
  if (a.size() != b.size()) return false;
  for (std::size_t i = 0; i < a.size(); ++i) {
    const auto ca = std::tolower(static_cast<unsigned char>(a[i]));
    const auto cb = std::tolower(static_cast<unsigned char>(b[i]));
    if (ca != cb) return false;
  }
  return true;
}

}  // namespace

std::optional<Chemistry> parse_chemistry(std::string_view text) {
  for (const auto& entry : kChemistryNames) {
    if (equal_ignoring_case(text, entry.name)) return entry.chemistry;
  }
  return std::nullopt;
}

std::string_view to_string(Chemistry chemistry) {
  for (const auto& entry : kChemistryNames) {
    if (entry.chemistry == chemistry) return entry.name;
  }
  return "flooded";  // unreachable: every enumerator is in the table
}

Result<int> cells_for_nominal_voltage(Volts nominal) {
  const double cells = nominal.value / kNominalVoltsPerCell;
  const double whole = std::round(cells);
  const std::string allowed = "a multiple of 2 V from 2 to 48 V (1 to 24 cells)";
  if (!std::isfinite(cells) || std::abs(cells - whole) > 1e-9 || whole < kMinCells ||
      whole > kMaxCells) {
    return Error{"nominal_v",
                 "nominal voltage " + detail::fixed(nominal.value, 2) +
                     " V is not a whole number of 2 V lead-acid cells",
                 allowed};
  }
  return static_cast<int>(whole);
}

// Full-charge / discharged SG 25/25 per chemistry (common practice):
// flooded and EFB starting batteries 1.265 / 1.120, the end points of the
// SG column of US Army TM 5-4210-230-14&P-1 (which is referred to 80 degF;
// the 0.001 basis difference is below hydrometer resolution). AGM and gel
// run denser acid, about 1.300 full and 1.150 discharged (common practice,
// no traceable source).
BatterySpec default_spec(Chemistry chemistry, int cells) {
  BatterySpec spec;
  spec.chemistry = chemistry;
  spec.cells = cells;
  switch (chemistry) {
    case Chemistry::flooded:
    case Chemistry::efb:
      spec.full_charge_sg = SpecificGravity{1.265};
      spec.discharged_sg = SpecificGravity{1.120};
      break;
    case Chemistry::agm:
    case Chemistry::gel:
      spec.full_charge_sg = SpecificGravity{1.300};
      spec.discharged_sg = SpecificGravity{1.150};
      break;
  }
  return spec;
}

}  // namespace pbfleet::models
