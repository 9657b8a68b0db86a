#include "server/storage/sqlite_rows.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include "fixture.hpp"

namespace pbfleet::storage::sqlite {

TEST_CASE("cursors round-trip the last id") {
  for (Id id : {Id{0}, Id{1}, Id{42}, Id{9007199254740993}}) {
    CHECK(decode_cursor(encode_cursor(id)) == id);
  }
}

TEST_CASE("a cursor the store did not issue is refused as invalid, naming the field") {
  for (const char* bad : {"x", "12", "6166746572", "afte", "6166746572", "zz"}) {
    try {
      decode_cursor(bad);
      FAIL("accepted cursor " << bad);
    } catch (const DbError& e) {
      CHECK(e.error().code == StoreErrc::invalid);
      CHECK(e.error().field == "cursor");
    }
  }
  // A valid cursor with a trailing character.
  CHECK_THROWS_AS(decode_cursor(encode_cursor(5) + "0"), DbError);
}

TEST_CASE("cell SG values are stored losslessly and compactly") {
  const std::vector<models::SpecificGravity> cells{{1.265}, {1.2}, {1.2655}, {0.1 + 0.2}};
  const std::string text = encode_cell_sg(cells);
  CHECK(text.substr(0, 17) == "1.265;1.2;1.2655;");
  const auto back = decode_cell_sg(text);
  REQUIRE(back.size() == cells.size());
  for (std::size_t i = 0; i < cells.size(); ++i) CHECK(back[i].value == cells[i].value);
  CHECK(decode_cell_sg("").empty());
}

TEST_CASE("the content hash changes with every field but the reading id") {
  using testing::reading;
  const auto base = reading("a", "NY-0001", 1);
  const auto hash = content_hash(base);
  auto same = base;
  same.reading_id = "another id";
  CHECK(content_hash(same) == hash);

  std::vector<models::wire::ReadingInput> changed(9, base);
  changed[0].serial = "NY-0002";
  changed[1].taken_at += std::chrono::seconds{1};
  changed[2].ocv = models::Volts{12.63};
  changed[3].cell_sg[5] = models::SpecificGravity{1.264};
  changed[4].electrolyte->unit = models::wire::TempUnit::f;
  changed[5].rest.reset();
  changed[6].note = "water added to cell 3";
  changed[7].water_added = true;
  changed[8].logged_by = "crew-b";
  for (const auto& c : changed) CHECK(content_hash(c) != hash);
}

TEST_CASE("the content hash of a fixed reading is the one databases already hold") {
  // Stored fingerprints decide replay or conflict for every retry, so the
  // canonical form may not drift: this value was computed before the form
  // was rewritten without temporary strings, and must not change.
  models::wire::ReadingInput r;
  r.reading_id = "not part of the hash";
  r.serial = "NY-0001";
  r.taken_at = std::chrono::sys_seconds{std::chrono::seconds{1764574500}};
  r.ocv = models::Volts{12.41};
  r.cell_sg = {{1.265}, {1.26}, {1.2655}, {0.1 + 0.2}, {1.25}, {1.27}};
  r.electrolyte = models::wire::EnteredTemperature{models::Celsius{-4.5}, models::wire::TempUnit::f};
  r.rest = models::Hours{10.0};
  r.logged_by = "crew-b";
  r.source = "round";
  r.note = "cap 4 cracked";
  r.water_added = true;
  const auto hash = content_hash(r);
  std::string hex;
  for (const unsigned char b : hash) {
    static constexpr char kHex[] = "0123456789abcdef";
    hex += kHex[b >> 4];
    hex += kHex[b & 0xf];
  }
  CHECK(hex == "bb791534a69410e2bd8ae32f72377d30");
}

TEST_CASE("text fields cannot be shifted into each other to fake equal content") {
  using testing::reading;
  auto a = reading("a", "NY-0001", 1);
  auto b = a;
  a.logged_by = "ab";
  a.source = "c";
  b.logged_by = "a";
  b.source = "bc";
  CHECK(content_hash(a) != content_hash(b));
}

}  // namespace pbfleet::storage::sqlite
