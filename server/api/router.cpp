#include "server/api/router.hpp"

namespace pbfleet::api {

std::string_view produced_types(const Route& route) {
  return route.produces.empty() ? std::string_view("application/json") : route.produces;
}

namespace {

std::vector<std::string_view> split_path(std::string_view path) {
  std::vector<std::string_view> parts;
  while (!path.empty()) {
    if (path.front() == '/') {
      path.remove_prefix(1);
      continue;
    }
    auto slash = path.find('/');
    parts.push_back(path.substr(0, slash));
    path = slash == std::string_view::npos ? std::string_view{} : path.substr(slash);
  }
  return parts;
}

bool is_capture(std::string_view part) {
  return part.size() > 2 && part.front() == '{' && part.back() == '}';
}

// Matches path segments against a pattern's, capturing {names}.
bool matches(const std::vector<std::string_view>& pattern,
             const std::vector<std::string_view>& path,
             std::map<std::string, std::string>& params) {
  if (pattern.size() != path.size()) return false;
  std::map<std::string, std::string> captured;
  for (std::size_t i = 0; i < pattern.size(); ++i) {
    if (is_capture(pattern[i])) {
      captured[std::string(pattern[i].substr(1, pattern[i].size() - 2))] = std::string(path[i]);
    } else if (pattern[i] != path[i]) {
      return false;
    }
  }
  params = std::move(captured);
  return true;
}

}  // namespace

Match match_route(std::span<const Route> table, std::string_view method, std::string_view path) {
  Match result;
  const auto segments = split_path(path);
  for (const Route& route : table) {
    std::map<std::string, std::string> params;
    if (!matches(split_path(route.pattern), segments, params)) continue;
    result.allowed.push_back(route.method);
    if (route.method == method && !result.route) {
      result.route = &route;
      result.params = std::move(params);
    }
  }
  return result;
}

}  // namespace pbfleet::api
