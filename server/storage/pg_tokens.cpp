// API tokens and dashboard sessions on PostgreSQL: only SHA-256 hashes are
// stored. Nothing is cached here: a revocation through any instance is seen
// by the next lookup on every instance.
#include "server/storage/pg_rows.hpp"
#include "server/storage/pg_store_impl.hpp"

namespace pbfleet::storage::pg {
namespace {

using Tx = pqxx::transaction_base;

std::string hash_param(const TokenHash& hash) {
  return bytea_param(hash.bytes.data(), hash.bytes.size());
}

ApiToken token_by_id(Tx& tx, Id id) {
  const auto rows = tx.exec_params(std::string(kTokenSelect) + " WHERE t.id = $1", id);
  if (rows.empty()) fail(StoreErrc::not_found, "no token with id " + std::to_string(id));
  return read_token(rows[0]);
}

// The session columns, then the token's as in kTokenSelect.
constexpr std::string_view kSessionSelect =
    "SELECT s.id, s.csrf, s.created_at, s.expires_at,"
    " t.id, t.name, t.role, t.depot_id, t.created_at, t.revoked_at, t.hash, t.expires_at"
    " FROM web_sessions s JOIN api_tokens t ON t.id = s.token_id";
constexpr int kSessionTokenColumn = 4;

WebSession session_by_hash(Tx& tx, const TokenHash& hash) {
  const auto rows =
      tx.exec_params(std::string(kSessionSelect) + " WHERE s.hash = $1", hash_param(hash));
  if (rows.empty()) fail(StoreErrc::not_found, "no such session");
  const auto& r = rows[0];
  WebSession w;
  w.id = r[0].as<Id>();
  w.csrf = text(r[1]);
  w.created_at = seconds_from_db(r[2].as<std::int64_t>());
  w.expires_at = seconds_from_db(r[3].as<std::int64_t>());
  w.token = read_token(r, kSessionTokenColumn);
  return w;
}

}  // namespace

StoreResult<ApiToken> PgStore::create_token(std::string_view name, Role role,
                                            std::optional<Id> depot_id, const TokenHash& hash,
                                            std::chrono::sys_seconds at,
                                            std::optional<std::chrono::sys_seconds> expires_at) {
  return write([&](pqxx::transaction_base& tx) {
    if (depot_id && tx.exec_params("SELECT 1 FROM depots WHERE id = $1", *depot_id).empty()) {
      fail(StoreErrc::constraint, "no depot with id " + std::to_string(*depot_id), "depot_id");
    }
    if (expires_at && *expires_at <= at) {
      fail(StoreErrc::invalid, "a token must expire after it is created", "expires_at");
    }
    std::optional<std::int64_t> expires;
    if (expires_at) expires = to_db(*expires_at);
    const auto id = tx.exec_params(
        "INSERT INTO api_tokens (name, role, depot_id, hash, created_at, expires_at)"
        " VALUES ($1, $2, $3, $4, $5, $6) RETURNING id",
        std::string(name), std::string(to_string(role)), depot_id, hash_param(hash), to_db(at),
        expires);
    return token_by_id(tx, id[0][0].as<Id>());
  });
}

StoreResult<ApiToken> PgStore::find_token(const TokenHash& hash) {
  return read_one([&](Tx& tx) {
    const auto rows = tx.exec_prepared("token_by_hash", hash_param(hash));
    if (rows.empty()) fail(StoreErrc::not_found, "no such token");
    return read_token(rows[0]);
  });
}

StoreResult<Page<ApiToken>> PgStore::list_tokens(const PageRequest& page) {
  return read_one([&](Tx& tx) {
    const auto rows = tx.exec_params(
        std::string(kTokenSelect) + " WHERE t.id > $1 ORDER BY t.id LIMIT $2", page_after(page),
        page_limit(page) + 1);
    return page_of<ApiToken>(rows, page_limit(page), [](const pqxx::row& r) { return read_token(r); });
  });
}

StoreResult<ApiToken> PgStore::revoke_token(Id id, std::chrono::sys_seconds at) {
  return write([&](pqxx::transaction_base& tx) {
    token_by_id(tx, id);
    tx.exec_params("UPDATE api_tokens SET revoked_at = coalesce(revoked_at, $2) WHERE id = $1", id,
                   to_db(at));
    tx.exec_params("DELETE FROM web_sessions WHERE token_id = $1", id);
    return token_by_id(tx, id);
  });
}

StoreResult<WebSession> PgStore::create_web_session(const TokenHash& session_hash, Id token_id,
                                                    std::string_view csrf,
                                                    std::chrono::sys_seconds at,
                                                    std::chrono::sys_seconds expires_at) {
  return write([&](pqxx::transaction_base& tx) {
    if (tx.exec_params("SELECT 1 FROM api_tokens WHERE id = $1", token_id).empty()) {
      fail(StoreErrc::constraint, "no token with id " + std::to_string(token_id), "token_id");
    }
    if (expires_at <= at) fail(StoreErrc::invalid, "a session must end after it starts", "expires_at");
    tx.exec_params("DELETE FROM web_sessions WHERE expires_at <= $1", to_db(at));
    tx.exec_params(
        "INSERT INTO web_sessions (hash, token_id, csrf, created_at, expires_at)"
        " VALUES ($1, $2, $3, $4, $5)",
        hash_param(session_hash), token_id, std::string(csrf), to_db(at), to_db(expires_at));
    return session_by_hash(tx, session_hash);
  });
}

StoreResult<WebSession> PgStore::find_web_session(const TokenHash& session_hash) {
  return read_one([&](Tx& tx) { return session_by_hash(tx, session_hash); });
}

StoreResult<Done> PgStore::end_web_session(const TokenHash& session_hash) {
  return write([&](pqxx::transaction_base& tx) {
    tx.exec_params("DELETE FROM web_sessions WHERE hash = $1", hash_param(session_hash));
    return Done{};
  });
}

}  // namespace pbfleet::storage::pg
