// Number formatting for error messages and notes.
#include "models/text_format.hpp"

#include <cstdio>

namespace pbfleet::models::detail {

std::string fixed(double value, int decimals) {
  char buffer[64];
  std::snprintf(buffer, sizeof buffer, "%.*f", decimals, value);
  std::string text = buffer;
  if (text == "-0" || text.find_first_not_of("-0.") == std::string::npos) {
    if (!text.empty() && text.front() == '-') text.erase(0, 1);  // no "-0.0"
  }
  return text;
}

std::string range_text(double lo, double hi, int decimals, const std::string& unit) {
  std::string text = fixed(lo, decimals) + " to " + fixed(hi, decimals);
  if (!unit.empty()) text += " " + unit;
  return text;
}

}  // namespace pbfleet::models::detail
