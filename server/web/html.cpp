#include "server/web/html.hpp"

#include <cmath>
#include <cctype>
#include <cstdio>

namespace pbfleet::web {

std::string escape(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&#39;"; break;
      default: out += c;
    }
  }
  return out;
}

Html& Html::text(std::string_view text) {
  out_ += escape(text);
  return *this;
}

std::string number(std::optional<double> value, int decimals, std::string_view none) {
  if (!value || !std::isfinite(*value)) return std::string(none);
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, *value);
  std::string s = buf;
  if (s.starts_with("-") && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);  // "-0.0"
  return s;
}

std::string date_text(std::chrono::sys_days day) {
  const std::chrono::year_month_day ymd{day};
  char buf[16];
  std::snprintf(buf, sizeof buf, "%04d-%02u-%02u", static_cast<int>(ymd.year()),
                static_cast<unsigned>(ymd.month()), static_cast<unsigned>(ymd.day()));
  return buf;
}

std::string date_text(std::chrono::sys_seconds at) {
  return date_text(std::chrono::floor<std::chrono::days>(at));
}

std::string time_text(std::chrono::sys_seconds at) {
  const auto day = std::chrono::floor<std::chrono::days>(at);
  const std::chrono::hh_mm_ss hms{at - day};
  char buf[8];
  std::snprintf(buf, sizeof buf, " %02d:%02d", static_cast<int>(hms.hours().count()),
                static_cast<int>(hms.minutes().count()));
  return date_text(day) + buf;
}

std::string url_encode(std::string_view text) {
  static constexpr char kHex[] = "0123456789ABCDEF";
  std::string out;
  for (unsigned char c : text) {
    if (std::isalnum(c) || c == '-' || c == '_' || c == '.' || c == '~') {
      out += static_cast<char>(c);
    } else {
      out += '%';
      out += kHex[c >> 4];
      out += kHex[c & 15];
    }
  }
  return out;
}

}  // namespace pbfleet::web
