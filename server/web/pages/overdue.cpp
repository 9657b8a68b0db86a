// GET /ui/overdue: batteries without a reading for longer than the round
// allows, per depot, longest silence first (GET /v1/reports/overdue).
#include "models/analytics/history.hpp"
#include "server/api/services/reports.hpp"
#include "server/web/html.hpp"
#include "server/web/pages/filters.hpp"
#include "server/web/pages/pages.hpp"

namespace pbfleet::web::pages {

http::Response overdue(const PageCall& call) {
  std::vector<std::string> errors;
  const auto depot = depot_filter(call, errors);
  const int days = analytics::AnalyticsSettings{}.overdue_days;
  auto report = api::cached_overdue_report(call.ctx.reports, call.ctx.store, depot, call.ctx.clock.now(), days);
  if (!report) return message_page(call, 503, "Overdue readings", "The database is unavailable; try again shortly.");
  std::string main;
  Html h(main);
  h << "<form class=\"filters\" method=\"get\" action=\"/ui/overdue\">" << depot_select(call, depot)
    << "<button type=\"submit\">Show</button></form><p>A battery is overdue after " << std::to_string(days)
    << " days without a reading.</p>";
  for (const auto& e : errors) {
    h << "<p class=\"error\" role=\"alert\">";
    h.text(e) << "</p>";
  }
  for (const auto& d : **report) {
    h << "<section class=\"depot\" data-depot-id=\"" << std::to_string(d.depot_id) << "\"><h2>";
    h.text(d.depot_name) << " (" << std::to_string(d.batteries.size()) << " overdue)</h2>";
    if (d.batteries.empty()) {
      h << "<p>Every battery has a recent reading.</p></section>";
      continue;
    }
    h << "<table><thead><tr><th scope=\"col\">Battery</th><th scope=\"col\">Vehicle</th>"
         "<th scope=\"col\">Last reading</th></tr></thead><tbody>";
    for (const auto& b : d.batteries) {
      h << "<tr><td><a href=\"/ui/batteries/" << url_encode(b.serial) << "\">";
      h.text(b.serial) << "</a></td><td>";
      h.text(b.vehicle_code) << "</td><td>" << (b.last_reading ? date_text(*b.last_reading) : "never") << "</td></tr>";
    }
    h << "</tbody></table></section>";
  }
  return html_response(document(call, "Overdue readings", main));
}

}  // namespace pbfleet::web::pages
