#include "server/web/sessions.hpp"

#include <openssl/crypto.h>
#include <spdlog/spdlog.h>

#include "server/storage/tokens.hpp"
#include "server/web/form.hpp"

namespace pbfleet::web {

bool same_secret(std::string_view a, std::string_view b) {
  return a.size() == b.size() && !a.empty() && CRYPTO_memcmp(a.data(), b.data(), a.size()) == 0;
}

std::variant<SignedIn, api::AuthRefusal> Sessions::sign_in(std::string_view raw_token,
                                                           const std::string& peer) {
  auto checked = ctx_.auth.check_token(raw_token, peer);
  if (auto* refused = std::get_if<api::AuthRefusal>(&checked)) return *refused;
  const api::Caller caller = std::get<api::Caller>(checked);
  const std::string id = storage::new_raw_token();
  const std::string csrf = storage::new_raw_token();
  const auto now = ctx_.clock.now();
  const auto lifetime = std::chrono::duration_cast<std::chrono::seconds>(options_.session_lifetime);
  const auto hash = storage::hash_token(id);
  auto made = ctx_.store.create_web_session(hash, caller.token_id, csrf, now, now + lifetime);
  if (!made) {
    spdlog::warn("cannot open a dashboard session: {}", made.error().detail);
    return api::AuthRefusal{api::ProblemKind::storage_unavailable,
                            "the database is unavailable; try again shortly"};
  }
  return SignedIn{Viewer{caller, csrf, hash}, cookie(kSessionCookie, id, lifetime)};
}

std::optional<Viewer> Sessions::viewer(const http::Request& request) {
  const std::string id = cookie_value(request.header("cookie"), kSessionCookie);
  if (id.empty()) return std::nullopt;
  const auto hash = storage::hash_token(id);
  auto found = ctx_.store.find_web_session(hash);
  if (!found) return std::nullopt;
  const auto now = ctx_.clock.now();
  const auto& token = found->token;
  if (now >= found->expires_at || token.revoked_at || storage::expired(token, now)) {
    (void)ctx_.store.end_web_session(hash);
    return std::nullopt;
  }
  return Viewer{api::caller_of(token), found->csrf, hash};
}

void Sessions::sign_out(const Viewer& viewer) { (void)ctx_.store.end_web_session(viewer.session); }

std::string Sessions::cookie(std::string_view name, std::string_view value,
                             std::chrono::seconds max_age, std::string_view path) const {
  std::string c = std::string(name) + "=" + std::string(value) + "; Path=" + std::string(path) +
                  "; Max-Age=" + std::to_string(max_age.count()) + "; HttpOnly; SameSite=Strict";
  if (options_.secure_cookies) c += "; Secure";
  return c;
}

std::string Sessions::expired_cookie(std::string_view name, std::string_view path) const {
  return cookie(name, "", std::chrono::seconds{0}, path);
}

}  // namespace pbfleet::web
