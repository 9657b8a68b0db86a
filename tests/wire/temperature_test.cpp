// parse_temperature is declared in the reading header.
#include "models/wire/reading.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <string_view>

using namespace pbfleet::models;
using namespace pbfleet::models::wire;

TEST_CASE("temperatures in the accepted forms read to Celsius and keep their unit") {
  struct Case {
    std::string_view text;
    double celsius;
    TempUnit unit;
  };
  // degF = degC * 9/5 + 32 (definition of the Fahrenheit scale): 41 F = 5 C,
  // 32 F = 0 C, -40 F = -40 C, 212 F = 100 C, -13 F = -25 C.
  const Case cases[] = {
      {"5C", 5.0, TempUnit::c},         {"5c", 5.0, TempUnit::c},
      {"5", 5.0, TempUnit::c},          {"-25", -25.0, TempUnit::c},
      {"-25c", -25.0, TempUnit::c},     {"+12.5C", 12.5, TempUnit::c},
      {"5 C", 5.0, TempUnit::c},        {"5 \xC2\xB0" "C", 5.0, TempUnit::c},
      {"5\xC2\xB0" "C", 5.0, TempUnit::c}, {"5\xC2\xBA" "C", 5.0, TempUnit::c},
      {"  7.25C  ", 7.25, TempUnit::c}, {"41F", 5.0, TempUnit::f},
      {"41f", 5.0, TempUnit::f},        {"41 \xC2\xB0" "F", 5.0, TempUnit::f},
      {"32F", 0.0, TempUnit::f},        {"-40F", -40.0, TempUnit::f},
      {"212F", 100.0, TempUnit::f},     {"-13F", -25.0, TempUnit::f},
      {"0", 0.0, TempUnit::c},          {"-0.5", -0.5, TempUnit::c},
  };
  for (const auto& c : cases) {
    CAPTURE(c.text);
    const auto t = parse_temperature(c.text, "electrolyte_temp");
    REQUIRE(t.ok());
    CHECK(std::abs(t->value.value - c.celsius) <= 1e-9);
    CHECK(t->unit == c.unit);
  }
}

TEST_CASE("41F equals 5C within 1e-9") {
  const auto f = parse_temperature("41F", "t");
  const auto c = parse_temperature("5C", "t");
  REQUIRE(f.ok());
  REQUIRE(c.ok());
  CHECK(std::abs(f->value.value - c->value.value) <= 1e-9);
}

TEST_CASE("Fahrenheit to Celsius and back returns the same value within 1e-9") {
  for (double f = -76.0; f <= 176.0; f += 0.37) {
    CAPTURE(f);
    CHECK(std::abs(fahrenheit_from_celsius(celsius_from_fahrenheit(f)) - f) <= 1e-9);
    const auto parsed = parse_temperature(std::to_string(f) + "F", "t");
    REQUIRE(parsed.ok());
    CHECK(std::abs(fahrenheit_from_celsius(parsed->value) - f) <= 1e-9);
  }
}

TEST_CASE("text that is not a temperature is refused naming the field and the forms") {
  const std::string_view bad[] = {"",      "   ",  "C",      "F",    "abc",  "5K",    "5 degC",
                                  "5CC",   "5FC",  "--5",    "5-",   "1,5",  "inf",   "nan",
                                  "-infF", "1e999", "0x10",  "5\xC2\xB0", "\xC2\xB0" "C", "5 C F",
                                  "."};
  for (const auto text : bad) {
    CAPTURE(text);
    const auto t = parse_temperature(text, "ambient_temp");
    REQUIRE_FALSE(t.ok());
    CHECK(t.error().field == "ambient_temp");
    CHECK(t.error().allowed.find("41F") != std::string::npos);
    CHECK(t.error().allowed.find("-60 to 80 C") != std::string::npos);
  }
}

TEST_CASE("a number with a point but no fraction digits is still a number") {
  const auto t = parse_temperature("5.F", "t");
  REQUIRE(t.ok());
  CHECK(std::abs(t->value.value - celsius_from_fahrenheit(5.0).value) <= 1e-12);
}

TEST_CASE("numbers that cannot be temperatures are refused, others are left to validation") {
  // Absolute zero is -273.15 C = -459.67 F (SI definition of the kelvin).
  const std::string_view impossible[] = {"-273.16C", "-459.68F", "1000.01C", "1e308F", "-1e308"};
  for (const auto text : impossible) {
    CAPTURE(text);
    const auto t = parse_temperature(text, "electrolyte_temp");
    REQUIRE_FALSE(t.ok());
    CHECK(t.error().detail.find("not a possible temperature") != std::string::npos);
  }
  const std::string_view possible[] = {"-273.15C", "-459.67F", "1000C", "-61C", "81C"};
  for (const auto text : possible) {
    CAPTURE(text);
    CHECK(parse_temperature(text, "electrolyte_temp").ok());
  }
}
