#include "server/web/pages/filters.hpp"

#include <charconv>

#include "server/web/html.hpp"

namespace pbfleet::web::pages {

std::optional<storage::Id> parse_id(const std::string& text) {
  storage::Id id = 0;
  const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), id);
  if (ec != std::errc{} || end != text.data() + text.size() || id <= 0) return std::nullopt;
  return id;
}

std::optional<storage::Id> depot_filter(const PageCall& call, std::vector<std::string>& errors) {
  const auto scope = call.viewer ? call.viewer->caller.depot_id : std::nullopt;
  const std::string text = call.query("depot_id");
  if (text.empty()) return scope;
  const auto id = parse_id(text);
  if (!id) {
    errors.push_back("Depot: not a depot id");
    return scope;
  }
  if (scope && *id != *scope) {
    errors.push_back("Depot: outside your token's depot");
    return scope;
  }
  return id;
}

std::string depot_select(const PageCall& call, std::optional<storage::Id> selected) {
  std::string out;
  Html h(out);
  h << "<label for=\"depot_id\">Depot</label><select id=\"depot_id\" name=\"depot_id\">";
  const auto scope = call.viewer ? call.viewer->caller.depot_id : std::nullopt;
  if (!scope) h << "<option value=\"\">all depots</option>";
  auto depots = call.ctx.store.list_depots({.limit = storage::kMaxPageLimit, .cursor = {}});
  if (depots) {
    for (const auto& d : depots->items) {
      if (scope && d.id != *scope) continue;
      h << "<option value=\"" << std::to_string(d.id) << "\"" << (selected == d.id ? " selected" : "") << ">";
      h.text(d.name) << "</option>";
    }
  }
  h << "</select>";
  return out;
}

}  // namespace pbfleet::web::pages
