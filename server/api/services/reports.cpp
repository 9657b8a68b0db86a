#include "server/api/services/reports.hpp"

#include <cstdio>

#include "server/api/services/analytics_adapter.hpp"
#include "server/api/services/fleet_index.hpp"

namespace pbfleet::api {

namespace {

// Calls visit(history) for each battery in service (of one depot) with its
// last `count` readings, oldest first, one battery at a time: only the
// measured columns are read and one history buffer is reused, so a
// five-year trend report never holds the fleet's readings at once.
template <class Visit>
storage::StoreResult<storage::Done> each_history(storage::Store& store,
                                                 std::optional<storage::Id> depot,
                                                 std::size_t count, Visit&& visit) {
  auto index = load_fleet_index(store);
  if (!index) return index.error();
  storage::BatteryFilter filter{depot, storage::BatteryStatus::in_service, std::nullopt};
  analytics::BatteryHistory history;
  return store.visit_last_measurements(
      filter, count,
      [&](const storage::Battery& b, std::span<const storage::ReadingMeasurement> newest_first) {
        history.battery = context_of(b, *index);
        points_ascending(newest_first, history.readings);
        visit(static_cast<const analytics::BatteryHistory&>(history));
      });
}

}  // namespace

storage::StoreResult<analytics::WinterReport> build_winter_report(
    storage::Store& store, std::optional<storage::Id> depot, const analytics::ColdSpec& cold,
    std::chrono::sys_seconds now, const analytics::AnalyticsSettings& settings) {
  auto index = load_fleet_index(store);
  if (!index) return index.error();
  storage::BatteryFilter filter{depot, storage::BatteryStatus::in_service, std::nullopt};
  // Contexts first, then the cases pointing into them (no reallocation after).
  std::vector<analytics::BatteryContext> contexts;
  std::vector<analytics::WinterBasis> bases;
  auto done = store.visit_summaries(
      filter, [&](const storage::Battery& b, const storage::BatterySummary& summary) {
        contexts.push_back(context_of(b, *index));
        bases.push_back(summary);
      });
  if (!done) return done.error();
  std::vector<analytics::WinterCase> cases;
  cases.reserve(contexts.size());
  for (std::size_t i = 0; i < contexts.size(); ++i) cases.push_back({&contexts[i], bases[i]});
  return analytics::winter_report(cases, cold, now, settings);
}

storage::StoreResult<std::vector<analytics::SulfationAssessment>> build_sulfation_report(
    storage::Store& store, TrendMemo& memo, std::optional<storage::Id> depot,
    std::chrono::sys_seconds now, const analytics::AnalyticsSettings& settings) {
  std::vector<analytics::SulfationAssessment> out;
  auto done = memo.each(store, depot, kTrendLookback, settings,
                        [&](const analytics::BatteryContext& battery, const analytics::SulfationBasis& basis) {
                          out.push_back(analytics::assess_sulfation(battery, basis, now, settings));
                        });
  if (!done) return done.error();
  analytics::sort_sulfation_report(out);
  return out;
}

storage::StoreResult<std::vector<analytics::ReplacementForecast>> build_replacement_report(
    storage::Store& store, TrendMemo& memo, std::optional<storage::Id> depot,
    std::chrono::sys_seconds now, const analytics::AnalyticsSettings& settings) {
  std::vector<analytics::ReplacementForecast> out;
  auto done = memo.each(store, depot, kTrendLookback, settings,
                        [&](const analytics::BatteryContext& battery, const analytics::SulfationBasis& basis) {
                          out.push_back(analytics::forecast_replacement(
                              battery, analytics::assess_sulfation(battery, basis, now, settings), now, settings));
                        });
  if (!done) return done.error();
  analytics::sort_for_budget(out);
  return out;
}

storage::StoreResult<std::vector<analytics::DepotOverdue>> build_overdue_report(
    storage::Store& store, std::optional<storage::Id> depot, std::chrono::sys_seconds now,
    int days) {
  std::vector<analytics::BatteryContext> contexts;
  std::vector<std::optional<std::chrono::sys_seconds>> latest;
  auto done = each_history(store, depot, 1, [&](const analytics::BatteryHistory& h) {
    contexts.push_back(h.battery);
    latest.push_back(h.readings.empty() ? std::nullopt : std::optional(h.readings.back().taken_at));
  });
  if (!done) return done.error();
  std::vector<analytics::LastSeen> fleet;
  fleet.reserve(contexts.size());
  for (std::size_t i = 0; i < contexts.size(); ++i) fleet.push_back({&contexts[i], latest[i]});
  return analytics::overdue_report(fleet, now, days);
}

namespace {

std::string number(double v) {
  char text[32];
  std::snprintf(text, sizeof text, "%.4f", v);
  return text;
}

// Reads the data version first, so a report built while a write lands is
// kept under the older version: the next request after it builds afresh.
template <class T, class Build>
storage::StoreResult<std::shared_ptr<const T>> through(ReportCache& cache, storage::Store& store,
                                                       const std::string& key,
                                                       std::chrono::sys_seconds now, Build&& build) {
  auto version = store.data_version();
  if (!version) return version.error();
  return cache.get<T>(key, *version, now, std::forward<Build>(build));
}

}  // namespace

std::string winter_key(std::optional<storage::Id> depot, const analytics::ColdSpec& cold) {
  std::string params = "on=";
  params += std::to_string(cold.cold_date.time_since_epoch().count());
  params += ";low=";
  params += cold.low ? number(cold.low->value) : std::string("depot");
  for (const auto& [id, low] : cold.depot_lows) {
    params += ';';
    params += std::to_string(id);
    params += '=';
    params += number(low.value);
  }
  return report_key("winter", depot, params);
}

std::string trend_key(std::string_view report, std::optional<storage::Id> depot) {
  return report_key(report, depot, "");
}

std::string overdue_key(std::optional<storage::Id> depot, int days) {
  return report_key("overdue", depot, "days=" + std::to_string(days));
}

storage::StoreResult<std::shared_ptr<const analytics::WinterReport>> cached_winter_report(
    ReportCache& cache, storage::Store& store, std::optional<storage::Id> depot,
    const analytics::ColdSpec& cold, std::chrono::sys_seconds now) {
  return through<analytics::WinterReport>(cache, store, winter_key(depot, cold), now, [&] {
    return build_winter_report(store, depot, cold, now, {});
  });
}

storage::StoreResult<std::shared_ptr<const std::vector<analytics::SulfationAssessment>>>
cached_sulfation_report(ReportCache& cache, TrendMemo& memo, storage::Store& store,
                        std::optional<storage::Id> depot, std::chrono::sys_seconds now) {
  return through<std::vector<analytics::SulfationAssessment>>(
      cache, store, trend_key("sulfation", depot), now,
      [&] { return build_sulfation_report(store, memo, depot, now, {}); });
}

storage::StoreResult<std::shared_ptr<const std::vector<analytics::ReplacementForecast>>>
cached_replacement_report(ReportCache& cache, TrendMemo& memo, storage::Store& store,
                          std::optional<storage::Id> depot, std::chrono::sys_seconds now) {
  return through<std::vector<analytics::ReplacementForecast>>(
      cache, store, trend_key("replacements", depot), now,
      [&] { return build_replacement_report(store, memo, depot, now, {}); });
}

storage::StoreResult<std::shared_ptr<const std::vector<analytics::DepotOverdue>>> cached_overdue_report(
    ReportCache& cache, storage::Store& store, std::optional<storage::Id> depot,
    std::chrono::sys_seconds now, int days) {
  return through<std::vector<analytics::DepotOverdue>>(
      cache, store, overdue_key(depot, days), now,
      [&] { return build_overdue_report(store, depot, now, days); });
}

}  // namespace pbfleet::api
