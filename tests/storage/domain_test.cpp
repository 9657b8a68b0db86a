#include "server/storage/domain.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include "server/storage/store.hpp"

namespace pbfleet::storage {

TEST_CASE("every role, engine and status name parses back to itself") {
  for (Role r : {Role::crew, Role::technician, Role::manager, Role::admin}) {
    CHECK(parse_role(to_string(r)) == r);
  }
  for (Engine e : {Engine::gasoline, Engine::diesel}) CHECK(parse_engine(to_string(e)) == e);
  for (BatteryStatus s : {BatteryStatus::in_service, BatteryStatus::retired}) {
    CHECK(parse_battery_status(to_string(s)) == s);
  }
}

TEST_CASE("unknown or differently cased names are refused") {
  CHECK_FALSE(parse_role("Admin").has_value());
  CHECK_FALSE(parse_role("root").has_value());
  CHECK_FALSE(parse_engine("petrol").has_value());
  CHECK_FALSE(parse_battery_status("").has_value());
}

TEST_CASE("store error codes have stable names") {
  CHECK(to_string(StoreErrc::not_found) == "not_found");
  CHECK(to_string(StoreErrc::disk_full) == "disk_full");
  CHECK(to_string(StoreErrc::conflict) == "conflict");
}

}  // namespace pbfleet::storage
