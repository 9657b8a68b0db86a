#include "cli/format/chart.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>

#include <fmt/format.h>

namespace pbfleet::cli::format {
namespace {

constexpr int kEighths = 8;            // sub-steps per character cell
constexpr int kMaxColumnsPerReading = 3;  // few readings: widen each bar

struct BarColumn {
  double value = NAN;
  bool flagged = false;
};

// Groups readings into at most `slots` columns, keeping each group's lowest value.
std::vector<BarColumn> group(const ChartSeries& s, std::size_t slots) {
  const std::size_t n = s.values.size();
  std::vector<BarColumn> cols;
  if (n == 0 || slots == 0) return cols;
  const std::size_t count = std::min(n, slots);
  for (std::size_t j = 0; j < count; ++j) {
    BarColumn c;
    for (std::size_t i = j * n / count; i < (j + 1) * n / count; ++i) {
      if (!std::isnan(s.values[i]) && (std::isnan(c.value) || s.values[i] < c.value)) c.value = s.values[i];
      if (i < s.flagged.size() && s.flagged[i]) c.flagged = true;
    }
    cols.push_back(c);
  }
  return cols;
}

// Eighths of the whole plot height a value fills; at least one when present.
int eighths_for(double value, const ChartSeries& s, int height) {
  if (std::isnan(value)) return 0;
  double f = std::clamp((value - s.lo) / (s.hi - s.lo), 0.0, 1.0);
  return std::max(1, static_cast<int>(std::lround(f * height * kEighths)));
}

std::string glyph(int eighths, bool unicode) {
  static const char* const kBlocks[] = {" ", "▁", "▂", "▃", "▄", "▅", "▆", "▇", "█"};
  if (unicode) return kBlocks[eighths];
  if (eighths == 0) return " ";
  if (eighths < 4) return ".";
  if (eighths < kEighths) return ":";
  return "#";
}

std::string axis_label(const ChartSeries& s, int row, int height) {
  if (row == 0) return fmt::format("{:.{}f}", s.hi, s.decimals);
  if (row == height - 1) return fmt::format("{:.{}f}", s.lo, s.decimals);
  if (height >= 5 && row == height / 2) {
    // The value at the middle of this row's span.
    double mid = s.lo + (s.hi - s.lo) * (height - row - 0.5) / height;
    return fmt::format("{:.{}f}", mid, s.decimals);
  }
  return "";
}

}  // namespace

std::string render_chart(const ChartSeries& s, bool unicode, int width, int height) {
  assert(s.hi > s.lo && height > 0);
  const std::size_t label_w = std::max(fmt::format("{:.{}f}", s.hi, s.decimals).size(),
                                       fmt::format("{:.{}f}", s.lo, s.decimals).size());
  const int plot_w = std::max(1, width - static_cast<int>(label_w) - 2);
  auto cols = group(s, static_cast<std::size_t>(plot_w));
  const int per = cols.empty() ? 1
                  : std::clamp(plot_w / static_cast<int>(cols.size()), 1, kMaxColumnsPerReading);
  const std::string vbar = unicode ? "│" : "|";
  const std::string tick = unicode ? "┤" : "+";

  std::string out = s.title + "\n";
  for (int row = 0; row < height; ++row) {
    auto label = axis_label(s, row, height);
    std::string line = fmt::format("{:>{}} ", label, label_w) + (label.empty() ? vbar : tick);
    const int from_bottom = height - 1 - row;
    for (const auto& c : cols) {
      int cell = std::clamp(eighths_for(c.value, s, height) - from_bottom * kEighths, 0, kEighths);
      for (int k = 0; k < per; ++k) line += glyph(cell, unicode);
    }
    while (!line.empty() && line.back() == ' ') line.pop_back();
    out += line + "\n";
  }
  const int drawn = static_cast<int>(cols.size()) * per;
  std::string rule;
  for (int k = 0; k < drawn; ++k) rule += unicode ? "─" : "-";
  out += std::string(label_w + 1, ' ') + (unicode ? "└" : "+") + rule + "\n";

  // Dates under the ends of the plot.
  std::string dates = std::string(label_w + 2, ' ') + s.first_label;
  const int right = static_cast<int>(label_w) + 2 + drawn;
  const int gap = right - static_cast<int>(dates.size()) - static_cast<int>(s.last_label.size());
  if (!s.last_label.empty() && s.last_label != s.first_label) {
    dates += std::string(std::max(2, gap), ' ') + s.last_label;
  }
  out += dates + "\n";

  if (std::any_of(cols.begin(), cols.end(), [](const BarColumn& c) { return c.flagged; })) {
    const std::string mark = unicode ? "▲" : "^";
    std::string marks(label_w + 2, ' ');
    for (const auto& c : cols) {
      for (int k = 0; k < per; ++k) marks += (c.flagged && k == 0) ? mark : " ";
    }
    while (!marks.empty() && marks.back() == ' ') marks.pop_back();
    out += marks + "  " + mark + " = flagged reading\n";
  }
  return out;
}

}  // namespace pbfleet::cli::format
