#include "server/api/codecs.hpp"

#include <charconv>
#include <chrono>
#include <optional>

#include "models/wire/reading.hpp"

namespace pbfleet::api {

using nlohmann::json;
namespace st = storage;

namespace {

constexpr std::size_t kMaxNameLength = 100;
constexpr std::size_t kMaxSerialLength = 64;
constexpr std::int64_t kMaxId = INT64_MAX;

template <class T>
json optional_json(const std::optional<T>& v) {
  return v ? json(*v) : json(nullptr);
}

}  // namespace

json to_json(const st::Depot& d) {
  return {{"id", d.id}, {"name", d.name}, {"time_zone", d.time_zone},
          {"design_low_c", d.design_low_c.value}};
}

json to_json(const st::Vehicle& v) {
  return {{"id", v.id},
          {"code", v.code},
          {"depot_id", v.depot_id},
          {"engine", st::to_string(v.engine)},
          {"displacement_l", optional_json(v.displacement_l)},
          {"required_cca_a", v.required_cca_a ? json(v.required_cca_a->value) : json(nullptr)}};
}

json to_json(const st::Battery& b) {
  return {
      {"id", b.id},
      {"serial", b.serial},
      {"chemistry", models::to_string(b.chemistry)},
      {"nominal_v", b.nominal_v.value},
      {"cells", b.cells},
      {"rated_cca_a", b.rated_cca_a.value},
      {"reserve_capacity_min", optional_json(b.reserve_capacity_min)},
      {"capacity_ah", optional_json(b.capacity_ah)},
      {"full_charge_sg", b.full_charge_sg ? json(b.full_charge_sg->value) : json(nullptr)},
      {"installed_on", format_date(b.installed_on)},
      {"vehicle_id", optional_json(b.vehicle_id)},
      {"depot_id", optional_json(b.depot_id)},
      {"status", st::to_string(b.status)},
      {"retired_at",
       b.retired_at ? json(models::wire::format_timestamp(*b.retired_at)) : json(nullptr)},
      {"retire_reason", b.retire_reason.empty() ? json(nullptr) : json(b.retire_reason)},
  };
}

json to_json(const st::BatteryEvent& e) {
  return {{"at", models::wire::format_timestamp(e.at)},
          {"kind", st::to_string(e.kind)},
          {"vehicle_id", optional_json(e.vehicle_id)},
          {"detail", e.detail}};
}

json to_json(const st::ApiToken& t) {
  return {{"id", t.id},
          {"name", t.name},
          {"role", st::to_string(t.role)},
          {"depot_id", optional_json(t.depot_id)},
          {"created_at", models::wire::format_timestamp(t.created_at)},
          {"revoked_at",
           t.revoked_at ? json(models::wire::format_timestamp(*t.revoked_at)) : json(nullptr)},
          {"expires_at",
           t.expires_at ? json(models::wire::format_timestamp(*t.expires_at)) : json(nullptr)}};
}

void read_depot(FieldReader& in, st::Depot& into, bool creating) {
  if (auto v = in.text("name", creating, kMaxNameLength)) into.name = *v;
  if (auto v = in.text("time_zone", false, 64)) into.time_zone = *v;
  if (creating && into.time_zone.empty()) into.time_zone = "UTC";
  // Design lows: the coldest inhabited places stay above -60 C; a design
  // low above +20 C would not be a winter.
  if (auto v = in.number("design_low_c", creating, models::wire::kMinTempC, 20.0, "-60 to 20"))
    into.design_low_c = models::Celsius{*v};
  in.finish();
}

void read_vehicle(FieldReader& in, st::Vehicle& into, bool creating) {
  if (auto v = in.text("code", creating, kMaxNameLength)) into.code = *v;
  if (auto v = in.integer("depot_id", creating, 1, kMaxId)) into.depot_id = *v;
  if (auto v = in.choice("engine", creating, {"gasoline", "diesel"}))
    into.engine = *st::parse_engine(*v);
  // Road-vehicle engines run from under 1 l to about 16 l (heavy trucks);
  // 30 l leaves room for plant machinery.
  if (in.is_null("displacement_l")) into.displacement_l.reset();
  if (auto v = in.number("displacement_l", false, 0.1, 30.0, "0.1 to 30 litres"))
    into.displacement_l = *v;
  if (in.is_null("required_cca_a")) into.required_cca_a.reset();
  if (auto v = in.number("required_cca_a", false, 50.0, 3000.0, "50 to 3000 A"))
    into.required_cca_a = models::Amperes{*v};
  in.finish();
}

namespace {

void read_battery_type(FieldReader& in, st::Battery& into, bool creating) {
  if (auto v = in.choice("chemistry", creating, {"flooded", "efb", "agm", "gel"}))
    into.chemistry = *models::parse_chemistry(*v);
  const bool had_nominal = in.has("nominal_v");
  if (auto v = in.number("nominal_v", creating, 2.0, 48.0, "2 to 48 V (a whole number of 2 V cells)")) {
    into.nominal_v = models::Volts{*v};
    auto cells = models::cells_for_nominal_voltage(into.nominal_v);
    if (!cells) {
      in.invalid("nominal_v", cells.error().detail, cells.error().allowed);
    } else if (!in.has("cells")) {
      into.cells = *cells;
    }
  }
  if (auto v = in.integer("cells", false, 1, models::wire::kMaxCells)) {
    into.cells = static_cast<int>(*v);
    if (had_nominal && std::abs(into.cells * 2.0 - into.nominal_v.value) > 0.01)
      in.invalid("cells", "does not match nominal_v (2 V per cell)", "nominal_v / 2");
  }
}

void read_battery_ratings(FieldReader& in, st::Battery& into) {
  // SAE J537 ratings of starting batteries run to about 1500 A; 3000 A
  // leaves room for paralleled heavy-duty packs.
  if (auto v = in.number("rated_cca_a", false, 0.0, 3000.0, "0 to 3000 A (0 = unknown)"))
    into.rated_cca_a = models::Amperes{*v};
  if (in.is_null("reserve_capacity_min")) into.reserve_capacity_min.reset();
  if (auto v = in.number("reserve_capacity_min", false, 1.0, 1000.0, "1 to 1000 minutes"))
    into.reserve_capacity_min = *v;
  if (in.is_null("capacity_ah")) into.capacity_ah.reset();
  if (auto v = in.number("capacity_ah", false, 1.0, 5000.0, "1 to 5000 Ah")) into.capacity_ah = *v;
  // Full-charge SG runs from about 1.210 (tropical) to 1.330 (very cold
  // climates), common practice; the range leaves a little room either side.
  if (in.is_null("full_charge_sg")) into.full_charge_sg.reset();
  if (auto v = in.number("full_charge_sg", false, 1.200, 1.340, "1.200 to 1.340"))
    into.full_charge_sg = models::SpecificGravity{*v};
  if (auto v = in.date("installed_on", false)) into.installed_on = *v;
}

}  // namespace

namespace {

// The wire library's serial rule (no '/', '\\', "..", control characters or
// edge spaces), so a battery can only be registered under a serial its
// readings can name. validate_reading is where the rule lives; only its
// "serial" finding is used here.
std::optional<models::FieldError> serial_problem(const std::string& serial) {
  models::wire::ReadingInput probe;
  probe.serial = serial;
  probe.taken_at = std::chrono::sys_days{std::chrono::year{2020} / 1 / 1};
  probe.ocv = models::Volts{12.0};
  for (auto& e : models::wire::validate_reading(probe, probe.taken_at))
    if (e.field == "serial") return e;
  return std::nullopt;
}

}  // namespace

void read_battery(FieldReader& in, st::Battery& into, bool creating) {
  if (creating) {
    if (auto v = in.text("serial", true, kMaxSerialLength)) {
      into.serial = *v;
      if (auto problem = serial_problem(*v)) in.invalid("serial", problem->detail, problem->allowed);
    }
    if (auto v = in.integer("vehicle_id", false, 1, kMaxId)) into.vehicle_id = *v;
  }
  read_battery_type(in, into, creating);
  read_battery_ratings(in, into);
  in.finish();
}

http::Response store_problem(const st::StoreError& e) {
  std::vector<ProblemField> fields;
  if (!e.field.empty()) fields.push_back({"/" + e.field, e.detail, {}, std::nullopt});
  switch (e.code) {
    case st::StoreErrc::not_found: return problem(ProblemKind::not_found, e.detail);
    case st::StoreErrc::conflict: return problem(ProblemKind::conflict, e.detail, fields);
    case st::StoreErrc::constraint:
      return problem(ProblemKind::validation_failed, e.detail, fields);
    case st::StoreErrc::invalid: return problem(ProblemKind::bad_query, e.detail, fields);
    case st::StoreErrc::unavailable:
      return problem(ProblemKind::storage_unavailable, "database unavailable; retry later");
    case st::StoreErrc::disk_full:
      return problem(ProblemKind::storage_full, "database disk is full; nothing was stored");
    case st::StoreErrc::internal: break;
  }
  return problem(ProblemKind::internal, "internal storage error; see the server log");
}

st::PageRequest page_request(const std::string* limit, const std::string* cursor, Issues& issues) {
  st::PageRequest page;
  if (limit) {
    std::size_t n = 0;
    auto r = std::from_chars(limit->data(), limit->data() + limit->size(), n);
    if (r.ec != std::errc{} || r.ptr != limit->data() + limit->size() || n < 1 ||
        n > st::kMaxPageLimit) {
      issues.invalid.push_back({"limit", "not a page size: '" + limit->substr(0, 20) + "'",
                                "1 to " + std::to_string(st::kMaxPageLimit), std::nullopt});
    } else {
      page.limit = n;
    }
  }
  if (cursor) page.cursor = *cursor;
  return page;
}

}  // namespace pbfleet::api
