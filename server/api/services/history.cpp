#include "server/api/services/history.hpp"

#include "server/api/services/analytics_adapter.hpp"
#include "server/api/services/fleet_index.hpp"

namespace pbfleet::api {
namespace {

analytics::EventKind event_kind(storage::EventKind kind) {
  return kind == storage::EventKind::retired ? analytics::EventKind::retired
                                             : analytics::EventKind::fitted;
}

}  // namespace

storage::StoreResult<LoadedHistory> load_history(storage::Store& store,
                                                 const storage::Battery& battery,
                                                 std::optional<std::chrono::sys_seconds> from,
                                                 std::optional<std::chrono::sys_seconds> to) {
  auto readings = store.readings_for(battery.serial, std::nullopt, to);
  if (!readings) return readings.error();
  auto events = store.battery_events(battery.serial);
  if (!events) return events.error();
  auto context = context_for(store, battery);
  if (!context) return context.error();

  analytics::BatteryHistory history{context.value(), {}, {}};
  history.readings.reserve(readings->size());
  for (const auto& r : *readings) history.readings.push_back(point_of(r));
  for (const auto& e : *events) history.events.push_back({e.at, event_kind(e.kind), e.detail});
  LoadedHistory out;
  out.view = analytics::history_view(history, analytics::AnalyticsSettings{}, from, to);
  out.context = std::move(context.value());
  out.readings.reserve(out.view.rows.size());
  for (auto& r : readings.value())
    if (!(from && r.taken_at < *from) && !(to && r.taken_at > *to)) out.readings.push_back(std::move(r));
  return out;
}

}  // namespace pbfleet::api
