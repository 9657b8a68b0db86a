// API tokens: only their SHA-256 is stored.
#include "server/storage/sqlite_rows.hpp"
#include "server/storage/sqlite_store_impl.hpp"

namespace pbfleet::storage::sqlite {
namespace {

ApiToken token_by_id(Db& db, Id id) {
  auto s = db.prepare(std::string(kTokenSelect) + " WHERE t.id = ?1");
  if (!s.bind(1, id).step()) fail(StoreErrc::not_found, "no token with id " + std::to_string(id));
  return read_token(s);
}

}  // namespace

StoreResult<ApiToken> SqliteStore::create_token(std::string_view name, Role role,
                                                std::optional<Id> depot_id, const TokenHash& hash,
                                                std::chrono::sys_seconds at,
                                                std::optional<std::chrono::sys_seconds> expires_at) {
  return write([&](Db& db) {
    if (depot_id && !db.prepare("SELECT 1 FROM depots WHERE id = ?1").bind(1, *depot_id).step()) {
      fail(StoreErrc::constraint, "no depot with id " + std::to_string(*depot_id), "depot_id");
    }
    if (expires_at && *expires_at <= at) {
      fail(StoreErrc::invalid, "a token must expire after it is created", "expires_at");
    }
    auto s = db.prepare(
        "INSERT INTO api_tokens (name, role, depot_id, hash, created_at, expires_at)"
        " VALUES (?1, ?2, ?3, ?4, ?5, ?6)");
    s.bind(1, name).bind(2, to_string(role)).bind(3, depot_id);
    s.bind_blob(4, hash.bytes.data(), hash.bytes.size()).bind(5, to_db(at));
    if (expires_at) {
      s.bind(6, to_db(*expires_at));
    } else {
      s.bind_null(6);
    }
    s.run();
    return token_by_id(db, db.last_insert_id());
  });
}

StoreResult<ApiToken> SqliteStore::find_token(const TokenHash& hash) {
  return read([&](Db& db) {
    auto s = db.prepare(std::string(kTokenSelect) + " WHERE t.hash = ?1");
    if (!s.bind_blob(1, hash.bytes.data(), hash.bytes.size()).step()) {
      fail(StoreErrc::not_found, "no such token");
    }
    return read_token(s);
  });
}

StoreResult<Page<ApiToken>> SqliteStore::list_tokens(const PageRequest& page) {
  return read([&](Db& db) {
    const std::int64_t limit = page_limit(page);
    auto s = db.prepare(std::string(kTokenSelect) + " WHERE t.id > ?1 ORDER BY t.id LIMIT ?2");
    s.bind(1, page_after(page)).bind(2, limit + 1);
    Page<ApiToken> out;
    while (s.step()) out.items.push_back(read_token(s));
    if (static_cast<std::int64_t>(out.items.size()) > limit) {
      out.items.pop_back();
      out.next_cursor = encode_cursor(out.items.back().id);
    }
    return out;
  });
}

StoreResult<ApiToken> SqliteStore::revoke_token(Id id, std::chrono::sys_seconds at) {
  return write([&](Db& db) {
    token_by_id(db, id);
    db.prepare("UPDATE api_tokens SET revoked_at = coalesce(revoked_at, ?2) WHERE id = ?1")
        .bind(1, id)
        .bind(2, to_db(at))
        .run();
    db.prepare("DELETE FROM web_sessions WHERE token_id = ?1").bind(1, id).run();
    return token_by_id(db, id);
  });
}

namespace {

// The session columns, then the token's as in kTokenSelect.
constexpr std::string_view kSessionSelect =
    "SELECT s.id, s.csrf, s.created_at, s.expires_at,"
    " t.id, t.name, t.role, t.depot_id, t.created_at, t.revoked_at, t.hash, t.expires_at"
    " FROM web_sessions s JOIN api_tokens t ON t.id = s.token_id";
constexpr int kSessionTokenColumn = 4;

WebSession read_session(const Statement& s) {
  WebSession w;
  w.id = s.int_at(0);
  w.csrf = s.text_at(1);
  w.created_at = seconds_from_db(s.int_at(2));
  w.expires_at = seconds_from_db(s.int_at(3));
  w.token = read_token(s, kSessionTokenColumn);
  return w;
}

WebSession session_by_hash(Db& db, const TokenHash& hash) {
  auto s = db.prepare(std::string(kSessionSelect) + " WHERE s.hash = ?1");
  if (!s.bind_blob(1, hash.bytes.data(), hash.bytes.size()).step()) {
    fail(StoreErrc::not_found, "no such session");
  }
  return read_session(s);
}

}  // namespace

StoreResult<WebSession> SqliteStore::create_web_session(const TokenHash& session_hash,
                                                        Id token_id, std::string_view csrf,
                                                        std::chrono::sys_seconds at,
                                                        std::chrono::sys_seconds expires_at) {
  return write([&](Db& db) {
    if (!db.prepare("SELECT 1 FROM api_tokens WHERE id = ?1").bind(1, token_id).step()) {
      fail(StoreErrc::constraint, "no token with id " + std::to_string(token_id), "token_id");
    }
    if (expires_at <= at) fail(StoreErrc::invalid, "a session must end after it starts", "expires_at");
    db.prepare("DELETE FROM web_sessions WHERE expires_at <= ?1").bind(1, to_db(at)).run();
    db.prepare(
          "INSERT INTO web_sessions (hash, token_id, csrf, created_at, expires_at)"
          " VALUES (?1, ?2, ?3, ?4, ?5)")
        .bind_blob(1, session_hash.bytes.data(), session_hash.bytes.size())
        .bind(2, token_id)
        .bind(3, csrf)
        .bind(4, to_db(at))
        .bind(5, to_db(expires_at))
        .run();
    return session_by_hash(db, session_hash);
  });
}

StoreResult<WebSession> SqliteStore::find_web_session(const TokenHash& session_hash) {
  return read([&](Db& db) { return session_by_hash(db, session_hash); });
}

StoreResult<Done> SqliteStore::end_web_session(const TokenHash& session_hash) {
  return write([&](Db& db) {
    db.prepare("DELETE FROM web_sessions WHERE hash = ?1")
        .bind_blob(1, session_hash.bytes.data(), session_hash.bytes.size())
        .run();
    return Done{};
  });
}

}  // namespace pbfleet::storage::sqlite
