// RFC 3339 timestamps (section 5.6 "date-time"), std::chrono only.
//
//   2026-11-30T07:15:00Z   2026-11-30T08:15:00+01:00   2026-11-30T07:15:00.25Z
//
// 'T' and 'Z' may be lower case (RFC 3339 5.6 note). Fractional seconds are
// accepted and truncated to whole seconds. Leap seconds (":60") are refused:
// sys_seconds cannot hold them. "-00:00" (offset unknown) is read as UTC.
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <optional>
#include <string>
#include <string_view>

#include "models/wire/reading.hpp"
#include "models/wire/text.hpp"

namespace pbfleet::models::wire {
namespace {

using namespace std::chrono;

constexpr std::string_view kTimestampForm =
    "RFC 3339 date-time, e.g. 2026-11-30T07:15:00Z or 2026-11-30T08:15:00+01:00";

// The fixed-width fields of a date-time, as written (offset in minutes east).
struct Fields {
  int year = 0, month = 0, day = 0, hour = 0, minute = 0, second = 0;
  int offset_minutes = 0;
};

// Reads exactly `width` digits at `pos` and advances; nullopt if not digits.
std::optional<int> digits(std::string_view s, std::size_t& pos, std::size_t width) {
  if (pos + width > s.size()) return std::nullopt;
  int v = 0;
  for (std::size_t i = 0; i < width; ++i) {
    const char c = s[pos + i];
    if (c < '0' || c > '9') return std::nullopt;
    v = v * 10 + (c - '0');
  }
  pos += width;
  return v;
}

bool expect(std::string_view s, std::size_t& pos, std::string_view one_of) {
  if (pos >= s.size() || one_of.find(s[pos]) == std::string_view::npos) return false;
  ++pos;
  return true;
}

// Reads "YYYY-MM-DD" into `f`.
bool read_date(std::string_view s, std::size_t& pos, Fields& f) {
  const auto y = digits(s, pos, 4);
  if (!y || !expect(s, pos, "-")) return false;
  const auto m = digits(s, pos, 2);
  if (!m || !expect(s, pos, "-")) return false;
  const auto d = digits(s, pos, 2);
  if (!d) return false;
  f.year = *y, f.month = *m, f.day = *d;
  return true;
}

// Reads "hh:mm:ss" and an optional ".fraction" (dropped) into `f`.
bool read_time(std::string_view s, std::size_t& pos, Fields& f) {
  const auto h = digits(s, pos, 2);
  if (!h || !expect(s, pos, ":")) return false;
  const auto mi = digits(s, pos, 2);
  if (!mi || !expect(s, pos, ":")) return false;
  const auto sec = digits(s, pos, 2);
  if (!sec) return false;
  if (pos < s.size() && s[pos] == '.') {
    ++pos;
    const std::size_t start = pos;
    while (pos < s.size() && s[pos] >= '0' && s[pos] <= '9') ++pos;
    if (pos == start) return false;  // "." needs at least one digit
  }
  f.hour = *h, f.minute = *mi, f.second = *sec;
  return true;
}

// Reads "Z" or "+hh:mm" / "-hh:mm"; must end the text.
bool read_offset(std::string_view s, std::size_t& pos, Fields& f) {
  if (expect(s, pos, "Zz")) return pos == s.size();
  if (pos >= s.size()) return false;
  const int sign = s[pos] == '-' ? -1 : 1;
  if (!expect(s, pos, "+-")) return false;
  const auto h = digits(s, pos, 2);
  if (!h || !expect(s, pos, ":")) return false;
  const auto m = digits(s, pos, 2);
  if (!m || *h > 23 || *m > 59) return false;
  f.offset_minutes = sign * (*h * 60 + *m);
  return pos == s.size();
}

Error bad_timestamp(std::string_view field, std::string_view text, std::string why) {
  return Error{std::string(field), "'" + text::excerpt(text) + "' " + std::move(why),
               std::string(kTimestampForm)};
}

}  // namespace

Result<sys_seconds> parse_timestamp(std::string_view text, std::string_view field) {
  Fields f;
  std::size_t pos = 0;
  const bool shape_ok = read_date(text, pos, f) && expect(text, pos, "Tt") &&
                        read_time(text, pos, f) && read_offset(text, pos, f);
  if (!shape_ok) return bad_timestamp(field, text, "is not an RFC 3339 date-time");
  const year_month_day date{year{f.year}, month{static_cast<unsigned>(f.month)},
                            day{static_cast<unsigned>(f.day)}};
  if (!date.ok()) return bad_timestamp(field, text, "is not a calendar date");
  if (f.hour > 23 || f.minute > 59) return bad_timestamp(field, text, "is not a time of day");
  if (f.second == 60) return bad_timestamp(field, text, "is a leap second, which is not accepted");
  if (f.second > 59) return bad_timestamp(field, text, "is not a time of day");
  const auto local = sys_days{date} + hours{f.hour} + minutes{f.minute} + seconds{f.second};
  return sys_seconds{local - minutes{f.offset_minutes}};
}

TimestampText timestamp_text(sys_seconds t) {
  const auto day_start = floor<days>(t);
  const year_month_day date{day_start};
  const hh_mm_ss time{t - day_start};
  const int year = static_cast<int>(date.year());
  TimestampText out;
  if (year >= 0 && year <= 9999) {
    // The common case by hand: this runs for every reading in every answer.
    constexpr std::string_view kShape = "0000-00-00T00:00:00Z";
    std::copy(kShape.begin(), kShape.end(), out.chars.begin());
    out.size = kShape.size();
    const auto put = [&out](std::size_t at, unsigned value, std::size_t digits) {
      for (std::size_t i = 0; i < digits; ++i, value /= 10)
        out.chars[at + digits - 1 - i] = static_cast<char>('0' + value % 10);
    };
    put(0, static_cast<unsigned>(year), 4);
    put(5, static_cast<unsigned>(date.month()), 2);
    put(8, static_cast<unsigned>(date.day()), 2);
    put(11, static_cast<unsigned>(time.hours().count()), 2);
    put(14, static_cast<unsigned>(time.minutes().count()), 2);
    put(17, static_cast<unsigned>(time.seconds().count()), 2);
    return out;
  }
  const int n = std::snprintf(out.chars.data(), out.chars.size(), "%04d-%02u-%02uT%02d:%02d:%02dZ",
                              year, static_cast<unsigned>(date.month()),
                              static_cast<unsigned>(date.day()),
                              static_cast<int>(time.hours().count()),
                              static_cast<int>(time.minutes().count()),
                              static_cast<int>(time.seconds().count()));
  out.size = std::min(out.chars.size() - 1, static_cast<std::size_t>(n > 0 ? n : 0));
  return out;
}

std::string format_timestamp(sys_seconds t) { return std::string(timestamp_text(t).view()); }

}  // namespace pbfleet::models::wire
