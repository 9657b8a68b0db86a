// Charts drawn on the server as inline SVG: no chart script in the browser,
// nothing to fetch, and the page's numbers and its pictures come from the
// same values. Each point carries a <title> (the browser shows it on hover
// and screen readers read it); flagged points are diamonds, not dots, so
// they stand out without colour.
#pragma once

#include <chrono>
#include <optional>
#include <string>
#include <vector>

namespace pbfleet::web {

struct ChartPoint {
  std::chrono::sys_seconds at{};
  double value = 0.0;
  std::optional<double> low, high;  // uncertainty band around value
  bool flagged = false;
  std::string title;  // what hover shows: date, value, flags
};

struct TimeChart {
  std::string id;       // element id, e.g. "soc-chart"
  std::string label;    // accessible name, e.g. "State of charge over time"
  std::string y_label;  // axis caption with unit, e.g. "SOC %"
  double y_min = 0.0, y_max = 1.0;
  int y_decimals = 0;
  std::vector<ChartPoint> points;  // ascending time
};

// <svg> of a time series: axes, a band where points carry low/high, the
// line, and one marker per point (class "pt", plus "flagged").
[[nodiscard]] std::string time_chart_svg(const TimeChart& chart);

struct CellBar {
  int cell = 1;            // 1-based
  double sg = 0.0;         // corrected SG
  bool weak = false;       // the reading's weak cell
};

// <svg> of one reading's per-cell SG as bars from `floor`, the weak cell
// drawn hatched and labelled "weak".
[[nodiscard]] std::string cell_chart_svg(const std::string& id, const std::string& label,
                                         const std::vector<CellBar>& cells, double floor,
                                         double ceiling);

}  // namespace pbfleet::web
