#include "server/web/page.hpp"

#include <algorithm>

#include "server/web/assets.hpp"
#include "server/web/html.hpp"

namespace pbfleet::web {

std::string PageCall::query(const std::string& name) const {
  auto it = target.query.find(name);
  return it == target.query.end() ? std::string{} : it->second;
}

std::string PageCall::field(const std::string& name) const {
  auto it = form.find(name);
  return it == form.end() ? std::string{} : it->second;
}

bool PageCall::in_scope(std::optional<storage::Id> depot) const {
  return viewer && (!viewer->caller.depot_id || viewer->caller.depot_id == depot);
}

bool PageCall::may(api::RoleSet roles) const {
  return viewer && (roles & api::role_bit(viewer->caller.role)) != 0;
}

namespace {

// An asset's address with its ETag as version, so it can be cached for good.
std::string asset_url(std::string_view path) {
  const Asset* a = find_asset(path);
  std::string url(path);
  if (a) {
    std::string v(a->etag);
    std::erase(v, '"');
    url += "?v=" + v;
  }
  return url;
}

struct NavItem {
  std::string_view href;
  std::string_view text;
  api::RoleSet roles;
};

constexpr NavItem kNav[] = {
    {"/ui/winter", "Winter risk", kPlanners},
    {"/ui/batteries", "Batteries", kReaders},
    {"/ui/trends", "Sulfation and replacement", kPlanners},
    {"/ui/overdue", "Overdue readings", kReaders},
    {"/ui/readings/new", "Log a reading", kLoggers},
};

}  // namespace

std::string document(const PageCall& call, std::string_view title, std::string_view main) {
  std::string out;
  out.reserve(main.size() + 2048);
  Html h(out);
  h << "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
       "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
       "<title>";
  h.text(title) << " · pbfleet</title><link rel=\"stylesheet\" href=\"" << asset_url("/assets/dashboard.css")
                << "\"><link rel=\"icon\" href=\"" << asset_url("/assets/icon.svg")
                << "\"><script src=\"" << asset_url("/assets/dashboard.js")
                << "\" defer></script></head><body>"
                   "<a class=\"skip\" href=\"#main\">Skip to content</a><header><span class=\"brand\">pbfleet</span>";
  if (call.viewer) {
    h << "<nav aria-label=\"Pages\"><ul>";
    for (const auto& item : kNav) {
      if (!call.may(item.roles)) continue;
      const bool here = call.target.path.starts_with(item.href);
      h << "<li><a href=\"" << item.href << "\"" << (here ? " aria-current=\"page\"" : "") << ">"
        << item.text << "</a></li>";
    }
    h << "</ul></nav><form class=\"who\" method=\"post\" action=\"/ui/sign-out\">"
      << csrf_field(call) << "<span>";
    h.text(call.viewer->caller.token_name) << " (" << storage::to_string(call.viewer->caller.role);
    if (call.viewer->caller.depot_id) h << ", depot " << std::to_string(*call.viewer->caller.depot_id);
    h << ")</span> <button type=\"submit\">Sign out</button></form>";
  }
  h << "</header><main id=\"main\"><h1>";
  h.text(title) << "</h1>" << main
                << "</main><footer>Times are UTC. SOC and margins are estimates from the readings; "
                   "judge them with the battery in front of you.</footer></body></html>\n";
  return out;
}

http::Response html_response(std::string body, int status) {
  http::Response r;
  r.status = status;
  r.content_type = "text/html; charset=utf-8";
  r.body = std::move(body);
  r.headers.emplace_back("Cache-Control", "no-store");
  return r;
}

http::Response redirect(std::string_view location) {
  http::Response r;
  r.status = 303;
  r.content_type = "text/plain; charset=utf-8";
  r.headers.emplace_back("Location", std::string(location));
  r.headers.emplace_back("Cache-Control", "no-store");
  r.body = "see " + std::string(location) + "\n";
  return r;
}

http::Response message_page(const PageCall& call, int status, std::string_view title,
                            std::string_view text) {
  std::string main = "<p class=\"message\">" + escape(text) + "</p>";
  return html_response(document(call, title, main), status);
}

std::string csrf_field(const PageCall& call) {
  if (!call.viewer) return {};
  return "<input type=\"hidden\" name=\"csrf\" value=\"" + escape(call.viewer->csrf) + "\">";
}

std::string level_badge(std::string_view level) {
  struct Word {
    std::string_view level, shape, text;
  };
  static constexpr Word kWords[] = {{"act_now", "▲", "act now"},
                                    {"watch", "◆", "watch"},
                                    {"no_data", "○", "no data"},
                                    {"ok", "●", "ok"}};
  for (const auto& w : kWords)
    if (w.level == level)
      return "<span class=\"level level-" + std::string(w.level) + "\"><span aria-hidden=\"true\">" +
             std::string(w.shape) + "</span> " + std::string(w.text) + "</span>";
  return escape(level);
}

std::string cautions_box(const std::vector<std::string_view>& cautions) {
  std::vector<std::string_view> once;
  for (auto c : cautions)
    if (std::find(once.begin(), once.end(), c) == once.end()) once.push_back(c);
  if (once.empty()) return {};
  std::string out = "<aside class=\"caution\" id=\"safety\" aria-label=\"Safety\"><h2>⚠ Safety</h2>";
  for (auto c : once) out += "<p>" + escape(c) + "</p>";
  out += "</aside>";
  return out;
}

}  // namespace pbfleet::web
