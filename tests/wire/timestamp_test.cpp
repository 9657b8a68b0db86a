// parse_timestamp and format_timestamp are declared in the reading header.
#include "models/wire/reading.hpp"

#include <doctest/doctest.h>

#include <chrono>
#include <string>
#include <string_view>

using namespace std::chrono;
using namespace pbfleet::models::wire;

namespace {

sys_seconds utc(int y, unsigned m, unsigned d, int hh, int mm, int ss) {
  return sys_days{year{y} / month{m} / day{d}} + hours{hh} + minutes{mm} + seconds{ss};
}

}  // namespace

TEST_CASE("RFC 3339 date-times read to the same UTC instant") {
  struct Case {
    std::string_view text;
    sys_seconds expected;
  };
  // RFC 3339 section 5.8 examples, and the forms section 5.6 allows.
  const Case cases[] = {
      {"2026-11-30T07:15:00Z", utc(2026, 11, 30, 7, 15, 0)},
      {"2026-11-30t07:15:00z", utc(2026, 11, 30, 7, 15, 0)},
      {"2026-11-30T08:15:00+01:00", utc(2026, 11, 30, 7, 15, 0)},
      {"2026-11-30T02:15:00-05:00", utc(2026, 11, 30, 7, 15, 0)},
      {"2026-11-30T07:15:00-00:00", utc(2026, 11, 30, 7, 15, 0)},
      {"2026-11-30T07:15:00+00:00", utc(2026, 11, 30, 7, 15, 0)},
      {"2026-11-30T07:15:00.999999Z", utc(2026, 11, 30, 7, 15, 0)},  // truncated
      {"2026-11-30T07:15:59.999999999999999999999999Z", utc(2026, 11, 30, 7, 15, 59)},
      {"2026-11-30T07:15:00.5+01:00", utc(2026, 11, 30, 6, 15, 0)},
      {"1985-04-12T23:20:50.52Z", utc(1985, 4, 12, 23, 20, 50)},     // RFC 3339 5.8
      {"1996-12-19T16:39:57-08:00", utc(1996, 12, 20, 0, 39, 57)},   // RFC 3339 5.8
      {"1937-01-01T12:00:27.87+00:20", utc(1937, 1, 1, 11, 40, 27)}, // RFC 3339 5.8
      {"2026-01-01T00:30:00+01:00", utc(2025, 12, 31, 23, 30, 0)},   // crosses the year
      {"2024-02-29T12:00:00Z", utc(2024, 2, 29, 12, 0, 0)},          // leap year
      {"2000-02-29T00:00:00Z", utc(2000, 2, 29, 0, 0, 0)},           // 400-year rule
      {"2026-12-31T23:59:59Z", utc(2026, 12, 31, 23, 59, 59)},
      {"2026-06-01T00:00:00+23:59", utc(2026, 5, 31, 0, 1, 0)},      // largest offset
      {"0000-01-01T00:00:00Z", utc(0, 1, 1, 0, 0, 0)},
      {"9999-12-31T23:59:59Z", utc(9999, 12, 31, 23, 59, 59)},
  };
  for (const auto& c : cases) {
    CAPTURE(c.text);
    const auto t = parse_timestamp(c.text, "taken_at");
    REQUIRE(t.ok());
    CHECK(*t == c.expected);
  }
}

TEST_CASE("malformed or impossible date-times are refused naming the field") {
  const std::string_view bad[] = {
      "",                           // empty
      "2026-11-30",                 // date only
      "2026-11-30T07:15Z",          // no seconds
      "2026-11-30T07:15:00",        // no offset
      "2026-11-30 07:15:00Z",       // space instead of T
      "2026-11-30T07:15:00+0100",   // offset without colon
      "2026-11-30T07:15:00+01",     // offset without minutes
      "2026-11-30T07:15:00.Z",      // point without digits
      "2026-11-30T07:15:00Z ",      // trailing space
      " 2026-11-30T07:15:00Z",      // leading space
      "2026-11-30T07:15:00ZZ",      // trailing text
      "26-11-30T07:15:00Z",         // two-digit year
      "2026-1-30T07:15:00Z",        // one-digit month
      "2026/11/30T07:15:00Z",       // wrong separator
      "2026-02-30T07:15:00Z",       // no Feb 30
      "2026-02-29T07:15:00Z",       // 2026 is not a leap year
      "1900-02-29T07:15:00Z",       // century rule
      "2026-04-31T07:15:00Z",       // April has 30 days
      "2026-13-01T07:15:00Z",       // month 13
      "2026-00-10T07:15:00Z",       // month 0
      "2026-11-00T07:15:00Z",       // day 0
      "2026-11-30T24:00:00Z",       // hour 24
      "2026-11-30T07:60:00Z",       // minute 60
      "2026-11-30T07:15:61Z",       // second 61
      "2026-12-31T23:59:60Z",       // leap second: sys_seconds cannot hold it
      "2026-11-30T07:15:00+24:00",  // offset hour 24
      "2026-11-30T07:15:00+01:60",  // offset minute 60
      "+2026-11-30T07:15:00Z",      // signed year
      "2026-11-30T07:15:00\xEF\xBC\xBA",  // fullwidth Z
      "2026-11-30T07:15:0aZ",
  };
  for (const auto text : bad) {
    CAPTURE(text);
    const auto t = parse_timestamp(text, "taken_at");
    REQUIRE_FALSE(t.ok());
    CHECK(t.error().field == "taken_at");
    CHECK(t.error().allowed.find("RFC 3339") != std::string::npos);
  }
}

TEST_CASE("the error for Feb 30 says it is not a calendar date") {
  const auto t = parse_timestamp("2026-02-30T07:15:00Z", "taken_at");
  REQUIRE_FALSE(t.ok());
  CHECK(t.error().detail.find("calendar date") != std::string::npos);
}

TEST_CASE("timestamps are written in UTC with Z and read back unchanged") {
  const sys_seconds samples[] = {utc(2026, 11, 30, 7, 15, 0), utc(2000, 1, 1, 0, 0, 0),
                                 utc(2024, 2, 29, 23, 59, 59), utc(1999, 12, 31, 23, 59, 59),
                                 utc(1970, 1, 1, 0, 0, 0)};
  for (const auto t : samples) {
    const std::string text = format_timestamp(t);
    CAPTURE(text);
    CHECK(text.size() == 20);
    CHECK(text.back() == 'Z');
    const auto back = parse_timestamp(text, "taken_at");
    REQUIRE(back.ok());
    CHECK(*back == t);
  }
  CHECK(format_timestamp(utc(2026, 11, 30, 7, 15, 0)) == "2026-11-30T07:15:00Z");
  CHECK(format_timestamp(utc(2026, 1, 2, 3, 4, 5)) == "2026-01-02T03:04:05Z");
}

TEST_CASE("an offset timestamp is written back as its UTC instant") {
  const auto t = parse_timestamp("2026-11-30T08:15:00+01:00", "taken_at");
  REQUIRE(t.ok());
  CHECK(format_timestamp(*t) == "2026-11-30T07:15:00Z");
}
