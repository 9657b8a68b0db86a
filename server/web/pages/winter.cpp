// GET /ui/winter: the fleet's winter risk for the shop manager. Per depot,
// the counts by level against the low judged at; then every battery, most
// at risk first, with its projected SOC, margins, reasons and the action in
// full. ?low_c= judges at another low (as the report's parameter), ?depot_id=
// and ?level= filter. Numbers come from the same service as
// GET /v1/reports/winter.

#include <algorithm>

#include "models/wire/reading.hpp"
#include "server/api/services/reports.hpp"
#include "server/web/html.hpp"
#include "server/web/pages/filters.hpp"
#include "server/web/pages/pages.hpp"

namespace pbfleet::web::pages {
namespace {

constexpr std::string_view kLevels[] = {"act_now", "watch", "no_data", "ok"};

std::string summary_table(const analytics::WinterReport& report) {
  std::string out;
  Html h(out);
  h << "<table id=\"depot-summary\"><caption>Per depot, at the low each is judged at</caption><thead><tr>"
       "<th scope=\"col\">Depot</th><th scope=\"col\">Low °C</th><th scope=\"col\">Batteries</th>"
       "<th scope=\"col\">" << level_badge("act_now") << "</th><th scope=\"col\">" << level_badge("watch")
    << "</th><th scope=\"col\">" << level_badge("no_data") << "</th><th scope=\"col\">" << level_badge("ok")
    << "</th><th scope=\"col\">Replacements expected</th><th scope=\"col\">Stalest data (days)</th>"
       "</tr></thead><tbody>";
  for (const auto& d : report.depots) {
    h << "<tr data-depot-id=\"" << std::to_string(d.depot_id) << "\"><th scope=\"row\">";
    h.text(d.depot_name) << "</th><td class=\"num low\">" << number(d.low_c, 1) << "</td><td class=\"num batteries\">"
                         << std::to_string(d.batteries) << "</td><td class=\"num act_now\">" << std::to_string(d.act_now)
                         << "</td><td class=\"num watch\">" << std::to_string(d.watch) << "</td><td class=\"num no_data\">"
                         << std::to_string(d.no_data) << "</td><td class=\"num ok\">" << std::to_string(d.ok)
                         << "</td><td class=\"num\">" << std::to_string(d.expected_replacements)
                         << "</td><td class=\"num\">" << number(d.oldest_data_days, 0) << "</td></tr>";
  }
  h << "</tbody></table>";
  return out;
}

std::string risk_table(const std::vector<const analytics::WinterRisk*>& rows, std::size_t total) {
  std::string out;
  Html h(out);
  h << "<p class=\"count\">" << std::to_string(rows.size()) << " of " << std::to_string(total)
    << " batteries shown, most at risk first.</p>"
       "<table id=\"risk-list\"><thead><tr><th scope=\"col\">Level</th><th scope=\"col\">Battery</th>"
       "<th scope=\"col\">Depot</th><th scope=\"col\">Vehicle</th><th scope=\"col\">Projected SOC %</th>"
       "<th scope=\"col\">Crank margin</th><th scope=\"col\">Freeze margin °C</th><th scope=\"col\">Why</th>"
       "<th scope=\"col\">What to do</th></tr></thead><tbody>";
  for (const auto* r : rows) {
    h << "<tr data-serial=\"";
    h.text(r->serial) << "\" data-level=\"" << analytics::to_string(r->level) << "\"><td>"
                      << level_badge(analytics::to_string(r->level)) << "</td><td><a href=\"/ui/batteries/"
                      << url_encode(r->serial) << "\">";
    h.text(r->serial) << "</a></td><td data-label=\"Depot\">";
    h.text(r->depot_name) << "</td><td data-label=\"Vehicle\">";
    h.text(r->vehicle_code) << "</td><td class=\"num soc\" data-label=\"Projected SOC %\">"
                            << number(r->projected_soc_percent, 0)
                            << "</td><td class=\"num crank\" data-label=\"Crank margin\">" << number(r->crank_margin, 2)
                            << "</td><td class=\"num freeze\" data-label=\"Freeze margin °C\">"
                            << number(r->freeze_margin_c, 1) << "</td><td class=\"reasons\" data-label=\"Why\">";
    for (std::size_t i = 0; i < r->reasons.size(); ++i) {
      if (i) h << "<br>";
      h.text(r->reasons[i]);
    }
    h << "</td><td class=\"action\" data-label=\"What to do\">";
    h.text(r->action);
    if (!r->cautions.empty()) h << " <a class=\"see-safety\" href=\"#safety\">⚠ safety</a>";
    h << "</td></tr>";
  }
  h << "</tbody></table>";
  return out;
}

}  // namespace

http::Response winter(const PageCall& call) {
  std::vector<std::string> errors;
  const auto depot = depot_filter(call, errors);
  analytics::ColdSpec cold;
  cold.cold_date = std::chrono::floor<std::chrono::days>(call.ctx.clock.now());
  const std::string low_text = call.query("low_c");
  if (!low_text.empty()) {
    auto t = models::wire::parse_temperature(low_text, "low_c");
    if (t) {
      cold.low = t->value;
    } else {
      errors.push_back("Low temperature: " + t.error().detail + " (accepted: " + t.error().allowed + ")");
    }
  }
  std::string level = call.query("level");
  if (!level.empty() && std::find(std::begin(kLevels), std::end(kLevels), level) == std::end(kLevels)) {
    errors.push_back("Level: not one of act_now, watch, no_data, ok");
    level.clear();
  }
  if (!errors.empty()) cold.low.reset();
  auto cached = api::cached_winter_report(call.ctx.reports, call.ctx.store, depot, cold, call.ctx.clock.now());
  if (!cached) return message_page(call, 503, "Winter risk", "The database is unavailable: " + cached.error().detail);
  const std::shared_ptr<const analytics::WinterReport> report = *cached;

  std::vector<const analytics::WinterRisk*> rows;
  std::vector<std::string_view> cautions;
  for (const auto& r : report->batteries) {
    if (!level.empty() && analytics::to_string(r.level) != level) continue;
    rows.push_back(&r);
    cautions.insert(cautions.end(), r.cautions.begin(), r.cautions.end());
  }

  std::string main;
  Html h(main);
  h << "<form class=\"filters\" method=\"get\" action=\"/ui/winter\">"
    << "<label for=\"low_c\">Judge at low</label><input id=\"low_c\" name=\"low_c\" size=\"8\" "
       "placeholder=\"depot's own\" aria-describedby=\"low-help\" value=\"";
  h.text(errors.empty() ? low_text : "") << "\"><span id=\"low-help\" class=\"help\">°C, or add F (e.g. -13F); empty: each depot's design low</span>"
    << depot_select(call, depot) << "<label for=\"level\">Level</label><select id=\"level\" name=\"level\">"
    << "<option value=\"\">all</option>";
  for (auto l : kLevels) {
    h << "<option value=\"" << l << "\"" << (level == l ? " selected" : "") << ">";
    h.text(l == "act_now" ? "act now" : l == "no_data" ? "no data" : l) << "</option>";
  }
  h << "</select><button type=\"submit\">Show</button></form>";
  for (const auto& e : errors) {
    h << "<p class=\"error\" role=\"alert\">";
    h.text(e) << "</p>";
  }
  h << "<p>Cold date " << date_text(report->cold_date)
    << ". A battery is judged from its latest trusted reading, its SOC projected to the cold date.</p>";
  h << summary_table(*report) << cautions_box(cautions) << risk_table(rows, report->batteries.size());
  return html_response(document(call, "Winter risk", main));
}

}  // namespace pbfleet::web::pages
