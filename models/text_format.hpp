// Number formatting for error messages and notes (internal to models/).
#pragma once

#include <string>

namespace pbfleet::models::detail {

// `value` with a fixed number of decimals ("1.265").
[[nodiscard]] std::string fixed(double value, int decimals);
// "lo to hi" with a fixed number of decimals and an optional unit ("1.000 to 1.395").
[[nodiscard]] std::string range_text(double lo, double hi, int decimals, const std::string& unit = "");

}  // namespace pbfleet::models::detail
