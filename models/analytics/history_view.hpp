// One battery's history for the bay terminal and the CLI's chart: each
// reading raw and derived side by side, plus the events (fitted, charged,
// water added, retired) merged in time order.
#pragma once

#include <chrono>
#include <optional>
#include <string>
#include <vector>

#include "models/analytics/derive.hpp"
#include "models/analytics/history.hpp"

namespace pbfleet::analytics {

struct HistoryRow {
  std::chrono::sys_seconds taken_at{};
  // Raw, as logged
  std::optional<double> ocv_v;
  std::vector<double> raw_cell_sg;
  std::optional<double> raw_mean_sg;
  std::optional<double> electrolyte_c;
  std::optional<double> rest_h;
  bool after_charge = false;
  bool water_added = false;
  // Derived (derive.hpp): corrected SG, SOC, spread, flags
  DerivedReading derived;
};

struct HistoryView {
  std::string serial;
  std::vector<HistoryRow> rows;       // ascending taken_at
  std::vector<BatteryEvent> events;   // given events plus "charged" and
                                      // "water_added" from readings, by time
  // Chart ranges (nullopt when no reading has the value)
  std::optional<double> min_soc_percent, max_soc_percent;
  std::optional<double> min_corrected_sg, max_corrected_sg;
};

// Builds the view of readings taken in [from, to] (either bound optional).
HistoryView history_view(const BatteryHistory& history, const AnalyticsSettings& settings,
                         std::optional<std::chrono::sys_seconds> from = std::nullopt,
                         std::optional<std::chrono::sys_seconds> to = std::nullopt);

}  // namespace pbfleet::analytics
