// Number formatting for report sentences (internal to the analytics).
#pragma once

#include <string>

namespace pbfleet::analytics::text {

// `value` with a fixed number of decimals ("-25", "1.150", "0.8").
std::string fixed(double value, int decimals);
// Temperature in words: "-25 C".
std::string celsius(double value);
// Whole percent: "58 %".
std::string percent(double value);
// Whole amperes: "310 A".
std::string amperes(double value);

}  // namespace pbfleet::analytics::text
