// Dashboard sign-in: a token is presented once on the sign-in page and
// exchanged for a session. The browser keeps only a random session id in an
// HttpOnly, SameSite=Strict cookie (Secure when served through TLS); the
// store keeps only its SHA-256, the token's id and a per-session CSRF
// secret. A session ends at sign-out, after its lifetime, or as soon as its
// token is revoked or expires (both checked on every request, in the
// database, so every pbfleetd on one database agrees).
#pragma once

#include <chrono>
#include <optional>
#include <string>
#include <string_view>
#include <variant>

#include "server/api/auth.hpp"
#include "server/api/context.hpp"
#include "server/http/message.hpp"

namespace pbfleet::web {

inline constexpr std::string_view kSessionCookie = "pbfleet_session";
// Double-submit nonce of the sign-in form (login CSRF), valid 10 minutes.
inline constexpr std::string_view kSignInCookie = "pbfleet_signin";

struct DashboardOptions {
  // How long a session lasts at most: a working day and a bit.
  std::chrono::hours session_lifetime{12};
  // Set when a TLS proxy fronts pbfleetd (config `secure_cookies`): cookies
  // then carry Secure and are never sent over plain HTTP.
  bool secure_cookies = false;
};

// A signed-in browser: who it acts as and the secret its forms must carry.
struct Viewer {
  api::Caller caller;
  std::string csrf;
  storage::TokenHash session;
};

struct SignedIn {
  Viewer viewer;
  std::string cookie;  // Set-Cookie value for the new session
};

class Sessions {
 public:
  Sessions(api::Context& ctx, DashboardOptions options) : ctx_(ctx), options_(options) {}

  // Opens a new session for a raw token presented from `peer`; never reuses
  // a session id the browser already had (no fixation).
  std::variant<SignedIn, api::AuthRefusal> sign_in(std::string_view raw_token,
                                                   const std::string& peer);
  // The viewer of the request's session cookie, or nullopt when there is
  // none or it ended (signed out, expired, token revoked or expired).
  std::optional<Viewer> viewer(const http::Request& request);
  // Ends the viewer's session on the server.
  void sign_out(const Viewer& viewer);

  // Set-Cookie values.
  [[nodiscard]] std::string cookie(std::string_view name, std::string_view value,
                                   std::chrono::seconds max_age, std::string_view path = "/") const;
  [[nodiscard]] std::string expired_cookie(std::string_view name, std::string_view path = "/") const;

  [[nodiscard]] const DashboardOptions& options() const { return options_; }

 private:
  api::Context& ctx_;
  DashboardOptions options_;
};

// Constant-time comparison of two secrets (lengths may differ).
[[nodiscard]] bool same_secret(std::string_view a, std::string_view b);

}  // namespace pbfleet::web
