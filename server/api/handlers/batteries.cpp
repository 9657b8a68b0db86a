// /v1/batteries: register, list (?depot_id=&status=&chemistry=), get,
// update ratings, fit to a vehicle, retire.
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"

namespace pbfleet::api::handlers {

namespace {

std::variant<storage::Battery, http::Response> decode_battery(const Call& call, storage::Battery into,
                                                      bool creating) {
  return decode_object<storage::Battery>(
      call, std::move(into),
      [creating](FieldReader& in, storage::Battery& b) { read_battery(in, b, creating); });
}

http::Response no_battery(const std::string& serial) {
  return problem(ProblemKind::not_found, "no battery with serial '" + serial.substr(0, 64) + "'");
}

// The battery when it exists and the caller may see it; else the 404.
std::variant<storage::Battery, http::Response> visible_battery(const Call& call) {
  auto battery = call.ctx.store.get_battery(call.param("serial"));
  if (!battery) return store_problem(battery.error());
  if (!in_scope(call, battery->depot_id)) return no_battery(call.param("serial"));
  return battery.value();
}

storage::BatteryFilter filter_from(const Call& call, Issues& issues) {
  storage::BatteryFilter filter;
  if (const auto* depot = call.query("depot_id")) {
    filter.depot_id = parse_id(*depot);
    if (!filter.depot_id)
      issues.invalid.push_back({"depot_id", "not a depot id", "a positive whole number", {}});
  }
  if (const auto* status = call.query("status")) {
    filter.status = storage::parse_battery_status(*status);
    if (!filter.status)
      issues.invalid.push_back({"status", "unknown status", "in_service or retired", {}});
  }
  if (const auto* chemistry = call.query("chemistry")) {
    filter.chemistry = models::parse_chemistry(*chemistry);
    if (!filter.chemistry)
      issues.invalid.push_back({"chemistry", "unknown chemistry", "flooded, efb, agm or gel", {}});
  }
  return filter;
}

}  // namespace

http::Response list_batteries(const Call& call) {
  Issues issues;
  auto page = page_request(call.query("limit"), call.query("cursor"), issues);
  auto filter = filter_from(call, issues);
  if (!issues.empty()) return problem(ProblemKind::bad_query, "bad query", issues.invalid);
  if (call.caller && call.caller->depot_id) {
    if (filter.depot_id && filter.depot_id != call.caller->depot_id)
      return json_response(200, {{"items", nlohmann::json::array()}, {"next_cursor", nullptr}});
    filter.depot_id = call.caller->depot_id;
  }
  return render_page(call.ctx.store.list_batteries(filter, page));
}

http::Response create_battery(const Call& call) {
  storage::Battery fresh;
  fresh.installed_on = std::chrono::floor<std::chrono::days>(call.ctx.clock.now());
  auto battery = decode_battery(call, fresh, true);
  if (auto* refused = std::get_if<http::Response>(&battery)) return std::move(*refused);
  auto& b = std::get<storage::Battery>(battery);
  if (b.vehicle_id && call.caller && call.caller->depot_id) {
    auto vehicle = call.ctx.store.get_vehicle(*b.vehicle_id);
    if (!vehicle || !in_scope(call, vehicle->depot_id))
      return problem(ProblemKind::validation_failed, "no such vehicle",
                     {{"/vehicle_id", "no vehicle with this id", {}, {}}});
  }
  return render(call.ctx.store.create_battery(b, call.ctx.clock.now()), 201);
}

http::Response get_battery(const Call& call) {
  auto battery = visible_battery(call);
  if (auto* refused = std::get_if<http::Response>(&battery)) return std::move(*refused);
  return json_response(200, to_json(std::get<storage::Battery>(battery)));
}

http::Response patch_battery(const Call& call) {
  auto current = visible_battery(call);
  if (auto* refused = std::get_if<http::Response>(&current)) return std::move(*refused);
  auto battery = decode_battery(call, std::get<storage::Battery>(current), false);
  if (auto* refused = std::get_if<http::Response>(&battery)) return std::move(*refused);
  return render(call.ctx.store.update_battery(std::get<storage::Battery>(battery)));
}

http::Response fit_battery(const Call& call) {
  auto current = visible_battery(call);
  if (auto* refused = std::get_if<http::Response>(&current)) return std::move(*refused);
  auto vehicle_id = decode_object<storage::Id>(call, 0, [](FieldReader& in, storage::Id& id) {
    if (auto v = in.integer("vehicle_id", true, 1, INT64_MAX)) id = *v;
    in.finish();
  });
  if (auto* refused = std::get_if<http::Response>(&vehicle_id)) return std::move(*refused);
  const storage::Id id = std::get<storage::Id>(vehicle_id);
  if (call.caller && call.caller->depot_id) {
    auto vehicle = call.ctx.store.get_vehicle(id);
    if (!vehicle || !in_scope(call, vehicle->depot_id))
      return problem(ProblemKind::validation_failed, "no such vehicle",
                     {{"/vehicle_id", "no vehicle with this id", {}, {}}});
  }
  return render(call.ctx.store.fit_battery(call.param("serial"), id, call.ctx.clock.now()));
}

http::Response retire_battery(const Call& call) {
  auto current = visible_battery(call);
  if (auto* refused = std::get_if<http::Response>(&current)) return std::move(*refused);
  auto reason = decode_object<std::string>(call, {}, [](FieldReader& in, std::string& text) {
    if (auto v = in.text("reason", true, 200)) text = *v;
    in.finish();
  });
  if (auto* refused = std::get_if<http::Response>(&reason)) return std::move(*refused);
  return render(call.ctx.store.retire_battery(call.param("serial"), std::get<std::string>(reason),
                                              call.ctx.clock.now()));
}

}  // namespace pbfleet::api::handlers
