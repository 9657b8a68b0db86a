#include "models/wire/text.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <string_view>

using namespace pbfleet::models::wire;

TEST_CASE("decimal numbers are read only when the whole text is the number") {
  struct Case {
    std::string_view text;
    double value;
  };
  const Case good[] = {{"12.65", 12.65}, {"-3", -3.0},  {"+0.5", 0.5},   {"1e2", 100.0},
                       {"1.265", 1.265}, {".5", 0.5},   {"5.", 5.0},     {"-0", 0.0},
                       {"2E-3", 0.002},  {"007", 7.0},  {"1e+2", 100.0}};
  for (const auto& c : good) {
    CAPTURE(c.text);
    const auto v = text::parse_decimal(c.text);
    REQUIRE(v.has_value());
    CHECK(*v == c.value);
  }
  const std::string_view bad[] = {"",   " 1", "1 ",  "1,5", "inf", "nan", "0x1A", "1e",
                                  "e5", ".",  "+",   "-",   "1..2", "1e999", "--1", "1e5.5"};
  for (const auto text : bad) {
    CAPTURE(text);
    CHECK_FALSE(text::parse_decimal(text).has_value());
  }
}

TEST_CASE("shortest formatting reads back to exactly the same double") {
  const double values[] = {12.65, 1.265, -25.0, 0.1, 1.0 / 3.0, 5e-324, 1.7976931348623157e308,
                           -0.0, 8784.0, 12.600000000000001};
  for (const double v : values) {
    const std::string s = text::format_shortest(v);
    CAPTURE(s);
    const auto back = text::parse_decimal(s);
    REQUIRE(back.has_value());
    CHECK(*back == v);
  }
  CHECK(text::format_shortest(12.65) == "12.65");
  CHECK(text::format_shortest(-25.0) == "-25");
}

TEST_CASE("UTF-8 length counts code points and refuses malformed sequences") {
  CHECK(text::utf8_length("") == 0u);
  CHECK(text::utf8_length("Fjellvik") == 8u);
  CHECK(text::utf8_length("\xC3\x98st") == 3u);            // "Øst"
  CHECK(text::utf8_length("\xE2\x82\xAC") == 1u);          // euro sign
  CHECK(text::utf8_length("\xF0\x9F\x94\x8B") == 1u);      // U+1F50B
  const std::string_view bad[] = {
      "\x80",              // lone continuation byte
      "\xC3",              // truncated two-byte sequence
      "\xC0\xAF",          // overlong '/'
      "\xE0\x80\xAF",      // overlong '/'
      "\xED\xA0\x80",      // UTF-16 surrogate
      "\xF4\x90\x80\x80",  // above U+10FFFF
      "\xF5\x80\x80\x80",  // invalid lead
      "\xE2\x82",          // truncated three-byte sequence
      "\xE2\x28\xA1",      // bad continuation
      "\xFF",
  };
  for (const auto s : bad) CHECK_FALSE(text::utf8_length(s).has_value());
}

TEST_CASE("control characters are found, line breaks only when not allowed") {
  CHECK_FALSE(text::has_control("North Yard", false));
  CHECK(text::has_control("a\tb", false));
  CHECK_FALSE(text::has_control("a\tb\r\nc", true));
  CHECK(text::has_control(std::string_view("a\0b", 3), true));
  CHECK(text::has_control("a\x7F", true));
  CHECK(text::has_control("a\xC2\x85", true));  // U+0085 NEXT LINE, a C1 control
  CHECK_FALSE(text::has_control("\xC2\xB0", false));  // degree sign is text
}

TEST_CASE("excerpts are short valid UTF-8 without control characters") {
  CHECK(text::excerpt("41F") == "41F");
  CHECK(text::excerpt("a\xFF" "b\nc") == "a?b?c");
  CHECK(text::excerpt(std::string(100, 'x')) == std::string(40, 'x') + "...");
  CHECK(text::excerpt("\xC3\x98") == "\xC3\x98");
  CHECK(text::utf8_length(text::excerpt("\xE2\x82")).has_value());
}
