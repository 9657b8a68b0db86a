// Sulfation and ageing from one battery's history.
//
// Signals, each computed from derived readings (derive.hpp):
//  - undercharge exposure: days in the last window (90 d) during which the
//    latest trusted SOC was below the chemistry's threshold (75 % default);
//    each trusted reading's SOC is held until the next reading or "now";
//  - full-charge trend: Theil-Sen slope of the SG 25/25 equivalent of
//    trusted readings taken after a recorded charge (all trusted readings
//    when too few follow a charge); below settings.min_trend_readings points
//    the report says "too few readings" and draws no trend;
//  - growing cell spread: Theil-Sen slope of the corrected cell spread;
//  - no recovery: a trusted reading after a recorded charge still more than
//    settings.recovery_sg_gap below the battery's full-charge SG;
//  - a failed load test at 75 % SOC or more.
#pragma once

#include <chrono>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "models/analytics/derive.hpp"
#include "models/analytics/history.hpp"
#include "models/analytics/safety.hpp"
#include "models/analytics/theil_sen.hpp"

namespace pbfleet::analytics {

// How far sulfation / ageing has gone, in plain words.
enum class SulfationClass {
  none,              // no sign
  early,             // exposure or a weak downward hint: recharge and keep it up
  advancing,         // a significant downward trend or a failed recovery
  likely_permanent,  // does not recover after charging and keeps falling, or fails a load test
};
// "none", "early", "advancing", "likely_permanent".
std::string_view to_string(SulfationClass c);

// One recommended step.
enum class Action {
  keep_watching,     // nothing to do beyond the weekly round
  recharge,          // full charge, then a settled reading
  equalise,          // controlled overcharge (flooded only), with the safety caution
  load_test,         // at 75 % SOC or more
  replace,
};
// "keep_watching", "recharge", "equalise", "load_test", "replace".
std::string_view to_string(Action a);

// Which series the full-charge trend was drawn from.
enum class TrendBasis { after_charge, all_trusted, none };
// "after_charge", "all_trusted", "none".
std::string_view to_string(TrendBasis b);

struct SulfationAssessment {
  std::string serial;
  std::int64_t depot_id = 0;
  std::string depot_name;
  SulfationClass level = SulfationClass::none;
  // Exposure
  double undercharge_days = 0.0;         // in the window
  int exposure_window_days = 90;
  double undercharge_threshold_pct = 75.0;
  // Full-charge SG trend (x in days since the first point, y SG 25/25 equivalent)
  TrendBasis trend_basis = TrendBasis::none;
  int trend_points = 0;
  std::optional<TrendFit> sg_trend;      // nullopt when too few points
  std::chrono::sys_seconds trend_origin{};  // x = 0 of sg_trend
  // Cell spread trend (same x)
  std::optional<TrendFit> spread_trend;
  std::optional<double> latest_spread;
  std::optional<int> weak_cell;          // 1-based, from the latest flagged reading
  // Recovery after charge
  int charges_seen = 0;                  // trusted readings after a recorded charge
  int charges_not_recovered = 0;
  bool latest_charge_recovered = true;
  bool load_test_failed = false;         // at 75 % SOC or more
  std::vector<std::string> reasons;
  std::vector<Action> actions;           // in order; may be empty (keep watching)
  std::vector<std::string_view> cautions; // safety texts for the actions given
};

// Assesses one battery's full history at `now`.
SulfationAssessment assess_sulfation(const BatteryHistory& history, std::chrono::sys_seconds now,
                                     const AnalyticsSettings& settings);
// Same, from readings already derived (derive_all over history.readings with
// the same settings), for a caller that caches derived values: deriving is
// most of the cost (about 6 us per reading, mostly the inverse Nernst solve).
// REQUIRES: derived.size() == history.readings.size().
SulfationAssessment assess_sulfation(const BatteryHistory& history, std::span<const DerivedReading> derived,
                                     std::chrono::sys_seconds now, const AnalyticsSettings& settings);

// What an assessment rests on besides "now": the trends, the recovery
// after charges, the latest load test and the cells, worked out once from a
// history, and the trusted readings' SOC the undercharge exposure is
// measured from (only those a window ending at most a day before the
// newest reading can reach). A caller may keep it while the battery's readings and spec
// stay the same; the server keeps one per battery.
struct SulfationBasis {
  SulfationAssessment fixed;  // all but battery names, exposure, level, actions, cautions
  std::vector<std::pair<std::chrono::sys_seconds, double>> trusted_soc;  // ascending taken_at
  std::optional<std::chrono::sys_seconds> newest_reading;
  bool weak_after_charge = false;
};
SulfationBasis sulfation_basis(const BatteryHistory& history, std::span<const DerivedReading> derived,
                               const AnalyticsSettings& settings);
SulfationBasis sulfation_basis(const BatteryHistory& history, const AnalyticsSettings& settings);
// The assessment at `now` from a basis: equal to assess_sulfation on the
// history the basis came from. REQUIRES: now >= basis.newest_reading minus
// one day (an earlier "now" may need readings the basis dropped).
SulfationAssessment assess_sulfation(const BatteryContext& battery, const SulfationBasis& basis,
                                     std::chrono::sys_seconds now, const AnalyticsSettings& settings);

// Orders a fleet list: worst class first, then exposure, then serial.
void sort_sulfation_report(std::vector<SulfationAssessment>& report);

// Assesses every in-service battery; ordered as sort_sulfation_report.
std::vector<SulfationAssessment> sulfation_report(std::span<const BatteryHistory> fleet,
                                                  std::chrono::sys_seconds now,
                                                  const AnalyticsSettings& settings);

}  // namespace pbfleet::analytics
