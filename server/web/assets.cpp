#include "server/web/assets.hpp"

#include <algorithm>

namespace pbfleet::web {

const Asset* find_asset(std::string_view path) {
  const auto all = embedded_assets();
  const auto it = std::find_if(all.begin(), all.end(), [&](const Asset& a) { return a.path == path; });
  return it == all.end() ? nullptr : &*it;
}

}  // namespace pbfleet::web
