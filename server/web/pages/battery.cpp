// GET /ui/batteries/{serial}: one battery for the technician at the bay:
// its details and vehicle, SOC (with its uncertainty band) and corrected SG
// over time with flagged readings marked, the latest per-cell SG, events
// and every reading. A depot-scoped viewer gets "not found" outside its
// depot, as on the API.
#include <algorithm>
#include <cmath>

#include "models/analytics/safety.hpp"
#include "server/api/services/history.hpp"
#include "server/web/html.hpp"
#include "server/web/pages/pages.hpp"
#include "server/web/pages/words.hpp"
#include "server/web/svg_chart.hpp"

namespace pbfleet::web::pages {
namespace {

using analytics::HistoryRow;

std::string details(const storage::Battery& b, const analytics::BatteryContext& c) {
  std::string out;
  Html h(out);
  auto row = [&](std::string_view name, const std::string& value) {
    h << "<dt>" << name << "</dt><dd>";
    h.text(value) << "</dd>";
  };
  h << "<section aria-labelledby=\"about\"><h2 id=\"about\">Battery and vehicle</h2><dl class=\"details\">";
  row("Type", std::string(models::to_string(b.chemistry)) + ", " + number(b.nominal_v.value, 0) + " V, " +
                  std::to_string(b.cells) + " cells");
  row("Rated CCA", number(b.rated_cca_a.value, 0) + " A");
  row("Reserve capacity", b.reserve_capacity_min ? number(*b.reserve_capacity_min, 0) + " min" : "not given");
  row("Capacity", b.capacity_ah ? number(*b.capacity_ah, 0) + " Ah" : "not given");
  row("Full-charge SG", number(c.spec.full_charge_sg.value, 3));
  row("Installed", date_text(b.installed_on));
  row("Status", b.status == storage::BatteryStatus::retired
                    ? "retired " + (b.retired_at ? date_text(*b.retired_at) : std::string{}) + " " + b.retire_reason
                    : "in service");
  row("Depot", c.depot_name.empty() ? "not fitted" : c.depot_name + " (design low " +
                                                       number(c.depot_design_low.value, 0) + " °C)");
  row("Vehicle", c.vehicle_code.empty() ? "not fitted" : c.vehicle_code);
  const auto need = analytics::required_cca_at_test(c);
  row("Engine needs", need ? number(need->value, 0) + " A at -18 °C" : "not known");
  h << "</dl></section>";
  return out;
}

std::string point_title(const HistoryRow& r, const std::string& value) {
  std::string t = time_text(r.taken_at) + ": " + value;
  const std::string flags = flag_words(r.derived.flags);
  if (!flags.empty()) t += " · flagged: " + flags;
  return t;
}

std::string charts(const analytics::HistoryView& view) {
  TimeChart soc{"soc-chart", "State of charge over time, with its uncertainty band", "SOC %", 0, 100, 0, {}};
  TimeChart sg{"sg-chart", "Corrected specific gravity over time", "SG 25/25", 1.100, 1.300, 3, {}};
  if (view.min_corrected_sg) sg.y_min = std::min(sg.y_min, std::floor(*view.min_corrected_sg * 50) / 50);
  if (view.max_corrected_sg) sg.y_max = std::max(sg.y_max, std::ceil(*view.max_corrected_sg * 50) / 50);
  for (const auto& r : view.rows) {
    const auto& d = r.derived;
    const bool flagged = !d.flags.words().empty();
    if (d.soc_percent) {
      const double u = d.soc_uncertainty_percent;
      soc.points.push_back({r.taken_at, *d.soc_percent, *d.soc_percent - u, *d.soc_percent + u, flagged,
                            point_title(r, number(d.soc_percent, 0) + " ± " + number(u, 0) + " % SOC")});
    }
    if (d.corrected_sg)
      sg.points.push_back({r.taken_at, *d.corrected_sg, std::nullopt, std::nullopt, flagged,
                           point_title(r, "SG " + number(d.corrected_sg, 3))});
  }
  std::string out = "<section aria-labelledby=\"trend\"><h2 id=\"trend\">Over time</h2>"
                    "<p class=\"legend\"><span class=\"key-dot\" aria-hidden=\"true\">●</span> reading "
                    "<span class=\"key-flag\" aria-hidden=\"true\">◆</span> flagged reading (hover for why) "
                    "<span class=\"key-band\" aria-hidden=\"true\">▬</span> SOC uncertainty</p>";
  out += "<figure><figcaption>State of charge, % (" + std::to_string(soc.points.size()) + " readings)</figcaption>" +
         time_chart_svg(soc) + "</figure>";
  out += "<figure><figcaption>Corrected SG, 25 °C basis (" + std::to_string(sg.points.size()) +
         " readings with cells)</figcaption>" + time_chart_svg(sg) + "</figure>";
  std::string flagged;
  int flagged_count = 0;
  for (auto it = view.rows.rbegin(); it != view.rows.rend(); ++it) {
    const std::string words = flag_words(it->derived.flags);
    if (words.empty()) continue;
    ++flagged_count;
    flagged += "<li><time>" + time_text(it->taken_at) + "</time> " + escape(words) + "</li>";
  }
  // A short list stays open; a long one (years of rounds) opens on demand.
  constexpr int kOpenUpTo = 12;
  out += flagged.empty() ? "<p>No reading is flagged.</p>"
                         : std::string("<details") + (flagged_count <= kOpenUpTo ? " open" : "") +
                               "><summary>Flagged readings (" + std::to_string(flagged_count) +
                               "), newest first</summary><ul id=\"flagged-list\">" + flagged + "</ul></details>";
  return out + "</section>";
}

std::string cells_section(const analytics::HistoryView& view) {
  std::vector<const HistoryRow*> latest;
  for (auto it = view.rows.rbegin(); it != view.rows.rend() && latest.size() < 3; ++it)
    if (!it->derived.corrected_cell_sg.empty()) latest.push_back(&*it);
  std::string out = "<section aria-labelledby=\"cells\"><h2 id=\"cells\">Cells</h2>";
  if (latest.empty()) return out + "<p>No hydrometer readings yet.</p></section>";
  const auto& newest = latest.front()->derived;
  std::vector<CellBar> bars;
  double lo = 1.300, hi = 1.100;
  for (std::size_t i = 0; i < newest.corrected_cell_sg.size(); ++i) {
    const double sg = newest.corrected_cell_sg[i];
    bars.push_back({static_cast<int>(i + 1), sg, newest.weak_cell == static_cast<int>(i + 1)});
    lo = std::min(lo, sg);
    hi = std::max(hi, sg);
  }
  out += "<figure><figcaption>Corrected SG per cell, " + time_text(latest.front()->taken_at);
  if (newest.weak_cell) out += ": cell " + std::to_string(*newest.weak_cell) + " is weak";
  out += "</figcaption>" +
         cell_chart_svg("cell-chart", "Corrected SG of each cell at the latest reading", bars,
                        std::floor(lo * 20) / 20 - 0.05, std::ceil(hi * 20) / 20) +
         "</figure><table id=\"cell-table\"><caption>Latest readings, corrected SG per cell</caption><thead><tr><th scope=\"col\">Taken</th>";
  for (std::size_t i = 0; i < newest.corrected_cell_sg.size(); ++i)
    out += "<th scope=\"col\">Cell " + std::to_string(i + 1) + "</th>";
  out += "<th scope=\"col\">Spread</th></tr></thead><tbody>";
  for (const auto* r : latest) {
    out += "<tr><th scope=\"row\">" + time_text(r->taken_at) + "</th>";
    for (std::size_t i = 0; i < r->derived.corrected_cell_sg.size(); ++i) {
      const bool weak = r->derived.weak_cell == static_cast<int>(i + 1);
      out += std::string(weak ? "<td class=\"num weak\">" : "<td class=\"num\">") +
             number(r->derived.corrected_cell_sg[i], 3) + (weak ? " weak" : "") + "</td>";
    }
    out += "<td class=\"num\">" + number(r->derived.cell_spread, 3) + "</td></tr>";
  }
  return out + "</tbody></table></section>";
}

std::string events_section(const analytics::HistoryView& view) {
  std::string out = "<section aria-labelledby=\"events\"><h2 id=\"events\">Events</h2>";
  if (view.events.empty()) return out + "<p>None recorded.</p></section>";
  out += "<table id=\"events-table\"><thead><tr><th scope=\"col\">When</th><th scope=\"col\">What</th>"
         "<th scope=\"col\">Detail</th></tr></thead><tbody>";
  for (const auto& e : view.events)
    out += "<tr><td>" + time_text(e.at) + "</td><td>" + std::string(analytics::to_string(e.kind)) + "</td><td>" +
           escape(e.detail) + "</td></tr>";
  return out + "</tbody></table></section>";
}

std::string readings_section(const api::LoadedHistory& loaded) {
  const auto& rows = loaded.view.rows;
  std::string out = "<section aria-labelledby=\"readings\"><h2 id=\"readings\">Readings (" +
                    std::to_string(rows.size()) + "), newest first</h2>"
                    "<table id=\"readings-table\"><thead><tr><th scope=\"col\">Taken (UTC)</th>"
                    "<th scope=\"col\">OCV V</th><th scope=\"col\">Rest h</th><th scope=\"col\">Temp</th>"
                    "<th scope=\"col\">Mean SG raw</th><th scope=\"col\">SG corrected</th>"
                    "<th scope=\"col\">SOC %</th><th scope=\"col\">Flags</th><th scope=\"col\">Note</th></tr></thead><tbody>";
  out.reserve(out.size() + rows.size() * 400);
  for (std::size_t i = rows.size(); i-- > 0;) {
    const auto& r = rows[i];
    const auto& d = r.derived;
    std::string temp = "–";
    if (i < loaded.readings.size() && loaded.readings[i].electrolyte) {
      const auto& e = *loaded.readings[i].electrolyte;
      temp = e.unit == models::wire::TempUnit::f ? number(e.value.value * 9 / 5 + 32, 0) + " °F"
                                                 : number(e.value.value, 1) + " °C";
    }
    const std::string flags = flag_words(d.flags);
    out += "<tr data-reading-id=\"" + (i < loaded.readings.size() ? escape(loaded.readings[i].reading_id) : "") +
           "\"" + (flags.empty() ? "" : " class=\"flagged\"") + "><td>" + time_text(r.taken_at) +
           "</td><td class=\"num\">" + number(r.ocv_v, 2) + "</td><td class=\"num\">" + number(r.rest_h, 1) +
           "</td><td class=\"num\">" + temp + "</td><td class=\"num\">" + number(r.raw_mean_sg, 3) +
           "</td><td class=\"num\">" + number(d.corrected_sg, 3) + "</td><td class=\"num\">" +
           (d.soc_percent ? number(d.soc_percent, 0) + " ± " + number(d.soc_uncertainty_percent, 0) : "–") +
           "</td><td class=\"flags\">" + escape(flags) + "</td><td>" +
           (i < loaded.readings.size() ? escape(loaded.readings[i].note) : "") + "</td></tr>";
  }
  return out + "</tbody></table></section>";
}

}  // namespace

http::Response battery(const PageCall& call) {
  const std::string serial = call.params.at("serial");
  auto b = call.ctx.store.get_battery(serial);
  if (!b || !call.in_scope(b->depot_id)) {
    if (!b && b.error().code != storage::StoreErrc::not_found)
      return message_page(call, 503, "Battery", "The database is unavailable: " + b.error().detail);
    return message_page(call, 404, "Not found", "No battery with serial '" + serial + "'.");
  }
  auto loaded = api::load_history(call.ctx.store, b.value(), std::nullopt, std::nullopt);
  if (!loaded) return message_page(call, 503, "Battery", "The database is unavailable: " + loaded.error().detail);
  const auto& view = loaded->view;

  std::string main;
  if (call.may(kLoggers) && b->status == storage::BatteryStatus::in_service)
    main += "<p><a class=\"button\" href=\"/ui/readings/new?serial=" + url_encode(serial) + "\">Log a reading for " +
            escape(serial) + "</a></p>";
  if (!view.rows.empty() && view.rows.back().derived.flags.has(analytics::Flag::low_soc)) {
    main += "<p class=\"advice\">The latest reading is below the recharge threshold: recharge it fully, then take a "
            "settled reading. <a href=\"#safety\">⚠ safety</a></p>" +
            cautions_box({analytics::kChargeCaution});
  }
  main += details(b.value(), loaded->context) + charts(view) + cells_section(view) + events_section(view) +
          readings_section(loaded.value());
  return html_response(document(call, "Battery " + serial, main));
}

}  // namespace pbfleet::web::pages
