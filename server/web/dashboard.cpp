#include "server/web/dashboard.hpp"

#include <span>

#include "server/web/assets.hpp"
#include "server/web/form.hpp"
#include "server/web/html.hpp"
#include "server/web/pages/pages.hpp"

namespace pbfleet::web {
namespace {

using Handler = http::Response (*)(const PageCall&);

struct PageRoute {
  std::string_view method;
  std::string_view pattern;
  api::RoleSet roles;  // kPublic: no session needed
  Handler handler;
};

constexpr PageRoute kRoutes[] = {
    {"GET", "/ui/sign-in", api::kPublic, &pages::sign_in_form},
    {"POST", "/ui/sign-in", api::kPublic, &pages::sign_in},
    {"POST", "/ui/sign-out", kReaders, &pages::sign_out},
    {"GET", "/ui/winter", kPlanners, &pages::winter},
    {"GET", "/ui/batteries", kReaders, &pages::batteries},
    {"GET", "/ui/batteries/{serial}", kReaders, &pages::battery},
    {"GET", "/ui/trends", kPlanners, &pages::trends},
    {"GET", "/ui/overdue", kReaders, &pages::overdue},
    {"GET", "/ui/readings/new", kLoggers, &pages::reading_form},
    {"POST", "/ui/readings", kLoggers, &pages::reading_submit},
};

// Matches "/ui/batteries/{serial}" against a path; fills `params`.
bool matches(std::string_view pattern, std::string_view path,
             std::map<std::string, std::string>* params) {
  while (!pattern.empty() && !path.empty()) {
    const auto pslash = pattern.find('/', 1), tslash = path.find('/', 1);
    const auto pseg = pattern.substr(0, pslash), tseg = path.substr(0, tslash);
    if (pseg.size() > 2 && pseg[1] == '{') {
      if (tseg.size() < 2) return false;
      if (params) (*params)[std::string(pseg.substr(2, pseg.size() - 3))] = std::string(tseg.substr(1));
    } else if (pseg != tseg) {
      return false;
    }
    pattern = pslash == std::string_view::npos ? std::string_view{} : pattern.substr(pslash);
    path = tslash == std::string_view::npos ? std::string_view{} : path.substr(tslash);
  }
  return pattern.empty() && path.empty();
}

http::Response plain(int status, std::string_view text) {
  http::Response r;
  r.status = status;
  r.content_type = "text/plain; charset=utf-8";
  r.body = std::string(text) + "\n";
  return r;
}

http::Response asset_response(const http::Request& request, const api::Target& target) {
  const Asset* asset = find_asset(target.path);
  if (!asset) return plain(404, "no such file");
  if (request.method != "GET" && request.method != "HEAD") return plain(405, "GET only");
  http::Response r;
  r.headers.emplace_back("ETag", std::string(asset->etag));
  // A versioned address (?v=<etag>, as the pages link) never changes: cache
  // it for a year; the bare address is revalidated every time.
  const auto v = target.query.find("v");
  std::string etag(asset->etag);
  std::erase(etag, '"');
  r.headers.emplace_back("Cache-Control", v != target.query.end() && v->second == etag
                                              ? "public, max-age=31536000, immutable"
                                              : "no-cache");
  r.content_type = std::string(asset->content_type);
  if (request.header("if-none-match") == asset->etag) {
    r.status = 304;
    return r;
  }
  if (request.method == "GET") r.body = std::string(asset->body);
  return r;
}

// The Origin header, when a browser sent one, must be this server's.
bool same_origin(const http::Request& request) {
  const std::string_view origin = request.header("origin");
  if (origin.empty()) return true;  // SameSite=Strict and the CSRF field still apply
  const std::string_view host = request.header("host");
  return origin == "http://" + std::string(host) || origin == "https://" + std::string(host);
}

}  // namespace

void add_security_headers(http::Response& r) {
  r.headers.emplace_back("Content-Security-Policy",
                         "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self'; "
                         "form-action 'self'; base-uri 'none'; frame-ancestors 'none'");
  r.headers.emplace_back("X-Content-Type-Options", "nosniff");
  // same-origin, not no-referrer: under no-referrer a browser sends "Origin: null"
  // with form posts, and the Origin check would refuse our own forms.
  r.headers.emplace_back("Referrer-Policy", "same-origin");
  r.headers.emplace_back("X-Frame-Options", "DENY");
  r.headers.emplace_back("Cross-Origin-Opener-Policy", "same-origin");
}

Dashboard::Dashboard(api::Context& ctx, DashboardOptions options)
    : ctx_(ctx), sessions_(ctx, options) {}

std::string_view Dashboard::route_of(std::string_view path) const {
  if (path == "/") return "/";
  if (path.starts_with("/assets/")) return "/assets/{file}";
  if (path != "/ui" && !path.starts_with("/ui/")) return {};
  for (const auto& r : kRoutes)
    if (matches(r.pattern, path, nullptr)) return r.pattern;
  return "/ui/unknown";
}

http::Response Dashboard::serve(const http::Request& request, const api::Target& target) {
  http::Response r = target.path.starts_with("/assets/") ? asset_response(request, target)
                                                         : route(request, target);
  add_security_headers(r);
  return r;
}

http::Response Dashboard::route(const http::Request& request, const api::Target& target) {
  auto viewer = sessions_.viewer(request);
  PageCall call{request, target, {}, {}, viewer ? &*viewer : nullptr, ctx_, sessions_};
  if (target.path == "/" || target.path == "/ui" || target.path == "/ui/") {
    if (!viewer) return redirect("/ui/sign-in");
    return redirect(call.may(kPlanners) ? "/ui/winter" : "/ui/batteries");
  }
  const PageRoute* found = nullptr;
  bool path_known = false;
  for (const auto& r : kRoutes) {
    std::map<std::string, std::string> params;
    if (!matches(r.pattern, target.path, &params)) continue;
    path_known = true;
    if (r.method == request.method) {
      found = &r;
      call.params = std::move(params);
      break;
    }
  }
  if (!found) {
    if (path_known) return message_page(call, 405, "Not allowed", "This page does not take that method.");
    return message_page(call, 404, "Not found", "There is no such page.");
  }
  if (found->roles != api::kPublic) {
    if (!viewer) {
      if (request.method != "GET") return message_page(call, 401, "Signed out", "Your session has ended; sign in again.");
      return redirect("/ui/sign-in?next=" + url_encode(request.target));
    }
    if (!call.may(found->roles))
      return message_page(call, 403, "Not for your role",
                          "Your token's role may not open this page. Ask an admin for a token with the right role.");
  }
  if (request.method == "POST") {
    bool ok = true;
    call.form = parse_form(request.body, &ok);
    if (!ok) return message_page(call, 400, "Bad form", "The form arrived garbled; reload the page and try again.");
    if (!same_origin(request))
      return message_page(call, 403, "Refused", "The form came from another site.");
    // Pages behind a session need its CSRF secret; the sign-in form has its
    // own nonce instead (checked by the page).
    if (found->roles != api::kPublic && !same_secret(call.field("csrf"), viewer->csrf))
      return message_page(call, 403, "Refused",
                          "The form's security code does not match your session; reload the page and try again.");
  }
  return found->handler(call);
}

}  // namespace pbfleet::web
