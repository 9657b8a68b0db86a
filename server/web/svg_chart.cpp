#include "server/web/svg_chart.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "server/web/html.hpp"

namespace pbfleet::web {
namespace {

// Drawing area inside a 720 x 240 view box (scaled to the page width by CSS).
constexpr double kWidth = 720, kHeight = 240;
constexpr double kLeft = 52, kRight = 14, kTop = 12, kBottom = 30;
constexpr double kPlotW = kWidth - kLeft - kRight, kPlotH = kHeight - kTop - kBottom;
constexpr int kYTicks = 5;

std::string fmt(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.1f", v);
  return buf;
}

struct Scale {
  double lo, hi, px0, px1;
  [[nodiscard]] double operator()(double v) const {
    if (hi <= lo) return (px0 + px1) / 2;
    return px0 + (v - lo) / (hi - lo) * (px1 - px0);
  }
};

void open_svg(std::string& out, const std::string& id, const std::string& label) {
  out += "<svg id=\"" + escape(id) + "\" class=\"chart\" viewBox=\"0 0 720 240\" role=\"img\" aria-label=\"" +
         escape(label) + "\" xmlns=\"http://www.w3.org/2000/svg\">";
}

void y_axis(std::string& out, const Scale& y, int decimals, const std::string& caption) {
  for (int i = 0; i <= kYTicks; ++i) {
    const double v = y.lo + (y.hi - y.lo) * i / kYTicks;
    const std::string py = fmt(y(v));
    out += "<line class=\"grid\" x1=\"" + fmt(kLeft) + "\" x2=\"" + fmt(kWidth - kRight) + "\" y1=\"" +
           py + "\" y2=\"" + py + "\"/>";
    out += "<text class=\"tick\" x=\"" + fmt(kLeft - 6) + "\" y=\"" + py + "\" text-anchor=\"end\" dy=\"4\">" +
           number(v, decimals) + "</text>";
  }
  out += "<text class=\"axis-label\" x=\"12\" y=\"" + fmt(kTop + kPlotH / 2) +
         "\" transform=\"rotate(-90 12 " + fmt(kTop + kPlotH / 2) + ")\" text-anchor=\"middle\">" +
         escape(caption) + "</text>";
}

void x_axis(std::string& out, const Scale& x) {
  constexpr int kXTicks = 6;
  for (int i = 0; i <= kXTicks; ++i) {
    const double t = x.lo + (x.hi - x.lo) * i / kXTicks;
    const auto at = std::chrono::sys_seconds{std::chrono::seconds{static_cast<long long>(t)}};
    out += "<text class=\"tick\" x=\"" + fmt(x(t)) + "\" y=\"" + fmt(kHeight - 8) +
           "\" text-anchor=\"middle\">" + date_text(at) + "</text>";
  }
}

}  // namespace

std::string time_chart_svg(const TimeChart& chart) {
  std::string out;
  out.reserve(600 + chart.points.size() * 160);
  open_svg(out, chart.id, chart.label);
  if (chart.points.empty()) {
    out += "<text class=\"empty\" x=\"360\" y=\"120\" text-anchor=\"middle\">no readings to draw</text></svg>";
    return out;
  }
  auto secs = [](std::chrono::sys_seconds t) { return static_cast<double>(t.time_since_epoch().count()); };
  double t0 = secs(chart.points.front().at), t1 = secs(chart.points.back().at);
  if (t1 <= t0) {  // one point, or all at one instant: a day either side
    t0 -= 86400;
    t1 += 86400;
  }
  const Scale x{t0, t1, kLeft, kWidth - kRight};
  const Scale y{chart.y_min, chart.y_max, kTop + kPlotH, kTop};
  y_axis(out, y, chart.y_decimals, chart.y_label);
  x_axis(out, x);
  auto clamp_y = [&](double v) { return y(std::clamp(v, chart.y_min, chart.y_max)); };

  // The band: upper edge forwards, lower edge backwards, one polygon.
  std::string upper, lower;
  for (const auto& p : chart.points) {
    if (!p.low || !p.high) continue;
    upper += fmt(x(secs(p.at))) + "," + fmt(clamp_y(*p.high)) + " ";
    lower.insert(0, fmt(x(secs(p.at))) + "," + fmt(clamp_y(*p.low)) + " ");
  }
  if (!upper.empty()) out += "<polygon class=\"band\" points=\"" + upper + lower + "\"/>";
  std::string line;
  for (const auto& p : chart.points) line += fmt(x(secs(p.at))) + "," + fmt(clamp_y(p.value)) + " ";
  out += "<polyline class=\"line\" points=\"" + line + "\"/>";
  for (const auto& p : chart.points) {
    const double px = x(secs(p.at)), py = clamp_y(p.value);
    const std::string title = "<title>" + escape(p.title) + "</title>";
    if (p.flagged) {
      out += "<path class=\"pt flagged\" d=\"M" + fmt(px) + " " + fmt(py - 5) + "l5 5-5 5-5-5z\">" + title + "</path>";
    } else {
      out += "<circle class=\"pt\" cx=\"" + fmt(px) + "\" cy=\"" + fmt(py) + "\" r=\"2.5\">" + title + "</circle>";
    }
  }
  out += "</svg>";
  return out;
}

std::string cell_chart_svg(const std::string& id, const std::string& label,
                           const std::vector<CellBar>& cells, double floor, double ceiling) {
  std::string out;
  open_svg(out, id, label);
  const Scale y{floor, ceiling, kTop + kPlotH, kTop};
  y_axis(out, y, 3, "corrected SG");
  const double slot = kPlotW / static_cast<double>(std::max<std::size_t>(cells.size(), 1));
  const double bar = std::min(slot * 0.6, 60.0);
  for (std::size_t i = 0; i < cells.size(); ++i) {
    const auto& c = cells[i];
    const double cx = kLeft + slot * (static_cast<double>(i) + 0.5);
    const double top = y(std::clamp(c.sg, floor, ceiling));
    out += "<rect class=\"bar" + std::string(c.weak ? " weak" : "") + "\" x=\"" + fmt(cx - bar / 2) +
           "\" y=\"" + fmt(top) + "\" width=\"" + fmt(bar) + "\" height=\"" + fmt(kTop + kPlotH - top) +
           "\"><title>cell " + std::to_string(c.cell) + ": " + number(c.sg, 3) +
           (c.weak ? " (weak cell)" : "") + "</title></rect>";
    out += "<text class=\"tick\" x=\"" + fmt(cx) + "\" y=\"" + fmt(kHeight - 8) + "\" text-anchor=\"middle\">" +
           (c.weak ? "cell " + std::to_string(c.cell) + " weak" : "cell " + std::to_string(c.cell)) + "</text>";
    out += "<text class=\"value\" x=\"" + fmt(cx) + "\" y=\"" + fmt(top - 4) + "\" text-anchor=\"middle\">" +
           number(c.sg, 3) + "</text>";
  }
  out += "</svg>";
  return out;
}

}  // namespace pbfleet::web
