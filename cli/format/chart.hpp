// Terminal charts of one battery's history: one column per reading (or per
// group of readings when there are more readings than columns), drawn with
// Unicode eighth blocks or, on plain terminals, ASCII.
#pragma once

#include <string>
#include <vector>

namespace pbfleet::cli::format {

struct ChartSeries {
  std::string title;            // "State of charge (%)"
  std::vector<double> values;   // oldest first; NaN = no value for that reading
  std::vector<bool> flagged;    // same length as values; marked under the column
  double lo = 0.0;              // value at the bottom of the plot
  double hi = 1.0;              // value at the top; REQUIRES hi > lo
  int decimals = 0;             // axis label precision
  std::string first_label;      // x axis, left end (e.g. first date)
  std::string last_label;       // x axis, right end
};

// The chart as lines of text, `height` rows of plot plus axes, at most
// `width` columns wide in total. Grouped columns show the lowest value of
// their group (the one that matters in winter) and a flag if any is flagged.
std::string render_chart(const ChartSeries& series, bool unicode, int width, int height);

}  // namespace pbfleet::cli::format
