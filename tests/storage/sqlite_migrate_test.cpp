#include "server/storage/sqlite_migrate.hpp"  // self-containment check: first include

#include <doctest/doctest.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include "fixture.hpp"
#include "server/storage/migrations.hpp"

namespace pbfleet::storage::sqlite {
namespace {

using testing::TempDir;

const auto kNow = testing::at(0);

bool has_table(Db& db, const char* name) {
  auto s = db.prepare("SELECT 1 FROM sqlite_schema WHERE type = 'table' AND name = ?1");
  return s.bind(1, name).step();
}

std::vector<Migration> with_extra(std::string_view name, std::string_view sql) {
  auto list = embedded_migrations();
  list.push_back(Migration{list.back().version + 1, name, sql});
  return list;
}

}  // namespace

TEST_CASE("migrations are embedded in order, numbered from 1 without gaps") {
  const auto& list = embedded_migrations();
  REQUIRE_FALSE(list.empty());
  for (std::size_t i = 0; i < list.size(); ++i) CHECK(list[i].version == static_cast<int>(i) + 1);
  CHECK(list.front().name == "0001_initial.sql");
  CHECK(list.front().sql.find("CREATE TABLE readings") != std::string_view::npos);
  CHECK(known_schema_version() == list.back().version);
}

TEST_CASE("a fresh database is migrated to the newest version and each step recorded") {
  TempDir dir;
  Db db(dir.file("fresh.db"), Db::Mode::read_write_create);
  CHECK(schema_version(db) == 0);
  CHECK(migrate(db, embedded_migrations(), kNow) == known_schema_version());
  CHECK(db.query_int("SELECT count(*) FROM schema_version") == known_schema_version());
  CHECK(db.query_text("SELECT name FROM schema_version WHERE version = 1") == "0001_initial.sql");
  for (const char* t : {"depots", "vehicles", "batteries", "readings", "api_tokens"}) {
    CHECK(has_table(db, t));
  }
}

TEST_CASE("re-opening a migrated database applies nothing again and keeps its data") {
  TempDir dir;
  {
    auto store = testing::open_store(dir.file("again.db"));
    REQUIRE(store->create_depot({0, "Harbour", "Europe/Oslo", models::Celsius{-12}}).ok());
  }
  auto store = testing::open_store(dir.file("again.db"));
  CHECK(store->list_depots({}).value().items.size() == 1);
  Db db(dir.file("again.db"), Db::Mode::read_only);
  CHECK(db.query_int("SELECT count(*) FROM schema_version") == known_schema_version());
}

TEST_CASE("a database newer than this binary is refused with a clear message and left alone") {
  TempDir dir;
  const auto file = dir.file("newer.db");
  testing::open_store(file).reset();
  {
    Db db(file, Db::Mode::read_write_create);
    db.exec("INSERT INTO schema_version VALUES (99, '0099_future.sql', 0)");
  }
  SqliteOptions options;
  options.file = file;
  const auto opened = open_sqlite_store(options);
  REQUIRE_FALSE(opened.ok());
  CHECK(opened.error().code == StoreErrc::invalid);
  CHECK(opened.error().detail.find("99") != std::string::npos);
  CHECK(opened.error().detail.find("newer") != std::string::npos);
  Db db(file, Db::Mode::read_only);
  CHECK(schema_version(db) == 99);
}

TEST_CASE("a migration that fails part-way is rolled back and the old version kept") {
  TempDir dir;
  Db db(dir.file("failing.db"), Db::Mode::read_write_create);
  migrate(db, embedded_migrations(), kNow);
  const auto list = with_extra("9999_broken.sql",
                               "CREATE TABLE half_done (x INTEGER);"
                               "INSERT INTO no_such_table VALUES (1);");
  try {
    migrate(db, list, kNow);
    FAIL("a broken migration was accepted");
  } catch (const DbError& e) {
    CHECK(e.error().code == StoreErrc::internal);
    CHECK(std::string(e.what()).find("9999_broken.sql") != std::string::npos);
  }
  CHECK(schema_version(db) == known_schema_version());
  CHECK_FALSE(has_table(db, "half_done"));
}

TEST_CASE("a migration killed mid-way leaves the old version and runs again on the next open") {
  TempDir dir;
  const auto file = dir.file("killed.db");
  {
    Db db(file, Db::Mode::read_write_create);
    db.exec("PRAGMA journal_mode = WAL");
    migrate(db, embedded_migrations(), kNow);
  }
  const std::string_view sql =
      "CREATE TABLE added_later (x INTEGER); CREATE INDEX a ON added_later (x);";
  const pid_t child = ::fork();
  REQUIRE(child >= 0);
  if (child == 0) {
    // The migration's transaction is open and half written when the
    // process dies with no chance to clean up.
    Db db(file, Db::Mode::read_write_create);
    db.exec("BEGIN IMMEDIATE; CREATE TABLE added_later (x INTEGER);");
    ::kill(::getpid(), SIGKILL);
    ::_exit(0);
  }
  int status = 0;
  ::waitpid(child, &status, 0);
  REQUIRE(WIFSIGNALED(status));
  Db db(file, Db::Mode::read_write_create);
  CHECK(schema_version(db) == known_schema_version());
  CHECK_FALSE(has_table(db, "added_later"));
  CHECK(db.query_text("PRAGMA integrity_check") == "ok");
  CHECK(migrate(db, with_extra("9999_added_later.sql", sql), kNow) == known_schema_version() + 1);
  CHECK(has_table(db, "added_later"));
}

TEST_CASE("a version-1 database gains token expiry (0002) and keeps its tokens as never expiring") {
  TempDir dir;
  const auto file = dir.file("v1.db");
  {
    Db db(file, Db::Mode::read_write_create);
    db.exec("PRAGMA journal_mode = WAL");
    const std::vector<Migration> first{embedded_migrations().front()};
    REQUIRE(migrate(db, first, kNow) == 1);
    db.exec("INSERT INTO api_tokens (name, role, hash, created_at)"
            " VALUES ('old admin', 'admin', zeroblob(32), 100)");
  }
  CHECK(embedded_migrations().at(1).name == "0002_token_expiry.sql");
  auto store = testing::open_store(file);
  const auto tokens = store->list_tokens({}).value().items;
  REQUIRE(tokens.size() == 1);
  CHECK(tokens[0].name == "old admin");
  CHECK_FALSE(tokens[0].expires_at.has_value());
  store.reset();
  Db db(file, Db::Mode::read_only);
  CHECK(schema_version(db) >= 2);
  CHECK(db.query_text("SELECT name FROM schema_version WHERE version = 2") ==
        "0002_token_expiry.sql");
  CHECK(db.query_int("SELECT count(*) FROM pragma_table_info('api_tokens')"
                     " WHERE name = 'expires_at'") == 1);
}

TEST_CASE("the store refuses to open where WAL journaling cannot be set") {
  // An in-memory database cannot use a write-ahead log: journal_mode reads
  // back "memory", so the store must refuse rather than run undurable.
  SqliteOptions options;
  options.file = ":memory:";
  const auto opened = open_sqlite_store(options);
  REQUIRE_FALSE(opened.ok());
  CHECK(opened.error().code == StoreErrc::unavailable);
  CHECK(opened.error().detail.find("journal_mode") != std::string::npos);
}

}  // namespace pbfleet::storage::sqlite
