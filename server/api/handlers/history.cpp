// GET /v1/batteries/{serial}/history?from=&to=: readings raw and derived,
// with the battery's events, oldest first.
#include "models/analytics/history_view.hpp"
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"
#include "server/api/json_text.hpp"
#include "server/api/reading_codec.hpp"
#include "server/api/services/history.hpp"

namespace pbfleet::api::handlers {

namespace wire = models::wire;
using nlohmann::json;
using Bound = std::optional<std::chrono::sys_seconds>;

namespace {

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
  auto loaded = load_history(store, battery.value(), from, to);
  if (!loaded) return store_problem(loaded.error());
  const auto& view = loaded->view;

  // The readings (hundreds, each with its derived values) are written as
  // text: building them as an nlohmann tree cost more than the query and
  // the analytics together. Battery and events are small.
  std::string body = "{\"battery\":" + dump(to_json(battery.value())) + ",\"readings\":";
  body.reserve(body.size() + kBytesPerRow * view.rows.size());
  JsonText out(body);
  out.begin_array();
  std::size_t row = 0;
  for (const auto& r : loaded->readings) {
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
