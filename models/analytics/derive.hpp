// Derived values of one reading: corrected SG, SOC from SG and from OCV,
// their combination with an uncertainty, the settled / trusted verdict, the
// cell spread and the flags. This is what the history endpoint and the
// POST /v1/readings response show per reading. All physics comes from
// models/ (specific_gravity, state_of_charge, cells, freeze_point).
#pragma once

#include <cstdint>
#include <optional>
#include <string_view>
#include <vector>

#include "models/analytics/history.hpp"

namespace pbfleet::analytics {

// Something worth a person's attention on a reading. The wire words
// (to_string) are stable: clients may match on them.
enum class Flag : std::uint8_t {
  ocv_unsettled,             // rested less than the settled threshold (or rest unknown)
  surface_charge_suspected,  // OCV reads above what the acid supports: not trusted
  soc_disagreement,          // SG and OCV SOC further apart than the tolerance
  cell_spread,               // max - min corrected cell SG above the limit
  water_added_hold,          // spread alarm held back: water added since the last full charge
  low_soc,                   // SOC below the chemistry's undercharge threshold
  temperature_assumed,       // no electrolyte temperature: 25 degC assumed for correction
  sg_out_of_range,           // corrected SG outside what the models cover
  ocv_out_of_range,          // OCV no acid concentration produces
  load_test_at_low_soc,      // load test taken below 75 % SOC: not meaningful
  load_test_failed,          // end voltage below the temperature-dependent minimum
  no_soc,                    // neither SG nor OCV usable
};
inline constexpr int kFlagCount = 12;

// "ocv_unsettled", "surface_charge_suspected", "soc_disagreement",
// "cell_spread", "water_added_hold", "low_soc", "temperature_assumed",
// "sg_out_of_range", "ocv_out_of_range", "load_test_at_low_soc",
// "load_test_failed", "no_soc".
std::string_view to_string(Flag flag);

// A small set of flags (one bit each).
class FlagSet {
 public:
  void set(Flag f) { bits_ |= bit(f); }
  [[nodiscard]] bool has(Flag f) const { return (bits_ & bit(f)) != 0; }
  [[nodiscard]] bool empty() const { return bits_ == 0; }
  // Wire words of the set flags, in enum order.
  [[nodiscard]] std::vector<std::string_view> words() const;

 private:
  static constexpr std::uint16_t bit(Flag f) { return static_cast<std::uint16_t>(1u << static_cast<int>(f)); }
  std::uint16_t bits_ = 0;
};

struct DerivedReading {
  // Temperature used for the corrections (measured, or 25 degC assumed).
  double electrolyte_c = 25.0;
  // From SG (when cells were read)
  std::optional<double> corrected_sg;        // mean of cells, referred to settings.sg_reference
  std::vector<double> corrected_cell_sg;     // cell 1 first
  std::optional<double> soc_from_sg_percent;
  // From OCV (when measured)
  std::optional<double> soc_from_ocv_percent;
  std::optional<bool> ocv_settled;           // nullopt when no OCV
  // Combined
  std::optional<double> soc_percent;         // nullopt when no_soc
  double soc_uncertainty_percent = 0.0;      // +/- percentage points
  // SG 25/25 equivalent of the reading: corrected SG, else the OCV through
  // the inverse Nernst model (models::sg_from_ocv). Used for trends.
  std::optional<double> sg_equivalent;
  std::optional<double> freezing_point_c;    // of the sg_equivalent
  // Cells (two or more)
  std::optional<double> cell_spread;         // max - min corrected SG
  std::optional<int> weak_cell;              // 1-based, when the spread is flagged
  // Load test (when taken): the end voltage and the minimum at this temperature.
  std::optional<double> load_test_min_v;
  // Trusted for projections: a SOC exists, no surface charge is suspected,
  // and the OCV is settled or the SOC rests on SG readings.
  bool trusted = false;
  FlagSet flags;
};

// Derives one reading. Never fails: unusable parts set flags instead.
// `spec` gives chemistry, cells and the full / discharged SG. `water_hold`:
// water was added at this or an earlier reading and no charge has been
// recorded since, so a spread is reported as water_added_hold instead of
// cell_spread (a freshly watered cell reads low until mixed by charging).
DerivedReading derive(const ReadingPoint& reading, const models::BatterySpec& spec,
                      const AnalyticsSettings& settings, bool water_hold = false);

// Derives a whole history (ascending taken_at), carrying the water hold from
// a water_added reading to the next after_charge reading.
std::vector<DerivedReading> derive_all(std::span<const ReadingPoint> readings,
                                       const models::BatterySpec& spec,
                                       const AnalyticsSettings& settings);

// Minimum end voltage of a 12 V load test (half CCA, 15 s) at electrolyte
// temperature t, scaled by cells / 6: 9.6 V at 21 degC and above, falling to
// 8.5 V at -18 degC, linear between (common practice).
models::Volts load_test_minimum(models::Celsius t, int cells);

// SG 25/25 at which models::soc_from_sg gives `soc` for this spec (numeric
// inverse by bisection on the model, so the curve lives in one place).
models::SpecificGravity sg_for_soc(models::Percent soc, const models::BatterySpec& spec);

}  // namespace pbfleet::analytics
