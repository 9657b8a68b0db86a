#include "tests/bench/figure.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <thread>
#include <vector>
#include <unistd.h>

namespace pbfleet::bench {

double median_seconds(int repeat, const std::function<void()>& f) {
  f();
  std::vector<double> times;
  for (int i = 0; i < repeat; ++i) {
    const auto start = SteadyClock::now();
    f();
    times.push_back(seconds_since(start));
  }
  std::sort(times.begin(), times.end());
  return times[times.size() / 2];
}

double seconds_since(SteadyClock::time_point start) {
  return std::chrono::duration<double>(SteadyClock::now() - start).count();
}

bool Target::met(double value) const {
  switch (kind) {
    case Kind::at_least: return value >= bound;
    case Kind::at_most: return value <= bound;
    case Kind::below: return value < bound;
    case Kind::none: break;
  }
  return true;
}

Target at_least(double bound, std::string text) {
  return {Target::Kind::at_least, bound, std::move(text)};
}

Target at_most(double bound, std::string text) {
  return {Target::Kind::at_most, bound, std::move(text)};
}

Target below(double bound, std::string text) {
  return {Target::Kind::below, bound, std::move(text)};
}

std::string scaled(double value) {
  char buf[32];
  const double a = std::fabs(value);
  if (a >= 1e9) std::snprintf(buf, sizeof buf, "%.2fG", value / 1e9);
  else if (a >= 1e6) std::snprintf(buf, sizeof buf, "%.2fM", value / 1e6);
  else if (a >= 1e4) std::snprintf(buf, sizeof buf, "%.1fk", value / 1e3);
  else if (a >= 100) std::snprintf(buf, sizeof buf, "%.0f", value);
  else std::snprintf(buf, sizeof buf, "%.3g", value);
  return buf;
}

bool print_figure(const Figure& f) {
  const bool has_target = f.target.kind != Target::Kind::none;
  const bool ok = f.target.met(f.checked.value_or(f.ratio));
  const char* verdict = !has_target ? "-" : ok ? "ok" : "MISSED";
  std::printf("%-26s %9s %-11s vs %-22s %9s %-10s ratio %8.4g  target %-12s %-6s%s%s\n",
              f.name.c_str(), scaled(f.value).c_str(), f.unit.c_str(), f.limit_name.c_str(),
              scaled(f.limit).c_str(), f.limit_unit.c_str(), f.ratio,
              has_target ? f.target.text.c_str() : "none", verdict, f.note.empty() ? "" : "  ",
              f.note.c_str());
  std::fflush(stdout);
  return ok;
}

void arm_watchdog(std::chrono::seconds limit, void (*on_expiry)()) {
  std::thread([limit, on_expiry] {
    std::this_thread::sleep_for(limit);
    std::fprintf(stderr, "benchmark still running after %llds: stopping it\n",
                 static_cast<long long>(limit.count()));
    if (on_expiry) on_expiry();
    ::_exit(3);
  }).detach();
}

}  // namespace pbfleet::bench
