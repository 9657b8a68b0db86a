// The depot filter most pages share: ?depot_id= narrowed to the viewer's
// depot when their token is scoped, and the <select> that sets it.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "server/web/page.hpp"

namespace pbfleet::web::pages {

// A positive whole number, or nullopt.
std::optional<storage::Id> parse_id(const std::string& text);

// The depot to show (nullopt: all the viewer may see). A bad or out-of-scope
// ?depot_id= adds a sentence to `errors` and falls back to the scope.
std::optional<storage::Id> depot_filter(const PageCall& call, std::vector<std::string>& errors);

// <label> and <select name="depot_id"> of the depots the viewer may see.
std::string depot_select(const PageCall& call, std::optional<storage::Id> selected);

}  // namespace pbfleet::web::pages
