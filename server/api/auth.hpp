// Bearer-token authentication and the role allow-lists of routes.
//
// The raw token is hashed (SHA-256) on arrival and only the hash is looked
// up; the store compares hashes in constant time. Known tokens are cached
// briefly; revoking through the API drops the cache entry at once, so a
// revoked token gets 401 on the very next request. Repeated bad tokens from
// one address are answered 429 for a while (guessing is throttled; the
// count is kept per pbfleetd instance, in memory, not shared). A
// token past its expires_at is refused like a revoked one, checked against
// the injected clock on every request (cached or not).
#pragma once

#include <array>
#include <chrono>
#include <cstdint>
#include <map>
#include <mutex>
#include <optional>
#include <string>
#include <variant>

#include "server/api/clock.hpp"
#include "server/api/problem.hpp"
#include "server/http/message.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

// Set of roles allowed on a route (bit per storage::Role).
using RoleSet = std::uint8_t;
[[nodiscard]] constexpr RoleSet role_bit(storage::Role role) {
  return static_cast<RoleSet>(1U << static_cast<unsigned>(role));
}
inline constexpr RoleSet kCrew = role_bit(storage::Role::crew);
inline constexpr RoleSet kTechnician = role_bit(storage::Role::technician);
inline constexpr RoleSet kManager = role_bit(storage::Role::manager);
inline constexpr RoleSet kAdmin = role_bit(storage::Role::admin);
inline constexpr RoleSet kAnyRole = kCrew | kTechnician | kManager | kAdmin;
inline constexpr RoleSet kPublic = 0;  // no token needed

// Who is calling: the token's identity, never the token itself.
struct Caller {
  storage::Id token_id = 0;
  std::string token_name;
  storage::Role role = storage::Role::crew;
  std::optional<storage::Id> depot_id;  // scope; nullopt = every depot
};

// Lifetimes a new token may be given (POST /v1/tokens expires_in_days,
// `pbfleetd token create --expires-in`), in days. Ours to set: a day is the
// shortest useful shift token; ten years is "never" for a fleet.
inline constexpr int kMinTokenLifetimeDays = 1;
inline constexpr int kMaxTokenLifetimeDays = 3650;

struct AuthLimits {
  // Bad tokens one address may present per window before getting 429.
  int failures_per_window = 20;
  std::chrono::seconds window{60};
  // How long a known token stays cached: bounds the delay of a revocation
  // made outside this process (another pbfleetd on the same PostgreSQL
  // database, or `pbfleetd token revoke`). Under 1 s, so a token revoked
  // through one instance is refused by every instance within a second.
  std::chrono::milliseconds cache_ttl{500};
};

// Why a token was refused: the problem kind (unauthorized, too_many_requests,
// storage_unavailable) and a sentence for a person.
struct AuthRefusal {
  ProblemKind kind = ProblemKind::unauthorized;
  std::string detail;
};

class Authenticator {
 public:
  Authenticator(storage::Store& store, const Clock& clock, AuthLimits limits = {});

  // The caller, or the problem response (401, 429, 503) to send.
  std::variant<Caller, http::Response> authenticate(const http::Request& request);
  // Checks a raw token presented from `peer` ("host:port") exactly as a
  // Bearer token is checked, with the same throttle (the dashboard's sign-in).
  std::variant<Caller, AuthRefusal> check_token(std::string_view raw, const std::string& peer);
  // Drops every cached token (call after a revocation).
  void forget_cached();

 private:
  using Steady = std::chrono::steady_clock;
  struct Cached {
    storage::ApiToken token;
    Steady::time_point until;
  };
  bool throttled(const std::string& address);
  void note_failure(const std::string& address);
  std::optional<storage::ApiToken> cached(const storage::TokenHash& hash);

  storage::Store& store_;
  const Clock& clock_;
  AuthLimits limits_;
  std::mutex mutex_;
  std::map<std::array<unsigned char, 32>, Cached> cache_;
  std::map<std::string, std::pair<Steady::time_point, int>> failures_;  // address -> (window start, count)
};

// The caller a token stands for.
Caller caller_of(const storage::ApiToken& token);

// The address part of "host:port" (or "[v6]:port").
std::string peer_address(const std::string& peer);

}  // namespace pbfleet::api
