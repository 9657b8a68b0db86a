#include "models/analytics/history_view.hpp"

#include <algorithm>

namespace pbfleet::analytics {
namespace {

void widen(std::optional<double>& lo, std::optional<double>& hi, std::optional<double> v) {
  if (!v) return;
  lo = lo ? std::min(*lo, *v) : *v;
  hi = hi ? std::max(*hi, *v) : *v;
}

HistoryRow row_of(const ReadingPoint& r, DerivedReading derived) {
  HistoryRow row;
  row.taken_at = r.taken_at;
  row.ocv_v = r.ocv_v.get();
  row.electrolyte_c = r.electrolyte_c.get();
  row.rest_h = r.rest_h.get();
  row.after_charge = r.after_charge;
  row.water_added = r.water_added;
  double sum = 0.0;
  for (std::size_t i = 0; i < r.cells.size(); ++i) {
    row.raw_cell_sg.push_back(r.cells[i].value);
    sum += r.cells[i].value;
  }
  if (!r.cells.empty()) row.raw_mean_sg = sum / static_cast<double>(r.cells.size());
  row.derived = std::move(derived);
  return row;
}

bool in_range(std::chrono::sys_seconds t, std::optional<std::chrono::sys_seconds> from,
              std::optional<std::chrono::sys_seconds> to) {
  return (!from || t >= *from) && (!to || t <= *to);
}

void add_reading_events(const HistoryRow& row, std::vector<BatteryEvent>& events) {
  if (row.after_charge) events.push_back({row.taken_at, EventKind::charged, "charged before this reading"});
  if (row.water_added) events.push_back({row.taken_at, EventKind::water_added, "water added at this reading"});
}

}  // namespace

HistoryView history_view(const BatteryHistory& history, const AnalyticsSettings& settings,
                         std::optional<std::chrono::sys_seconds> from,
                         std::optional<std::chrono::sys_seconds> to) {
  HistoryView view;
  view.serial = history.battery.serial;
  // Derive the whole history so the water hold carries in from before `from`.
  auto derived = derive_all(history.readings, history.battery.spec, settings);
  for (std::size_t i = 0; i < history.readings.size(); ++i) {
    const auto& r = history.readings[i];
    if (!in_range(r.taken_at, from, to)) continue;
    view.rows.push_back(row_of(r, std::move(derived[i])));
    const auto& row = view.rows.back();
    widen(view.min_soc_percent, view.max_soc_percent, row.derived.soc_percent);
    widen(view.min_corrected_sg, view.max_corrected_sg, row.derived.corrected_sg);
    add_reading_events(row, view.events);
  }
  for (const auto& e : history.events) {
    if (in_range(e.at, from, to)) view.events.push_back(e);
  }
  std::stable_sort(view.events.begin(), view.events.end(),
                   [](const auto& a, const auto& b) { return a.at < b.at; });
  return view;
}

}  // namespace pbfleet::analytics
