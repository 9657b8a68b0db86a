// GET/POST /ui/sign-in and POST /ui/sign-out.
//
// The token is typed (or pasted) once into a password field and exchanged
// for a session cookie; it is never put back into a page, a URL or browser
// storage. The form carries a nonce that must match a short-lived cookie
// (double submit), so another site cannot sign a browser in as someone else.
#include "server/storage/tokens.hpp"
#include "server/web/form.hpp"
#include "server/web/html.hpp"
#include "server/web/pages/pages.hpp"

namespace pbfleet::web::pages {
namespace {

constexpr std::chrono::seconds kNonceLifetime{600};

// Where to go after signing in: a dashboard path only (never another site).
std::string safe_next(const std::string& next) {
  if (next.starts_with("/ui/") && next.find("//") == std::string::npos &&
      next.find('\\') == std::string::npos)
    return next;
  return "/";
}

http::Response form_page(const PageCall& call, int status, std::string_view error) {
  const std::string nonce = storage::new_raw_token();
  std::string main;
  Html h(main);
  h << "<form class=\"sign-in\" method=\"post\" action=\"/ui/sign-in\">"
       "<p>Paste the token an admin gave you. It is exchanged for a session on this server and is "
       "not kept in this browser.</p>";
  if (!error.empty()) {
    h << "<p class=\"error\" role=\"alert\" id=\"sign-in-error\">";
    h.text(error) << "</p>";
  }
  h << "<label for=\"token\">Token</label><input id=\"token\" name=\"token\" type=\"password\" "
       "autocomplete=\"off\" spellcheck=\"false\" required"
    << (error.empty() ? "" : " aria-describedby=\"sign-in-error\"") << ">"
    << "<input type=\"hidden\" name=\"nonce\" value=\"" << nonce << "\">"
    << "<input type=\"hidden\" name=\"next\" value=\"";
  h.text(safe_next(call.query("next").empty() ? call.field("next") : call.query("next")))
      << "\"><button type=\"submit\">Sign in</button></form>";
  auto r = html_response(document(call, "Sign in", main), status);
  r.headers.emplace_back("Set-Cookie",
                         call.sessions.cookie(kSignInCookie, nonce, kNonceLifetime, "/ui/sign-in"));
  return r;
}

}  // namespace

http::Response sign_in_form(const PageCall& call) {
  if (call.viewer) return redirect("/");
  return form_page(call, 200, {});
}

http::Response sign_in(const PageCall& call) {
  const std::string cookie_nonce =
      cookie_value(call.request.header("cookie"), kSignInCookie);
  if (!same_secret(call.field("nonce"), cookie_nonce))
    return form_page(call, 403, "The sign-in form had expired or came from elsewhere; try again.");
  auto result = call.sessions.sign_in(call.field("token"), call.request.peer);
  if (auto* refused = std::get_if<api::AuthRefusal>(&result)) {
    const int status = refused->kind == api::ProblemKind::too_many_requests     ? 429
                       : refused->kind == api::ProblemKind::storage_unavailable ? 503
                                                                                : 401;
    return form_page(call, status, "Not signed in: " + refused->detail + ".");
  }
  // A session the browser held before is ended: one browser, one session,
  // and never an id chosen before sign-in.
  if (call.viewer) call.sessions.sign_out(*call.viewer);
  auto r = redirect(safe_next(call.field("next")));
  r.headers.emplace_back("Set-Cookie", std::get<SignedIn>(result).cookie);
  r.headers.emplace_back("Set-Cookie", call.sessions.expired_cookie(kSignInCookie, "/ui/sign-in"));
  return r;
}

http::Response sign_out(const PageCall& call) {
  if (call.viewer) call.sessions.sign_out(*call.viewer);
  auto r = redirect("/ui/sign-in");
  r.headers.emplace_back("Set-Cookie", call.sessions.expired_cookie(kSessionCookie));
  return r;
}

}  // namespace pbfleet::web::pages
