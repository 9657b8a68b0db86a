#include "server/api/auth.hpp"

#include <cctype>

#include "models/wire/reading.hpp"
#include "server/api/problem.hpp"
#include "server/storage/tokens.hpp"

namespace pbfleet::api {

namespace {

constexpr std::string_view kBearer = "Bearer ";
constexpr std::size_t kMaxFailureEntries = 10'000;  // bounds the throttle table

// The token text after "Bearer ", or empty.
std::string_view bearer_token(const http::Request& request) {
  std::string_view value = request.header("authorization");
  if (value.size() <= kBearer.size()) return {};
  for (std::size_t i = 0; i < kBearer.size(); ++i)
    if (std::tolower(static_cast<unsigned char>(value[i])) !=
        std::tolower(static_cast<unsigned char>(kBearer[i])))
      return {};
  value.remove_prefix(kBearer.size());
  while (!value.empty() && value.back() == ' ') value.remove_suffix(1);
  return value;
}

}  // namespace

Caller caller_of(const storage::ApiToken& token) {
  return Caller{token.id, token.name, token.role, token.depot_id};
}

std::string peer_address(const std::string& peer) {
  auto colon = peer.rfind(':');
  return colon == std::string::npos ? peer : peer.substr(0, colon);
}

Authenticator::Authenticator(storage::Store& store, const Clock& clock, AuthLimits limits)
    : store_(store), clock_(clock), limits_(limits) {}

std::variant<Caller, http::Response> Authenticator::authenticate(const http::Request& request) {
  std::string_view raw = bearer_token(request);
  if (raw.empty())
    return problem(ProblemKind::unauthorized, "send Authorization: Bearer <token>");
  auto checked = check_token(raw, request.peer);
  if (auto* refused = std::get_if<AuthRefusal>(&checked)) return problem(refused->kind, refused->detail);
  return std::get<Caller>(checked);
}

std::variant<Caller, AuthRefusal> Authenticator::check_token(std::string_view raw,
                                                             const std::string& peer) {
  // The throttle applies to failing tokens only: a valid token behind the
  // same address (a shared NAT) keeps working while a guesser is held off.
  const std::string address = peer_address(peer);
  auto refuse = [&](std::string detail) -> AuthRefusal {
    if (throttled(address))
      return {ProblemKind::too_many_requests,
              "too many requests with bad tokens from this address; wait a minute"};
    note_failure(address);
    return {ProblemKind::unauthorized, std::move(detail)};
  };
  if (raw.empty()) return refuse("no token given");
  const storage::TokenHash hash = storage::hash_token(raw);
  // Expiry is checked on every request, cached or not, so a token stops
  // working at its expires_at and not up to cache_ttl later.
  auto unexpired = [&](const storage::ApiToken& token) -> std::variant<Caller, AuthRefusal> {
    if (storage::expired(token, clock_.now()))
      return refuse("token expired at " + models::wire::format_timestamp(*token.expires_at) +
                    "; ask an admin for a new one");
    return caller_of(token);
  };
  if (auto token = cached(hash)) return unexpired(*token);
  auto found = store_.find_token(hash);
  if (!found) {
    if (found.error().code != storage::StoreErrc::not_found)
      return AuthRefusal{ProblemKind::storage_unavailable, "token store unavailable; retry"};
    return refuse("unknown token");
  }
  if (found->revoked_at) return refuse("token revoked");
  {
    std::lock_guard lock(mutex_);
    cache_[hash.bytes] = Cached{*found, Steady::now() + limits_.cache_ttl};
  }
  return unexpired(*found);
}

void Authenticator::forget_cached() {
  std::lock_guard lock(mutex_);
  cache_.clear();
}

std::optional<storage::ApiToken> Authenticator::cached(const storage::TokenHash& hash) {
  std::lock_guard lock(mutex_);
  auto it = cache_.find(hash.bytes);
  if (it == cache_.end()) return std::nullopt;
  if (Steady::now() > it->second.until || !storage::same_token_hash(it->second.token.hash, hash)) {
    cache_.erase(it);
    return std::nullopt;
  }
  return it->second.token;
}

bool Authenticator::throttled(const std::string& address) {
  std::lock_guard lock(mutex_);
  auto it = failures_.find(address);
  if (it == failures_.end()) return false;
  if (Steady::now() - it->second.first > limits_.window) {
    failures_.erase(it);
    return false;
  }
  return it->second.second >= limits_.failures_per_window;
}

void Authenticator::note_failure(const std::string& address) {
  std::lock_guard lock(mutex_);
  if (failures_.size() >= kMaxFailureEntries) failures_.clear();
  auto& [start, count] = failures_[address];
  if (count == 0 || Steady::now() - start > limits_.window) {
    start = Steady::now();
    count = 0;
  }
  ++count;
}

}  // namespace pbfleet::api
