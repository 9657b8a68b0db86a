// GET /v1/batteries/{serial}/history?from=&to=: readings raw and derived,
// with the battery's events, oldest first.
#include "models/analytics/history_view.hpp"
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"
#include "server/api/json_text.hpp"
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

// About this many bytes per reading with its derived values (~860 for a
// six-cell reading).
constexpr std::size_t kBytesPerRow = 1024;

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

  // The readings (hundreds, each with its derived values) are written as
  // text: building them as an nlohmann tree cost more than the query and
  // the analytics together. Battery and events are small.
  std::string body = "{\"battery\":" + dump(to_json(battery.value())) + ",\"readings\":";
  body.reserve(body.size() + kBytesPerRow * view.rows.size());
  JsonText out(body);
  out.begin_array();
  std::size_t row = 0;
  for (const auto& r : *readings) {
    if ((from && r.taken_at < *from) || (to && r.taken_at > *to)) continue;
    out.begin_object();
    write_reading_members(out, r);
    if (row < view.rows.size()) write_derived(out.key("derived"), view.rows[row++].derived);
    out.end_object();
  }
  out.end_array();
  body += ",\"events\":" + dump(events_json(view.events)) + "}";
  return json_text_response(200, std::move(body));
}

}  // namespace pbfleet::api::handlers
