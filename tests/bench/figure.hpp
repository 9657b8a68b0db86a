// What every benchmark prints: one line per figure, each figure a ratio
// against a limit measured in the same run on the same machine (absolute
// numbers drift on shared machines; ratios drift much less).
//
//   <name>  <value> <unit>  vs <limit name> <limit value> <unit>  ratio <r>  target <t>  <verdict>
//
// Verdicts: "ok", "MISSED", or "-" when the figure has no target.
#pragma once

#include <chrono>
#include <functional>
#include <optional>
#include <string>

namespace pbfleet::bench {

using SteadyClock = std::chrono::steady_clock;

// Seconds elapsed since `start`.
double seconds_since(SteadyClock::time_point start);
// Median seconds of `repeat` runs of `f`, after one untimed warm-up run.
double median_seconds(int repeat, const std::function<void()>& f);

// A target on a number: the ratio (or a time) must stay at or above / below it.
struct Target {
  enum class Kind { none, at_least, at_most, below } kind = Kind::none;
  double bound = 0.0;
  std::string text;  // as printed, e.g. ">= 0.50" or "< 1 s"
  // True when `value` meets the target (always true for none).
  [[nodiscard]] bool met(double value) const;
};
Target at_least(double bound, std::string text);
Target at_most(double bound, std::string text);
Target below(double bound, std::string text);

struct Figure {
  std::string name;          // e.g. "ingest.single"
  double value = 0.0;
  std::string unit;          // e.g. "readings/s"
  std::string limit_name;    // e.g. "healthz"
  double limit = 0.0;
  std::string limit_unit;    // e.g. "req/s"
  double ratio = 0.0;        // value / limit unless stated otherwise
  Target target;             // checked against `checked` (the ratio by default)
  std::optional<double> checked;  // the number the target applies to, when not the ratio
  std::string note;          // short remark printed after the verdict
};

// Prints the figure on one line of stdout (and flushes). Returns whether
// its target was met.
bool print_figure(const Figure& figure);

// Human-scaled number: 1234567 -> "1.23M", 0.00042 -> "0.00042".
std::string scaled(double value);

// Kills the whole process (and calls `on_expiry` first, e.g. to stop a
// child server) if it is still running after `limit`. Every benchmark
// arms one so that a hung socket cannot stall a run.
void arm_watchdog(std::chrono::seconds limit, void (*on_expiry)() = nullptr);

}  // namespace pbfleet::bench
