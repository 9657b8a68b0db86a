#include "cli/import/reading_id.hpp"

#include <doctest/doctest.h>

#include "tests/cli/fake_server.hpp"

using namespace pbfleet;
using namespace pbfleet::cli::import;

namespace {

models::wire::ReadingInput reading() {
  models::wire::ReadingInput r;
  r.serial = "NB-2023-0001";
  r.taken_at = cli::testing::test_now();
  r.ocv = models::Volts{12.41};
  r.cell_sg = {{1.250}, {1.245}, {1.250}, {1.190}, {1.250}, {1.245}};
  r.electrolyte = models::wire::EnteredTemperature{models::Celsius{5.0}, models::wire::TempUnit::f};
  r.logged_by = "kari";
  r.source = "import";
  return r;
}

}  // namespace

TEST_CASE("the same reading always gets the same id, and the id fits the server's limit") {
  auto a = derive_reading_id(reading());
  CHECK(a == derive_reading_id(reading()));
  CHECK(a.rfind("rd-", 0) == 0);
  CHECK(a.size() == 3 + kDerivedIdHexChars);
  CHECK(a.size() <= models::wire::kMaxIdLength);
  CHECK(a.find_first_not_of("rd-0123456789abcdef") == std::string::npos);
}

TEST_CASE("any change in content changes the id, a given reading_id is ignored") {
  auto base = derive_reading_id(reading());
  auto r = reading();
  r.cell_sg[3] = {1.195};
  CHECK(derive_reading_id(r) != base);
  r = reading();
  r.taken_at += std::chrono::seconds(1);
  CHECK(derive_reading_id(r) != base);
  r = reading();
  r.electrolyte->unit = models::wire::TempUnit::c;  // same Celsius value, entered differently
  CHECK(derive_reading_id(r) != base);
  r = reading();
  r.water_added = true;
  CHECK(derive_reading_id(r) != base);
  r = reading();
  r.reading_id = "whatever";
  CHECK(derive_reading_id(r) == base);
}

TEST_CASE("text fields cannot be shifted into each other to fake the same id") {
  auto a = reading();
  a.logged_by = "kari\n6:import";
  a.source = "";
  auto b = reading();
  b.logged_by = "kari";
  b.source = "import";
  CHECK(canonical_text(a) != canonical_text(b));
  CHECK(derive_reading_id(a) != derive_reading_id(b));
}

TEST_CASE("the hash is SHA-256 (FIPS 180-4 example \"abc\") and the id is its first 128 bits") {
  // FIPS 180-4 / NIST CSRC example values, one-block message "abc".
  CHECK(sha256_hex("abc") == "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  CHECK(derive_reading_id(reading()) == "rd-" + sha256_hex(canonical_text(reading())).substr(0, 32));
}

TEST_CASE("the canonical text is pinned: changing it would make re-imports after an upgrade duplicate rows") {
  CHECK(canonical_text(reading()) ==
        "pbfleet-reading-v1\n12:NB-2023-0001\n1796126400\n12.410000\n"
        "1.250000;1.245000;1.250000;1.190000;1.250000;1.245000\n5.000000F\n\n\n\n\n0\n0\n"
        "4:kari\n6:import\n0:\n");
}
