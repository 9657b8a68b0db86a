// Input types of the analytics: a battery's context and its readings in a
// compact form, plus the settings every report shares.
//
// The analytics are pure: storage fills these types, the caller passes "now"
// in, and nothing here reads a clock, a file or a database. A ReadingPoint is
// kept small (80 bytes) because a fleet report may hold millions of them.
#pragma once

#include <array>
#include <cassert>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "models/battery.hpp"
#include "models/cranking.hpp"
#include "models/specific_gravity.hpp"
#include "models/units.hpp"

namespace pbfleet::analytics {

// An optional measurement stored in 4 bytes: NaN means "not measured".
// Assign a double or a std::optional<double>; read with has_value()/value().
class Measured {
 public:
  constexpr Measured() = default;
  constexpr Measured(double v) : v_(static_cast<float>(v)) {}  // NOLINT: implicit by design
  constexpr Measured(std::optional<double> v)                   // NOLINT: implicit by design
      : v_(v ? static_cast<float>(*v) : kNone) {}
  constexpr Measured(std::nullopt_t) {}                         // NOLINT: implicit by design
  [[nodiscard]] bool has_value() const { return !std::isnan(v_); }
  explicit operator bool() const { return has_value(); }
  // REQUIRES: has_value()
  [[nodiscard]] double value() const { assert(has_value()); return v_; }
  [[nodiscard]] std::optional<double> get() const {
    return has_value() ? std::optional<double>(v_) : std::nullopt;
  }

 private:
  static constexpr float kNone = std::numeric_limits<float>::quiet_NaN();
  float v_ = kNone;
};

// Most cells a reading can carry (a 48 V battery; matches wire::kMaxCells).
inline constexpr std::size_t kMaxCellsPerReading = 24;

// Raw hydrometer SG per cell, cell 1 first, in 48 bytes: each value is kept
// in units of 0.0001, exact for hydrometer readings (3 decimals).
class CellSgs {
 public:
  CellSgs() = default;
  // REQUIRES: sgs.size() <= kMaxCellsPerReading, each value in 0..6.5.
  explicit CellSgs(std::span<const models::SpecificGravity> sgs);
  CellSgs(std::initializer_list<double> sgs);

  [[nodiscard]] std::size_t size() const { return count_; }
  [[nodiscard]] bool empty() const { return count_ == 0; }
  // Raw SG of cell i (0-based). REQUIRES: i < size().
  [[nodiscard]] models::SpecificGravity operator[](std::size_t i) const {
    assert(i < count_);
    return models::SpecificGravity{tenth_points_[i] / kScale};
  }
  // REQUIRES: size() < kMaxCellsPerReading.
  void push_back(models::SpecificGravity sg);

