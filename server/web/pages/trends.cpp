// GET /ui/trends: batteries showing sulfation, and the replacement forecast
// with its band (earliest to latest), for the shop manager. Same services
// as GET /v1/reports/sulfation and /v1/reports/replacements.
#include "server/api/services/reports.hpp"
#include "server/web/html.hpp"
#include "server/web/pages/filters.hpp"
#include "server/web/pages/pages.hpp"

namespace pbfleet::web::pages {
namespace {

std::string sulfation_table(const std::vector<analytics::SulfationAssessment>& all,
                            std::vector<std::string_view>& cautions) {
  std::string out;
  Html h(out);
  h << "<section aria-labelledby=\"sulfation\"><h2 id=\"sulfation\">Sulfation</h2>"
       "<table id=\"sulfation-list\"><thead><tr><th scope=\"col\">Battery</th><th scope=\"col\">Depot</th>"
       "<th scope=\"col\">Stage</th><th scope=\"col\">Undercharged days</th><th scope=\"col\">Weak cell</th>"
       "<th scope=\"col\">Why</th><th scope=\"col\">What to do</th></tr></thead><tbody>";
  int shown = 0;
  for (const auto& a : all) {
    if (a.level == analytics::SulfationClass::none) continue;
    ++shown;
    cautions.insert(cautions.end(), a.cautions.begin(), a.cautions.end());
    h << "<tr data-serial=\"";
    h.text(a.serial) << "\"><td><a href=\"/ui/batteries/" << url_encode(a.serial) << "\">";
    h.text(a.serial) << "</a></td><td>";
    h.text(a.depot_name) << "</td><td>";
    std::string stage(analytics::to_string(a.level));
    std::replace(stage.begin(), stage.end(), '_', ' ');
    h.text(stage) << "</td><td class=\"num\">" << number(a.undercharge_days, 0) << " of "
                  << std::to_string(a.exposure_window_days) << "</td><td class=\"num\">"
                  << (a.weak_cell ? std::to_string(*a.weak_cell) : "–") << "</td><td>";
    for (std::size_t i = 0; i < a.reasons.size(); ++i) {
      if (i) h << "<br>";
      h.text(a.reasons[i]);
    }
    h << "</td><td>";
    for (std::size_t i = 0; i < a.actions.size(); ++i) {
      std::string act(analytics::to_string(a.actions[i]));
      std::replace(act.begin(), act.end(), '_', ' ');
      h << (i ? ", then " : "");
      h.text(act);
    }
    if (!a.cautions.empty()) h << " <a class=\"see-safety\" href=\"#safety\">⚠ safety</a>";
    h << "</td></tr>";
  }
  h << "</tbody></table><p class=\"count\">" << std::to_string(shown) << " of " << std::to_string(all.size())
    << " batteries show signs of sulfation.</p></section>";
  return out;
}

std::string replacement_table(const std::vector<analytics::ReplacementForecast>& all) {
  std::string out;
  Html h(out);
  h << "<section aria-labelledby=\"replace\"><h2 id=\"replace\">Replacement forecast</h2>"
       "<p>The date is where the full-charge SG trend crosses the battery's threshold; the band runs from the "
       "steeper to the shallower end of the trend's confidence interval.</p>"
       "<table id=\"replacement-list\"><thead><tr><th scope=\"col\">Battery</th><th scope=\"col\">Depot</th>"
       "<th scope=\"col\">Criterion</th><th scope=\"col\">Earliest</th><th scope=\"col\">Expected</th>"
       "<th scope=\"col\">Latest</th><th scope=\"col\">Basis</th></tr></thead><tbody>";
  for (const auto& f : all) {
    if (!f.date && !f.already_crossed) continue;
    h << "<tr data-serial=\"";
    h.text(f.serial) << "\"><td><a href=\"/ui/batteries/" << url_encode(f.serial) << "\">";
    h.text(f.serial) << "</a></td><td>";
    h.text(f.depot_name) << "</td><td>" << analytics::to_string(f.criterion) << "</td><td>"
                         << (f.earliest ? date_text(*f.earliest) : "–") << "</td><td>"
                         << (f.already_crossed ? "now" : f.date ? date_text(*f.date) : "–") << "</td><td>"
                         << (f.latest ? date_text(*f.latest) : "not in sight") << "</td><td>";
    h.text(f.reason) << "</td></tr>";
  }
  h << "</tbody></table></section>";
  return out;
}

}  // namespace

http::Response trends(const PageCall& call) {
  std::vector<std::string> errors;
  const auto depot = depot_filter(call, errors);
  const auto now = call.ctx.clock.now();
  auto sulfation = api::cached_sulfation_report(call.ctx.reports, call.ctx.trends, call.ctx.store, depot, now);
  auto replacement = api::cached_replacement_report(call.ctx.reports, call.ctx.trends, call.ctx.store, depot, now);
  if (!sulfation || !replacement)
    return message_page(call, 503, "Sulfation and replacement", "The database is unavailable; try again shortly.");
  std::vector<std::string_view> cautions;
  std::string sulfation_html = sulfation_table(**sulfation, cautions);
  std::string main = "<form class=\"filters\" method=\"get\" action=\"/ui/trends\">" + depot_select(call, depot) +
                     "<button type=\"submit\">Show</button></form>";
  for (const auto& e : errors) main += "<p class=\"error\" role=\"alert\">" + escape(e) + "</p>";
  main += cautions_box(cautions) + sulfation_html + replacement_table(**replacement);
  return html_response(document(call, "Sulfation and replacement", main));
}

}  // namespace pbfleet::web::pages
