// Replacement forecast: when will a battery's full-charge trend cross the
// line below which it should be replaced?
//
// The full-charge SG trend (sulfation.hpp, Theil-Sen) is extended until the
// SG reached at full charge falls to the higher of two thresholds:
//  - cranking: the SG whose SOC gives crank margin 1.0 at the depot's design
//    low (models::available_cca vs models::required_current_at), found by
//    bisection on SOC and sg_for_soc;
//  - capacity: the SG of settings.replace_capacity_pct SOC.
// The band comes from the slope's confidence interval through the same
// centre point: the steeper slope gives the early date, the shallower the
// late one (none when the shallower slope does not fall).
#pragma once

#include <chrono>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "models/analytics/history.hpp"
#include "models/analytics/sulfation.hpp"

namespace pbfleet::analytics {

// Which threshold the forecast is for.
enum class ReplaceCriterion { cranking, capacity };
// "cranking", "capacity".
std::string_view to_string(ReplaceCriterion c);

struct ReplacementForecast {
  std::string serial;
  std::int64_t depot_id = 0;
  std::string depot_name;
  ReplaceCriterion criterion = ReplaceCriterion::capacity;
  double threshold_sg = 0.0;                       // SG 25/25 at the threshold
  double design_low_c = 0.0;
  std::optional<std::chrono::sys_days> date;       // central estimate
  std::optional<std::chrono::sys_days> earliest;   // from the steeper slope
  std::optional<std::chrono::sys_days> latest;     // from the shallower slope; nullopt = not in sight
  bool already_crossed = false;                    // the fitted line is below the threshold now
  std::optional<double> slope_sg_per_30d;          // trend slope, SG points per 30 days
  std::string reason;                              // sentence: basis or why no date
};

// Forecast for one battery from its sulfation assessment (which carries the
// trend). No date when there is no significant trend, or the crossing lies
// beyond settings.forecast_horizon_days.
ReplacementForecast forecast_replacement(const BatteryContext& battery,
                                         const SulfationAssessment& assessment,
                                         std::chrono::sys_seconds now,
                                         const AnalyticsSettings& settings);

// SG 25/25 at full charge below which the battery will not crank at `low`
// (crank margin < 1). The battery's full-charge SG when it will not crank
// even at 100 % SOC; its discharged SG when it cranks even at 0 %; nullopt
// when the rated CCA or the engine need is unknown.
std::optional<double> cranking_threshold_sg(const BatteryContext& battery, models::Celsius low);

// Fleet list: dated forecasts first by date, then undated ones by serial.
std::vector<ReplacementForecast> replacement_report(std::span<const BatteryHistory> fleet,
                                                    std::chrono::sys_seconds now,
                                                    const AnalyticsSettings& settings);

// Sort in place into the fleet-list order above.
void sort_for_budget(std::vector<ReplacementForecast>& forecasts);

}  // namespace pbfleet::analytics
