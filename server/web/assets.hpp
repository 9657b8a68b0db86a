// The dashboard's static files (stylesheet, script, icon), embedded at build
// time from server/web/assets by embed_assets.cmake.
#pragma once

#include <span>
#include <string_view>

namespace pbfleet::web {

struct Asset {
  std::string_view path;          // "/assets/dashboard.css"
  std::string_view content_type;  // "text/css; charset=utf-8"
  std::string_view etag;          // quoted, from the content's SHA-256
  std::string_view body;
};

// Every embedded asset, sorted by path.
std::span<const Asset> embedded_assets();

// The asset at `path`, or nullptr.
const Asset* find_asset(std::string_view path);

}  // namespace pbfleet::web
