#include "models/analytics/text.hpp"

#include <cmath>
#include <cstdio>

namespace pbfleet::analytics::text {

std::string fixed(double value, int decimals) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, value);
  std::string out = buf;
  // "-0" reads oddly in a sentence.
  if (out.find_first_not_of("-0.") == std::string::npos && out.front() == '-') out.erase(0, 1);
  return out;
}

std::string celsius(double value) { return fixed(value, 0) + " C"; }
std::string percent(double value) { return fixed(value, 0) + " %"; }
std::string amperes(double value) { return fixed(value, 0) + " A"; }

std::string date(std::chrono::sys_days d) {
  const std::chrono::year_month_day ymd{d};
  char buf[32];
  std::snprintf(buf, sizeof buf, "%04d-%02u-%02u", static_cast<int>(ymd.year()),
                static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()));
  return buf;
}

std::string date(std::chrono::sys_seconds t) {
  return date(std::chrono::floor<std::chrono::days>(t));
}

}  // namespace pbfleet::analytics::text
