// GET /ui/batteries: find a battery by serial, or list a depot's batteries.
// ?serial= goes straight to that battery's page; ?depot_id= and ?after=
// (the store's cursor) page through the list.
#include "server/web/html.hpp"
#include "server/web/pages/filters.hpp"
#include "server/web/pages/pages.hpp"

namespace pbfleet::web::pages {

http::Response batteries(const PageCall& call) {
  const std::string serial = call.query("serial");
  if (!serial.empty()) return redirect("/ui/batteries/" + url_encode(serial));
  std::vector<std::string> errors;
  const auto depot = depot_filter(call, errors);
  storage::BatteryFilter filter;
  filter.depot_id = depot;
  filter.status = storage::BatteryStatus::in_service;
  auto page = call.ctx.store.list_batteries(filter, {.limit = storage::kMaxPageLimit, .cursor = call.query("after")});
  if (!page) {
    if (page.error().code == storage::StoreErrc::invalid)
      return message_page(call, 400, "Batteries", "That page of the list does not exist; start again.");
    return message_page(call, 503, "Batteries", "The database is unavailable: " + page.error().detail);
  }
  std::string main;
  Html h(main);
  h << "<form class=\"filters\" method=\"get\" action=\"/ui/batteries\"><label for=\"serial\">Serial</label>"
       "<input id=\"serial\" name=\"serial\" autocomplete=\"off\" spellcheck=\"false\"><button type=\"submit\">Open</button></form>"
       "<form class=\"filters\" method=\"get\" action=\"/ui/batteries\">"
    << depot_select(call, depot) << "<button type=\"submit\">List</button></form>";
  for (const auto& e : errors) {
    h << "<p class=\"error\" role=\"alert\">";
    h.text(e) << "</p>";
  }
  h << "<table id=\"battery-list\"><thead><tr><th scope=\"col\">Serial</th><th scope=\"col\">Type</th>"
       "<th scope=\"col\">Rated CCA</th><th scope=\"col\">Installed</th></tr></thead><tbody>";
  for (const auto& b : page->items) {
    h << "<tr><td><a href=\"/ui/batteries/" << url_encode(b.serial) << "\">";
    h.text(b.serial) << "</a></td><td>" << models::to_string(b.chemistry) << " " << number(b.nominal_v.value, 0)
                     << " V</td><td class=\"num\">" << number(b.rated_cca_a.value, 0) << " A</td><td>"
                     << date_text(b.installed_on) << "</td></tr>";
  }
  h << "</tbody></table>";
  if (!page->next_cursor.empty()) {
    h << "<p><a href=\"/ui/batteries?after=" << url_encode(page->next_cursor);
    if (depot) h << "&amp;depot_id=" << std::to_string(*depot);
    h << "\">Next page</a></p>";
  }
  return html_response(document(call, "Batteries", main));
}

}  // namespace pbfleet::web::pages
