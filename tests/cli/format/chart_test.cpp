#include "cli/format/chart.hpp"

#include <cmath>
#include <sstream>

#include <doctest/doctest.h>

using namespace pbfleet::cli::format;

namespace {

ChartSeries soc(std::vector<double> values, std::vector<bool> flags = {}) {
  ChartSeries s;
  s.title = "SOC";
  s.values = std::move(values);
  s.flagged = flags.empty() ? std::vector<bool>(s.values.size(), false) : std::move(flags);
  s.lo = 0;
  s.hi = 100;
  s.first_label = "2026-10-05";
  s.last_label = "2026-11-30";
  return s;
}

std::vector<std::string> lines(const std::string& text) {
  std::vector<std::string> out;
  std::istringstream in(text);
  for (std::string l; std::getline(in, l);) out.push_back(l);
  return out;
}

}  // namespace

TEST_CASE("ASCII chart: a full bar reaches the top row and an empty value draws nothing") {
  auto text = render_chart(soc({100, NAN, 50}), /*unicode=*/false, 40, 4);
  auto l = lines(text);
  REQUIRE(l.size() >= 7);
  CHECK(l[0] == "SOC");
  // One reading per column, three columns per reading when there is room.
  CHECK(l[1] == "100 +###");
  CHECK(l[2] == "    |###");
  CHECK(l[3] == "    |###   ###");
  CHECK(l[4] == "  0 +###   ###");
  CHECK(text.find_first_of("\xe2") == std::string::npos);  // pure ASCII
  CHECK(l[5] == "    +---------");
}

TEST_CASE("Unicode chart uses eighth blocks for the partial top of a bar") {
  // 4 rows = 32 eighths; 62.5 % = 20 eighths = two full rows and a half block.
  auto text = render_chart(soc({62.5}), /*unicode=*/true, 40, 4);
  auto l = lines(text);
  CHECK(l[2].find("▄▄▄") != std::string::npos);
  CHECK(l[3].find("███") != std::string::npos);
  CHECK(l[1].find("█") == std::string::npos);
  CHECK(text.find("└") != std::string::npos);
}

TEST_CASE("flagged readings are marked under their column, with a legend") {
  auto ascii = render_chart(soc({80, 40, 90}, {false, true, false}), false, 40, 4);
  auto l = lines(ascii);
  CHECK(l.back() == "        ^  ^ = flagged reading");
  auto unicode = render_chart(soc({80, 40, 90}, {false, true, false}), true, 40, 4);
  CHECK(unicode.find("▲ = flagged reading") != std::string::npos);
}

TEST_CASE("more readings than columns are grouped, keeping the lowest value of each group") {
  std::vector<double> values(100, 100.0);
  values[51] = 0.0;  // one empty battery in the second half
  auto text = render_chart(soc(values), false, 10, 2);
  auto l = lines(text);
  // 10 columns minus the axis label (3) and margin (2) = 5 columns of 20
  // readings; the third group holds the empty battery and shows only the
  // smallest mark.
  CHECK(l[1] == "100 +## ##");
  CHECK(l[2] == "  0 +##.##");
}

TEST_CASE("the x axis names the first and last dates") {
  auto text = render_chart(soc({10, 20, 30, 40, 50, 60, 70, 80}), false, 60, 3);
  CHECK(text.find("2026-10-05") != std::string::npos);
  CHECK(text.find("2026-11-30") != std::string::npos);
}
