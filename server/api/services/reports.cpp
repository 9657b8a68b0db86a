#include "server/api/services/reports.hpp"

#include "server/api/services/analytics_adapter.hpp"
#include "server/api/services/fleet_index.hpp"

namespace pbfleet::api {

namespace {

// Batteries in service (of one depot) with their last `count` readings,
// plus the depots and vehicles to build their contexts.
struct Loaded {
  FleetIndex index;
  std::vector<storage::BatteryReadings> batteries;
};

storage::StoreResult<Loaded> load(storage::Store& store, std::optional<storage::Id> depot,
                                  std::size_t count) {
  auto index = load_fleet_index(store);
  if (!index) return index.error();
  storage::BatteryFilter filter{depot, storage::BatteryStatus::in_service, std::nullopt};
  auto batteries = store.last_readings(filter, count);
  if (!batteries) return batteries.error();
  return Loaded{std::move(index.value()), std::move(batteries.value())};
}

// Contexts and ascending histories for the trend reports.
std::vector<analytics::BatteryHistory> histories(const Loaded& loaded) {
  std::vector<analytics::BatteryHistory> out;
  out.reserve(loaded.batteries.size());
  for (const auto& b : loaded.batteries)
    out.push_back({context_of(b.battery, loaded.index), points_ascending(b.readings), {}});
  return out;
}

}  // namespace

storage::StoreResult<analytics::WinterReport> build_winter_report(
    storage::Store& store, std::optional<storage::Id> depot, const analytics::ColdSpec& cold,
    std::chrono::sys_seconds now, const analytics::AnalyticsSettings& settings) {
  auto loaded = load(store, depot, kWinterLookback);
  if (!loaded) return loaded.error();
  std::vector<analytics::BatteryContext> contexts;
  std::vector<std::vector<analytics::ReadingPoint>> points;
  contexts.reserve(loaded->batteries.size());
  points.reserve(loaded->batteries.size());
  for (const auto& b : loaded->batteries) {
    contexts.push_back(context_of(b.battery, loaded->index));
    points.push_back(points_ascending(b.readings));
  }
  std::vector<analytics::WinterInput> inputs;
  inputs.reserve(contexts.size());
  for (std::size_t i = 0; i < contexts.size(); ++i) inputs.push_back({&contexts[i], points[i]});
  return analytics::winter_report(inputs, cold, now, settings);
}

storage::StoreResult<std::vector<analytics::SulfationAssessment>> build_sulfation_report(
    storage::Store& store, std::optional<storage::Id> depot, std::chrono::sys_seconds now,
    const analytics::AnalyticsSettings& settings) {
  auto loaded = load(store, depot, kTrendLookback);
  if (!loaded) return loaded.error();
  return analytics::sulfation_report(histories(*loaded), now, settings);
}

storage::StoreResult<std::vector<analytics::ReplacementForecast>> build_replacement_report(
    storage::Store& store, std::optional<storage::Id> depot, std::chrono::sys_seconds now,
    const analytics::AnalyticsSettings& settings) {
  auto loaded = load(store, depot, kTrendLookback);
  if (!loaded) return loaded.error();
  return analytics::replacement_report(histories(*loaded), now, settings);
}

storage::StoreResult<std::vector<analytics::DepotOverdue>> build_overdue_report(
    storage::Store& store, std::optional<storage::Id> depot, std::chrono::sys_seconds now,
    int days) {
  auto loaded = load(store, depot, 1);
  if (!loaded) return loaded.error();
  std::vector<analytics::BatteryContext> contexts;
  contexts.reserve(loaded->batteries.size());
  std::vector<analytics::LastSeen> fleet;
  for (const auto& b : loaded->batteries) contexts.push_back(context_of(b.battery, loaded->index));
  for (std::size_t i = 0; i < contexts.size(); ++i) {
    const auto& readings = loaded->batteries[i].readings;
    fleet.push_back({&contexts[i], readings.empty() ? std::nullopt
                                                    : std::optional(readings.front().taken_at)});
  }
  return analytics::overdue_report(fleet, now, days);
}

}  // namespace pbfleet::api