 private:
  static constexpr double kScale = 10000.0;
  std::array<std::uint16_t, kMaxCellsPerReading> tenth_points_{};
  std::uint8_t count_ = 0;
};

// One logged reading, raw as the crew took it (never corrected in place).
struct ReadingPoint {
  std::chrono::sys_seconds taken_at{};  // UTC
  Measured ocv_v;                       // battery open-circuit voltage, V
  Measured electrolyte_c;               // electrolyte temperature, degC
  Measured rest_h;                      // hours at rest before the OCV
  Measured load_test_a;                 // load-test current, A
  Measured load_test_end_v;             // terminal voltage at the end of the load test, V
  CellSgs cells;                        // raw hydrometer SG, cell 1 first
  bool after_charge = false;            // battery was charged since the previous reading
  bool water_added = false;             // water was added at this reading
};

enum class EventKind { fitted, charged, water_added, retired };
// "fitted", "charged", "water_added", "retired".
std::string_view to_string(EventKind kind);

// Something that happened to a battery besides a reading.
struct BatteryEvent {
  std::chrono::sys_seconds at{};
  EventKind kind = EventKind::fitted;
  std::string detail;
};

// What the analytics need to know about one battery and where it serves.
struct BatteryContext {
  std::string serial;
  models::BatterySpec spec;                       // chemistry, cells, full SG, rated CCA
  std::int64_t depot_id = 0;
  std::string depot_name;
  models::Celsius depot_design_low{-18.0};        // the depot's design winter low
  std::string vehicle_code;                       // empty when not fitted
  // Engine cranking need at the CCA test temperature (-18 degC): either given
  // directly, or estimated from engine kind and displacement.
  std::optional<models::Amperes> required_cca;
  std::optional<models::EngineKind> engine;
  std::optional<double> displacement_l;
  std::optional<std::chrono::sys_days> installed_on;
  bool in_service = true;
};

// Cranking current the battery's engine needs at -18 degC (A): the recorded
// value, else models::required_cca_for_engine(kind, displacement); nullopt
// when neither is known.
std::optional<models::Amperes> required_cca_at_test(const BatteryContext& battery);

// One battery with its readings (ascending taken_at) and events.
struct BatteryHistory {
  BatteryContext battery;
  std::vector<ReadingPoint> readings;
  std::vector<BatteryEvent> events;
};

// Thresholds shared by all reports. Defaults are common practice unless a
// source is named; all are configurable per deployment.
struct AnalyticsSettings {
  // OCV rest below which surface charge is assumed (common practice: 4 h
  // minimum, 6-24 h better).
  models::Hours settled_rest{4.0};
  // Reference temperature SG is corrected to (model basis: 25 degC).
  models::SgReference sg_reference = models::SgReference::c25;
  // Max minus min corrected cell SG that flags a cell (0.050 starting
  // batteries, common practice; 0.025 US Army TM 9-6140-200-14).
  double spread_limit = 0.050;
  // SG and OCV SOC further apart than this are flagged (percentage points).
  double soc_disagreement_pct = 15.0;
  // SOC below which a battery counts as undercharged, per chemistry, indexed
  // by models::Chemistry (flooded, efb, agm, gel). 75 %: below it recharge
  // before a load test and to avoid sulfation (common practice; 12.4 V = 75 %
  // in US Army TM 5-3805-262-20).
  std::array<double, 4> undercharge_soc_pct{75.0, 75.0, 75.0, 75.0};
  // Days without a reading after which a battery is overdue (weekly rounds
  // plus a few days' grace; common practice).
  int overdue_days = 10;
  // Fewest points for a trend; below it the report says "too few readings".
  int min_trend_readings = 8;
  // Window for the undercharge exposure (days).
  int exposure_window_days = 90;
  // Two-sided confidence level of the Theil-Sen slope interval.
  double trend_confidence = 0.90;
  // Crank margin (available / needed at the low) below which a battery is
  // watched; below 1.0 it will likely not crank (common practice headroom).
  double crank_watch_margin = 1.25;
  // Degrees C between freezing point and the low below which a battery is
  // watched; at or below 0 ice is expected (common practice).
  double freeze_watch_margin_c = 5.0;
  // A charged battery whose corrected SG stays this far below its full-charge
  // SG has not recovered (common practice).
  double recovery_sg_gap = 0.030;
  // SOC-capacity replacement threshold: a battery that no longer charges
  // above this share counts as worn out. 80 % of rated capacity is the
  // replacement criterion of IEEE Std 450 (stationary batteries, from memory).
  double replace_capacity_pct = 80.0;
  // How far ahead replacement dates are forecast (days).
  int forecast_horizon_days = 3 * 365;
  // Sulfation classes (design choices of this project, tunable):
  // a full-charge SG fall counts only when it would lose at least this much
  // SG per year (0.010 is about 7 % SOC on a 1.120-1.265 battery) ...
  double min_trend_drop_sg_per_year = 0.010;
  // ... a weak hint needs this share of pairwise slopes pointing down ...
  double trend_hint_same_sign = 0.60;
  // ... and undercharge exposure (days in the window) for early / advancing.
  double exposure_early_days = 7.0;
  double exposure_advancing_days = 30.0;
};

// Undercharge threshold for a chemistry (%).
double undercharge_threshold_pct(const AnalyticsSettings& settings, models::Chemistry chemistry);

// Whole days from `from` to `to` (fractional, may be negative).
double days_between(std::chrono::sys_seconds from, std::chrono::sys_seconds to);

}  // namespace pbfleet::analytics
