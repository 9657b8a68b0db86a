// Fuzz target 3: the path a JSON reading takes after decoding: field values
// through parse_timestamp and the number and temperature readers, then
// validate_reading. JSON decoding itself lives in the server (nlohmann/json),
// so the input here is one "name=value" per line using the API's field names:
//
//   taken_at=2026-11-30T07:15:00+01:00
//   cells=6
//   ocv_v=12.62
//   cell_sg=1.265,1.260,1.270
//   electrolyte_temp_f=41
//   serial=NB-2023-0001
//
// Invariants: an accepted timestamp is written back in UTC and reads back to
// the same instant; validation errors name a known field with its allowed
// range in valid UTF-8; a reading that validates survives CSV export and
// import unchanged and still validates.
#include <chrono>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include "models/wire/csv.hpp"
#include "models/wire/reading.hpp"
#include "models/wire/text.hpp"
#include "tests/fuzz/fuzz_check.hpp"

using namespace std::chrono;
using namespace pbfleet::models;
using namespace pbfleet::models::wire;

namespace {

const sys_seconds kNow = sys_days{year{2026} / 11 / 30} + hours{12};

void check_timestamp(std::string_view value) {
  const auto t = parse_timestamp(value, "taken_at");
  if (!t) return pbfleet::fuzz::check_error(t.error(), false);
  const std::string utc = format_timestamp(*t);
  const auto back = parse_timestamp(utc, "taken_at");
  FUZZ_CHECK(back.ok());
  FUZZ_CHECK(*back == *t);
}

std::optional<double> number(std::string_view v) { return text::parse_decimal(v); }

std::optional<EnteredTemperature> temperature(std::string_view v, TempUnit unit) {
  const auto n = number(v);
  if (!n) return std::nullopt;
  return unit == TempUnit::f ? EnteredTemperature{celsius_from_fahrenheit(*n), TempUnit::f}
                             : EnteredTemperature{Celsius{*n}, TempUnit::c};
}

void set_sg(ReadingInput& r, std::string_view list) {
  while (!list.empty() && r.cell_sg.size() < 64) {
    const auto cut = list.find(',');
    if (const auto v = number(list.substr(0, cut))) r.cell_sg.push_back(SpecificGravity{*v});
    if (cut == std::string_view::npos) break;
    list.remove_prefix(cut + 1);
  }
}

// One "name=value" line applied to the reading, as the JSON decoder would.
void apply(ReadingInput& r, int& cells, std::string_view name, std::string_view v) {
  if (name == "taken_at") {
    check_timestamp(v);
    if (const auto t = parse_timestamp(v, "taken_at")) r.taken_at = *t;
  } else if (name == "cells") {
    if (const auto n = number(v); n && *n >= 0 && *n <= 48) cells = static_cast<int>(*n);
  } else if (name == "ocv_v") {
    if (const auto n = number(v)) r.ocv = Volts{*n};
  } else if (name == "cell_sg") {
    set_sg(r, v);
  } else if (name == "electrolyte_temp_c" || name == "electrolyte_temp_f") {
    r.electrolyte = temperature(v, name.back() == 'f' ? TempUnit::f : TempUnit::c);
  } else if (name == "ambient_temp_c" || name == "ambient_temp_f") {
    r.ambient = temperature(v, name.back() == 'f' ? TempUnit::f : TempUnit::c);
  } else if (name == "rest_h") {
    if (const auto n = number(v)) r.rest = Hours{*n};
  } else if (name == "load_test_a") {
    if (const auto n = number(v)) r.load_test_current = Amperes{*n};
  } else if (name == "load_test_end_v") {
    if (const auto n = number(v)) r.load_test_end = Volts{*n};
  } else if (name == "reading_id") {
    r.reading_id = v;
  } else if (name == "serial") {
    r.serial = v;
  } else if (name == "logged_by") {
    r.logged_by = v;
  } else if (name == "source") {
    r.source = v;
  } else if (name == "note") {
    r.note = v;
  } else if (name == "after_charge") {
    r.after_charge = v == "true";
  } else if (name == "water_added") {
    r.water_added = v == "true";
  }
}

bool known_field(std::string_view f) {
  static constexpr std::string_view kFields[] = {
      "reading_id", "serial", "taken_at", "ocv_v", "cell_sg", "electrolyte_temp_c",
      "electrolyte_temp_f", "ambient_temp_c", "ambient_temp_f", "rest_h", "load_test_a",
      "load_test_end_v", "logged_by", "source", "note"};
  for (const auto k : kFields) {
    if (f == k) return true;
  }
  if (!f.starts_with("cell_sg/")) return false;
  const auto index = f.substr(8);
  return !index.empty() && index.find_first_not_of("0123456789") == std::string_view::npos;
}

void check_valid_round_trip(const ReadingInput& r, int cells) {
  const auto parsed = parse_reading_csv(format_reading_csv({r}));
  FUZZ_CHECK(parsed.ok());
  FUZZ_CHECK(parsed->errors.empty());
  FUZZ_CHECK(parsed->readings.size() == 1);
  const ReadingInput& b = parsed->readings[0];
  FUZZ_CHECK(b.serial == r.serial && b.reading_id == r.reading_id && b.taken_at == r.taken_at);
  FUZZ_CHECK(b.ocv == r.ocv && b.cell_sg == r.cell_sg && b.rest == r.rest);
  FUZZ_CHECK(b.note == r.note && b.logged_by == r.logged_by && b.source == r.source);
  FUZZ_CHECK(b.electrolyte.has_value() == r.electrolyte.has_value());
  if (r.electrolyte) FUZZ_CHECK(b.electrolyte->value == r.electrolyte->value);
  FUZZ_CHECK(validate_reading(b, kNow, cells).empty());
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  std::string_view input(reinterpret_cast<const char*>(data), size);
  ReadingInput r;
  int cells = 0;
  while (!input.empty()) {
    const auto end = input.find('\n');
    const std::string_view line = input.substr(0, end);
    const auto eq = line.find('=');
    if (eq != std::string_view::npos) apply(r, cells, line.substr(0, eq), line.substr(eq + 1));
    if (end == std::string_view::npos) break;
    input.remove_prefix(end + 1);
  }
  const auto errors = validate_reading(r, kNow, cells);
  for (const auto& e : errors) {
    pbfleet::fuzz::check_error(e, false);
    FUZZ_CHECK(known_field(e.field));
  }
  if (errors.empty()) check_valid_round_trip(r, cells);
  return 0;
}
