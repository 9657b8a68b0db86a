// API tokens through the Store interface (SQLite and PostgreSQL, each case on both).
#include "server/storage/store.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include <fstream>
#include <iterator>

#include "fixture.hpp"
#include "server/storage/tokens.hpp"

namespace pbfleet::storage {
namespace {

using testing::at;
using testing::Fleet;

std::string file_bytes(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  return std::string(std::istreambuf_iterator<char>(in), {});
}

}  // namespace

STORE_TEST_CASE("a token is found by its hash with its role and scope") {
  Fleet<Backend> f;
  const std::string raw = new_raw_token();
  const auto made =
      f.store->create_token("crew tablet 1", Role::crew, f.depot.id, hash_token(raw), at(1));
  REQUIRE(made.ok());
  const auto found = f.store->find_token(hash_token(raw));
  REQUIRE(found.ok());
  CHECK(found->id == made->id);
  CHECK(found->name == "crew tablet 1");
  CHECK(found->role == Role::crew);
  CHECK(found->depot_id == f.depot.id);
  CHECK(found->created_at == at(1));
  CHECK_FALSE(found->revoked_at.has_value());
  CHECK(same_token_hash(found->hash, hash_token(raw)));
  CHECK(f.store->find_token(hash_token(raw + "x")).error().code == StoreErrc::not_found);
}

TEST_CASE("the raw token never reaches the database file") {
  Fleet f;
  const std::string raw = new_raw_token();
  REQUIRE(f.store->create_token("admin", Role::admin, std::nullopt, hash_token(raw), at(1)).ok());
  f.store.reset();  // checkpoint the WAL into the file
  for (const char* name : {"fleet.db", "fleet.db-wal"}) {
    const auto path = f.dir.file(name);
    if (std::filesystem::exists(path)) CHECK(file_bytes(path).find(raw) == std::string::npos);
  }
  CHECK(file_bytes(f.dir.file("fleet.db")).size() > 0);
}

STORE_TEST_CASE("revoking a token marks it at once and keeps the first revocation time") {
  Fleet<Backend> f;
  const auto hash = hash_token(new_raw_token());
  const Id id = f.store->create_token("old", Role::manager, std::nullopt, hash, at(1)).value().id;
  REQUIRE(f.store->revoke_token(id, at(2)).ok());
  CHECK(f.store->find_token(hash)->revoked_at == at(2));
  CHECK(f.store->revoke_token(id, at(3))->revoked_at == at(2));
  CHECK(f.store->revoke_token(999, at(3)).error().code == StoreErrc::not_found);
}

STORE_TEST_CASE("a token scoped to an unknown depot is refused") {
  Fleet<Backend> f;
  const auto bad = f.store->create_token("x", Role::crew, 404, hash_token("t"), at(1));
  REQUIRE_FALSE(bad.ok());
  CHECK(bad.error().code == StoreErrc::constraint);
  CHECK(f.store->list_tokens({}).value().items.empty());
}

STORE_TEST_CASE("tokens list in pages") {
  Fleet<Backend> f;
  for (int i = 0; i < 5; ++i) {
    REQUIRE(f.store
                ->create_token("t" + std::to_string(i), Role::technician, std::nullopt,
                               hash_token(new_raw_token()), at(1))
                .ok());
  }
  const auto first = f.store->list_tokens({3, ""}).value();
  CHECK(first.items.size() == 3);
  const auto second = f.store->list_tokens({3, first.next_cursor}).value();
  CHECK(second.items.size() == 2);
  CHECK(second.next_cursor.empty());
  CHECK(second.items[0].id > first.items[2].id);
}

}  // namespace pbfleet::storage

namespace pbfleet::storage {

STORE_TEST_CASE("a token keeps its expiry, and one expiring before it was made is refused") {
  Fleet<Backend> f;
  const auto hash = hash_token(new_raw_token());
  const auto made = f.store->create_token("shift", Role::crew, std::nullopt, hash, at(1), at(8));
  REQUIRE(made.ok());
  CHECK(made->expires_at == at(8));
  CHECK(f.store->find_token(hash)->expires_at == at(8));
  CHECK(expired(*made, at(8)));
  CHECK(expired(*made, at(9)));
  CHECK_FALSE(expired(*made, at(8) - std::chrono::seconds{1}));

  const auto forever = f.store->create_token("desk", Role::manager, std::nullopt,
                                             hash_token(new_raw_token()), at(1));
  REQUIRE(forever.ok());
  CHECK_FALSE(forever->expires_at.has_value());
  CHECK_FALSE(expired(*forever, at(10000)));

  const auto backwards = f.store->create_token("x", Role::crew, std::nullopt,
                                               hash_token(new_raw_token()), at(2), at(2));
  REQUIRE_FALSE(backwards.ok());
  CHECK(backwards.error().code == StoreErrc::invalid);
  CHECK(backwards.error().field == "expires_at");
  CHECK(f.store->list_tokens({}).value().items.size() == 2);
}

}  // namespace pbfleet::storage
