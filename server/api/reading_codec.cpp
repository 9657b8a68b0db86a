#include "server/api/reading_codec.hpp"

#include <limits>

#include "models/wire/precision.hpp"

namespace pbfleet::api {

using nlohmann::json;
namespace wire = models::wire;

namespace {

constexpr double kAny = std::numeric_limits<double>::max();  // ranges: validate_reading

std::optional<double> any_number(FieldReader& in, std::string_view key) {
  return in.number(key, false, -kAny, kAny, "a number");
}

// "<base>_c" or "<base>_f", not both.
std::optional<wire::EnteredTemperature> read_temperature(FieldReader& in, const std::string& base) {
  auto c = any_number(in, base + "_c");
  auto f = any_number(in, base + "_f");
  if (c && f) {
    in.invalid(base + "_f", "give the temperature once", base + "_c or " + base + "_f");
    return std::nullopt;
  }
  if (c) return entered_temperature(*c, wire::TempUnit::c);
  if (f) return entered_temperature(*f, wire::TempUnit::f);
  return std::nullopt;
}

void read_cells(FieldReader& in, wire::ReadingInput& r) {
  const json* cells = in.raw("cell_sg", false);
  if (!cells) return;
  if (!cells->is_array()) {
    in.invalid("cell_sg", "expected an array of numbers", "one SG per cell, e.g. [1.265, 1.260]");
    return;
  }
  for (std::size_t i = 0; i < cells->size(); ++i) {
    const json& v = (*cells)[i];
    if (!v.is_number()) {
      in.invalid_item("cell_sg", i, "expected a number", "1.000 to 1.400");
      continue;
    }
    r.cell_sg.push_back(models::SpecificGravity{v.get<double>()});
  }
}

void read_times(FieldReader& in, wire::ReadingInput& r) {
  if (auto t = in.text("taken_at", true, kTimestampTextCap)) {
    auto parsed = wire::parse_timestamp(*t, "taken_at");
    if (parsed) {
      r.taken_at = *parsed;
    } else {
      in.invalid("taken_at", parsed.error().detail, parsed.error().allowed);
    }
  }
}

}  // namespace

wire::EnteredTemperature entered_temperature(double value, wire::TempUnit unit) {
  const models::Celsius c =
      unit == wire::TempUnit::f ? models::celsius_from_fahrenheit(value) : models::Celsius{value};
  return wire::EnteredTemperature{c, unit};
}

wire::ReadingInput read_reading(FieldReader& in) {
  wire::ReadingInput r;
  // Strings are length-checked by validate_reading (kReadingTextCap only
  // keeps absurd inputs out of memory).
  if (auto v = in.text("reading_id", false, kReadingTextCap)) r.reading_id = *v;
  if (auto v = in.text("serial", true, kReadingTextCap)) r.serial = *v;
  read_times(in, r);
  if (auto v = any_number(in, "ocv_v")) r.ocv = models::Volts{*v};
  read_cells(in, r);
  r.electrolyte = read_temperature(in, "electrolyte_temp");
  r.ambient = read_temperature(in, "ambient_temp");
  if (auto v = any_number(in, "rest_h")) r.rest = models::Hours{*v};
  if (auto v = any_number(in, "load_test_a")) r.load_test_current = models::Amperes{*v};
  if (auto v = any_number(in, "load_test_end_v")) r.load_test_end = models::Volts{*v};
  if (auto v = in.text("logged_by", false, kReadingTextCap)) r.logged_by = *v;
  if (auto v = in.text("source", false, kReadingTextCap)) r.source = *v;
  if (auto v = in.text("note", false, kReadingTextCap)) r.note = *v;
  if (auto v = in.boolean("after_charge", false)) r.after_charge = *v;
  if (auto v = in.boolean("water_added", false)) r.water_added = *v;
  in.finish();
  return r;
}

namespace {

template <class Q>
std::optional<double> raw_value(const std::optional<Q>& q) {
  return q ? std::optional<double>(q->value) : std::nullopt;
}

std::optional<double> temperature_c(const std::optional<wire::EnteredTemperature>& t) {
  return t ? std::optional<double>(t->value.value) : std::nullopt;
}

std::optional<std::string_view> unit_text(const std::optional<wire::EnteredTemperature>& t) {
  if (!t) return std::nullopt;
  return t->unit == wire::TempUnit::f ? "F" : "C";
}

}  // namespace

void write_reading_members(JsonText& out, const wire::ReadingInput& r) {
  out.member("reading_id", r.reading_id)
      .member("serial", r.serial)
      .member("taken_at", wire::timestamp_text(r.taken_at).view())
      .member("ocv_v", raw_value(r.ocv))
      .key("cell_sg")
      .begin_array();
  for (const auto& sg : r.cell_sg) out.value(sg.value);
  out.end_array()
      .member("electrolyte_temp_c", temperature_c(r.electrolyte))
      .member("electrolyte_temp_unit", unit_text(r.electrolyte))
      .member("ambient_temp_c", temperature_c(r.ambient))
      .member("ambient_temp_unit", unit_text(r.ambient))
      .member("rest_h", raw_value(r.rest))
      .member("load_test_a", raw_value(r.load_test_current))
      .member("load_test_end_v", raw_value(r.load_test_end))
      .member("logged_by", r.logged_by)
      .member("source", r.source)
      .member("note", r.note)
      .member("after_charge", r.after_charge)
      .member("water_added", r.water_added);
}

void write_reading_members(JsonText& out, const storage::StoredReading& r) {
  write_reading_members(out, static_cast<const wire::ReadingInput&>(r));
  out.member("received_at", wire::timestamp_text(r.received_at).view());
}

void write_derived(JsonText& out, const analytics::DerivedReading& d) {
  using wire::kDerivedDecimals;
  using wire::kSgDecimals;
  using wire::kVoltDecimals;
  using wire::rounded;
  out.begin_object()
      .member("electrolyte_c", rounded(d.electrolyte_c, kDerivedDecimals))
      .member("corrected_sg", rounded(d.corrected_sg, kSgDecimals))
      .key("corrected_cell_sg")
      .begin_array();
  for (const double sg : d.corrected_cell_sg) out.value(rounded(sg, kSgDecimals));
  out.end_array()
      .member("soc_from_sg_percent", rounded(d.soc_from_sg_percent, kDerivedDecimals))
      .member("soc_from_ocv_percent", rounded(d.soc_from_ocv_percent, kDerivedDecimals))
      .member("ocv_settled", d.ocv_settled)
      .member("soc_percent", rounded(d.soc_percent, kDerivedDecimals))
      .member("soc_uncertainty_percent", rounded(d.soc_uncertainty_percent, kDerivedDecimals))
      .member("sg_equivalent", rounded(d.sg_equivalent, kSgDecimals))
      .member("freezing_point_c", rounded(d.freezing_point_c, kDerivedDecimals))
      .member("cell_spread", rounded(d.cell_spread, kSgDecimals))
      .member("weak_cell", d.weak_cell)
      .member("load_test_min_v", rounded(d.load_test_min_v, kVoltDecimals))
      .member("trusted", d.trusted)
      .key("flags")
      .begin_array();
  for (auto word : d.flags.words()) out.value(word);
  out.end_array().end_object();
}

}  // namespace pbfleet::api
