#include "cli/format/progress.hpp"

#include <algorithm>
#include <cassert>
#include <ostream>

#include <fmt/format.h>

namespace pbfleet::cli::format {
namespace {

constexpr int kEighths = 8;
constexpr int kBarWidth = 30;

std::string bar(std::size_t done, std::size_t total, int width, bool unicode) {
  static const char* const kPartial[] = {"", "▏", "▎", "▍", "▌", "▋", "▊", "▉"};
  const auto filled_eighths = static_cast<long>(done * static_cast<std::size_t>(width) * kEighths / total);
  const long full = filled_eighths / kEighths;
  const long part = filled_eighths % kEighths;
  std::string s;
  for (long i = 0; i < full; ++i) s += unicode ? "█" : "#";
  long used = full;
  if (part > 0 && used < width) {
    s += unicode ? kPartial[part] : "";
    used += unicode ? 1 : 0;
  }
  s += std::string(static_cast<std::size_t>(std::max(0L, width - used)), unicode ? ' ' : '.');
  return s;
}

}  // namespace

std::string progress_line(std::size_t done, std::size_t total, int bar_width, bool unicode,
                          const std::string& unit) {
  assert(total > 0 && done <= total);
  const auto percent = done * 100 / total;
  return fmt::format("[{}] {}/{} {} {:3}%", bar(done, total, bar_width, unicode), done, total, unit,
                     percent);
}

ProgressBar::ProgressBar(std::ostream* err, bool enabled, bool unicode, std::size_t total,
                         std::string unit)
    : err_(err), enabled_(enabled && total > 0), unicode_(unicode), total_(total), unit_(std::move(unit)) {}

ProgressBar::~ProgressBar() { finish(); }

void ProgressBar::update(std::size_t done) {
  if (!enabled_) return;
  *err_ << '\r' << progress_line(std::min(done, total_), total_, kBarWidth, unicode_, unit_) << std::flush;
  drawn_ = true;
}

void ProgressBar::finish() {
  if (drawn_) *err_ << '\n' << std::flush;
  drawn_ = false;
}

}  // namespace pbfleet::cli::format
