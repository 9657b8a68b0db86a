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

// The history as JSON text. The readings (hundreds, each with its derived
// values) are written as text: building them as an nlohmann tree cost more
// than the query and the analytics together. Battery and events are small.
// Everything is read afresh here, after the version the answer is kept
// under, so a kept answer is never older than its version.
storage::StoreResult<std::string> render_history(const Call& call, Bound from, Bound to) {
  auto found = call.ctx.store.get_battery(call.param("serial"));
  if (!found) return found.error();
  const storage::Battery& battery = found.value();
  auto loaded = load_history(call.ctx.store, battery, from, to);
  if (!loaded) return loaded.error();
  const auto& view = loaded->view;
  std::string body = "{\"battery\":" + dump(to_json(battery)) + ",\"readings\":";
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
  return body;
}

// The cache key of one history answer: serial, range as asked, and the
// fleet change count (the summary revision is the entry's version).
std::string history_key(const Call& call, std::int64_t fleet_changes) {
  std::string key = "history|" + call.param("serial");
  for (const char* bound : {"from", "to"}) {
    const auto* text = call.query(bound);
    key += std::string("|") + bound + "=" + (text ? *text : std::string());
  }
  return key + "|fleet=" + std::to_string(fleet_changes);
}

}  // namespace

// Asked again with nothing stored for the battery and no fleet change in
// between, the answer is the rendered text kept from the last time
// (ctx.histories), and If-None-Match with its ETag gets 304.
http::Response battery_history(const Call& call) {
  Bound from, to;
  std::vector<ProblemField> errors;
  if (!read_bounds(call, from, to, errors)) return problem(ProblemKind::bad_query, "bad range", errors);
  auto& store = call.ctx.store;
  auto battery = store.get_battery(call.param("serial"));
  if (!battery) return store_problem(battery.error());
  if (!in_scope(call, battery->depot_id))
    return problem(ProblemKind::not_found, "no battery with serial '" + call.param("serial") + "'");
  auto version = store.battery_version(battery->id);
  if (!version) return store_problem(version.error());
  const std::string key = history_key(call, version->fleet_changes);
  const std::vector<std::pair<std::string, std::string>> validators{
      {"ETag", strong_etag(key, version->revision)}, {"Cache-Control", "private, no-cache"}};
  if (auto unchanged = not_modified(call, validators[0].second, "application/json", validators))
    return std::move(*unchanged);
  auto body = call.ctx.histories.get<std::string>(key, version->revision, call.ctx.clock.now(),
                                                  [&] { return render_history(call, from, to); });
  if (!body) return store_problem(body.error());
  http::Response r;
  r.content_type = "application/json";
  r.shared_body = *body;  // the kept text itself, not a copy
  r.headers = validators;
  return r;
}

}  // namespace pbfleet::api::handlers
