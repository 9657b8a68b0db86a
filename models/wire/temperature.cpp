// parse_temperature: "41F", "5C", "5 °C", "-25c", "5" (bare = Celsius).
#include <string>
#include <string_view>

#include "models/wire/reading.hpp"
#include "models/wire/text.hpp"

namespace pbfleet::models::wire {
namespace {

constexpr std::string_view kDegreeSign = "\xC2\xB0";       // U+00B0 DEGREE SIGN
constexpr std::string_view kOrdinalIndicator = "\xC2\xBA";  // U+00BA, often typed for a degree

// Physically possible band for any number called a temperature: not below
// absolute zero (-273.15 C, SI definition of the kelvin), and not above a
// bound far beyond any reading (1000 C; larger numbers are typing errors and
// would overflow when converted to Fahrenheit for display).
constexpr double kAbsoluteZeroC = -kCelsiusToKelvinOffset;
constexpr double kMaxParsedC = 1000.0;

constexpr std::string_view kTemperatureForms =
    "a number with an optional unit C or F, e.g. 5C, 41F, -25 \xC2\xB0" "C; a bare number is C; "
    "-60 to 80 C";

// Removes a trailing unit letter; returns the unit, or c when there is none.
TempUnit take_unit(std::string_view& s) {
  if (s.empty()) return TempUnit::c;
  const char last = s.back();
  if (last == 'C' || last == 'c') {
    s.remove_suffix(1);
    return TempUnit::c;
  }
  if (last == 'F' || last == 'f') {
    s.remove_suffix(1);
    return TempUnit::f;
  }
  return TempUnit::c;
}

bool had_unit_letter(std::string_view before, std::string_view after) {
  return before.size() != after.size();
}

// Removes a degree sign directly before the unit letter, if any.
void take_degree_sign(std::string_view& s) {
  if (s.ends_with(kDegreeSign) || s.ends_with(kOrdinalIndicator)) s.remove_suffix(2);
}

Error bad_temperature(std::string_view field, std::string_view text) {
  return Error{std::string(field),
               "'" + text::excerpt(text) + "' is not a temperature",
               std::string(kTemperatureForms)};
}

}  // namespace

Result<EnteredTemperature> parse_temperature(std::string_view text, std::string_view field) {
  const std::string_view whole = text::trim(text);
  std::string_view rest = whole;
  const TempUnit unit = take_unit(rest);
  if (had_unit_letter(whole, rest)) take_degree_sign(rest);
  rest = text::trim(rest);
  const auto number = text::parse_decimal(rest);
  if (!number) return bad_temperature(field, whole);
  const Celsius value = unit == TempUnit::f ? celsius_from_fahrenheit(*number) : Celsius{*number};
  if (value.value < kAbsoluteZeroC || value.value > kMaxParsedC) {
    return Error{std::string(field),
                 "'" + text::excerpt(whole) + "' is not a possible temperature",
                 std::string(kTemperatureForms)};
  }
  return EnteredTemperature{value, unit};
}

}  // namespace pbfleet::models::wire
