// Dashboard sign-in sessions through the Store interface (SQLite and PostgreSQL, each case on both).
#include "server/storage/store.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include "fixture.hpp"
#include "server/storage/tokens.hpp"

namespace pbfleet::storage {
namespace {

using testing::at;
using testing::Fleet;

const std::string kCsrf(64, 'c');

template <class F>
Id make_token(F& f, Role role = Role::manager) {
  auto t = f.store->create_token("desk", role, std::nullopt, hash_token(new_raw_token()), at(1));
  REQUIRE(t.ok());
  return t->id;
}

}  // namespace

STORE_TEST_CASE("a web session is found by its hash with its token, and only by it") {
  Fleet<Backend> f;
  const Id token = make_token(f);
  const auto cookie = hash_token(new_raw_token());
  const auto made = f.store->create_web_session(cookie, token, kCsrf, at(2), at(3));
  REQUIRE(made.ok());
  CHECK(made->csrf == kCsrf);
  CHECK(made->created_at == at(2));
  CHECK(made->expires_at == at(3));
  CHECK(made->token.id == token);
  CHECK(made->token.role == Role::manager);

  const auto found = f.store->find_web_session(cookie);
  REQUIRE(found.ok());
  CHECK(found->id == made->id);
  CHECK(found->token.name == "desk");
  CHECK(f.store->find_web_session(hash_token("someone else's guess")).error().code ==
        StoreErrc::not_found);
}

STORE_TEST_CASE("ending a web session makes it unknown, and ending it twice is fine") {
  Fleet<Backend> f;
  const auto cookie = hash_token(new_raw_token());
  REQUIRE(f.store->create_web_session(cookie, make_token(f), kCsrf, at(2), at(3)).ok());
  CHECK(f.store->end_web_session(cookie).ok());
  CHECK(f.store->find_web_session(cookie).error().code == StoreErrc::not_found);
  CHECK(f.store->end_web_session(cookie).ok());
}

STORE_TEST_CASE("revoking a token ends every web session opened with it, and no other") {
  Fleet<Backend> f;
  const Id revoked = make_token(f);
  const Id kept = make_token(f);
  const auto a = hash_token(new_raw_token());
  const auto b = hash_token(new_raw_token());
  const auto c = hash_token(new_raw_token());
  REQUIRE(f.store->create_web_session(a, revoked, kCsrf, at(2), at(5)).ok());
  REQUIRE(f.store->create_web_session(b, revoked, kCsrf, at(2), at(5)).ok());
  REQUIRE(f.store->create_web_session(c, kept, kCsrf, at(2), at(5)).ok());
  REQUIRE(f.store->revoke_token(revoked, at(3)).ok());
  CHECK(f.store->find_web_session(a).error().code == StoreErrc::not_found);
  CHECK(f.store->find_web_session(b).error().code == StoreErrc::not_found);
  CHECK(f.store->find_web_session(c).ok());
}

STORE_TEST_CASE("a web session needs a known token and an end after its start, and expired ones are swept") {
  Fleet<Backend> f;
  const Id token = make_token(f);
  const auto unknown = f.store->create_web_session(hash_token("x"), token + 99, kCsrf, at(2), at(3));
  REQUIRE_FALSE(unknown.ok());
  CHECK(unknown.error().code == StoreErrc::constraint);
  CHECK(unknown.error().field == "token_id");
  const auto backwards = f.store->create_web_session(hash_token("y"), token, kCsrf, at(3), at(3));
  REQUIRE_FALSE(backwards.ok());
  CHECK(backwards.error().field == "expires_at");

  // An expired session is still returned (the caller refuses it) until a
  // later sign-in sweeps it away.
  const auto old = hash_token(new_raw_token());
  REQUIRE(f.store->create_web_session(old, token, kCsrf, at(2), at(3)).ok());
  CHECK(f.store->find_web_session(old).ok());
  REQUIRE(f.store->create_web_session(hash_token(new_raw_token()), token, kCsrf, at(4), at(5)).ok());
  CHECK(f.store->find_web_session(old).error().code == StoreErrc::not_found);
}

}  // namespace pbfleet::storage
