// Fuzz target 1: parse_temperature.
// Invariants: an accepted temperature is finite, within the physical band the
// parser documents, and keeps the unit letter it was given; writing it back
// in that unit and parsing again gives the same value within 1e-9 C; every
// refusal names the field and is valid UTF-8.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include "models/wire/reading.hpp"
#include "models/wire/text.hpp"
#include "tests/fuzz/fuzz_check.hpp"

using namespace pbfleet::models;
using namespace pbfleet::models::wire;

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view input(reinterpret_cast<const char*>(data), size);
  const auto t = parse_temperature(input, "electrolyte_temp");
  if (!t) {
    pbfleet::fuzz::check_error(t.error(), false);
    FUZZ_CHECK(t.error().field == "electrolyte_temp");
    return 0;
  }
  const double c = t->value.value;
  FUZZ_CHECK(std::isfinite(c));
  FUZZ_CHECK(c >= -kCelsiusToKelvinOffset && c <= 1000.0);
  const std::string_view trimmed = text::trim(input);
  const char last = trimmed.empty() ? ' ' : trimmed.back();
  FUZZ_CHECK((t->unit == TempUnit::f) == (last == 'F' || last == 'f'));
  const std::string again = t->unit == TempUnit::f
                                ? text::format_shortest(fahrenheit_from_celsius(t->value)) + "F"
                                : text::format_shortest(c) + "C";
  const auto back = parse_temperature(again, "electrolyte_temp");
  FUZZ_CHECK(back.ok());
  FUZZ_CHECK(back->unit == t->unit);
  FUZZ_CHECK(std::abs(back->value.value - c) <= 1e-9);
  return 0;
}
