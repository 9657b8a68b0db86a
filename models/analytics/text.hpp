// Number formatting for report sentences (internal to the analytics).
#pragma once

#include <chrono>
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

// Calendar date of a UTC time: "2026-11-30".
std::string date(std::chrono::sys_seconds t);
std::string date(std::chrono::sys_days d);

}  // namespace pbfleet::analytics::text
