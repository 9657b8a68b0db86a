// GET /v1/batteries/{serial}/history?from=&to=: readings raw and derived,
// with the battery's events, oldest first.
#include "models/analytics/history_view.hpp"
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"
#include "server/api/reading_codec.hpp"
#include "server/api/services/fleet_index.hpp"

namespace pbfleet::api::handlers {

namespace wire = models::wire;
using nlohmann::json;
using Bound = std::optional<std::chrono::sys_seconds>;

namespace {

analytics::EventKind event_kind(storage::EventKind kind) {
  return kind == storage::EventKind::retired ? analytics::EventKind::retired
                                             : analytics::EventKind::fitted;
}

// ?from= and ?to= (RFC 3339), either optional.
bool read_bounds(const Call& call, Bound& from, Bound& to, std::vector<ProblemField>& errors) {
  for (auto [key, bound] : {std::pair{"from", &from}, std::pair{"to", &to}}) {
    const auto* text = call.query(key);
    if (!text) continue;
    auto t = wire::parse_timestamp(*text, key);
    if (t) {
      *bound = *t;
    } else {
      errors.push_back({key, t.error().detail, t.error().allowed, {}});
    }
  }
  return errors.empty();
}

json events_json(const std::vector<analytics::BatteryEvent>& events) {
  json list = json::array();
  for (const auto& e : events)
    list.push_back({{"at", wire::format_timestamp(e.at)},
                    {"kind", analytics::to_string(e.kind)},
                    {"detail", e.detail}});
  return list;
}

}  // namespace

http::Response battery_history(const Call& call) {
  Bound from, to;
  std::vector<ProblemField> errors;
  if (!read_bounds(call, from, to, errors)) return problem(ProblemKind::bad_query, "bad range", errors);
  auto& store = call.ctx.store;
  auto battery = store.get_battery(call.param("serial"));
  if (!battery) return store_problem(battery.error());
  if (!in_scope(call, battery->depot_id))
    return problem(ProblemKind::not_found, "no battery with serial '" + call.param("serial") + "'");
  // All readings up to `to`: derived values carry state (the water hold)
  // from before `from`.
  auto readings = store.readings_for(battery->serial, std::nullopt, to);
  auto events = store.battery_events(battery->serial);
  auto context = context_for(store, battery.value());
  if (!readings) return store_problem(readings.error());
  if (!events) return store_problem(events.error());
  if (!context) return store_problem(context.error());

  analytics::BatteryHistory history{context.value(), {}, {}};
  for (const auto& r : *readings) history.readings.push_back(point_of(r));
  for (const auto& e : *events) history.events.push_back({e.at, event_kind(e.kind), e.detail});
  const auto view = analytics::history_view(history, analytics::AnalyticsSettings{}, from, to);

  json rows = json::array();
  std::size_t row = 0;
  for (const auto& r : *readings) {
    if ((from && r.taken_at < *from) || (to && r.taken_at > *to)) continue;
    json item = reading_json(r);
    if (row < view.rows.size()) item["derived"] = derived_json(view.rows[row++].derived);
    rows.push_back(std::move(item));
  }
  return json_response(200, {{"battery", to_json(battery.value())},
                             {"readings", std::move(rows)},
                             {"events", events_json(view.events)}});
}

}  // namespace pbfleet::api::handlers
