// Depots, vehicles and batteries through the Store interface (SQLite and PostgreSQL, each case on both).
#include "server/storage/store.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include <set>

#include "fixture.hpp"

namespace pbfleet::storage {
namespace {

using testing::at;
using testing::Fleet;

}  // namespace

STORE_TEST_CASE("a depot is stored and read back field for field") {
  Fleet<Backend> f;
  const auto got = f.store->get_depot(f.depot.id);
  REQUIRE(got.ok());
  CHECK(got->name == "North Yard");
  CHECK(got->time_zone == "Europe/Oslo");
  CHECK(got->design_low_c.value == -25.0);
}

STORE_TEST_CASE("a second depot with the same name is a conflict naming the field") {
  Fleet<Backend> f;
  const auto dup = f.store->create_depot({0, "North Yard", "Europe/Oslo", models::Celsius{-3}});
  REQUIRE_FALSE(dup.ok());
  CHECK(dup.error().code == StoreErrc::conflict);
  CHECK(dup.error().field == "name");
  CHECK(f.store->list_depots({}).value().items.size() == 1);
}

STORE_TEST_CASE("updating a depot changes it, an unknown id is not found") {
  Fleet<Backend> f;
  Depot d = f.depot;
  d.design_low_c = models::Celsius{-32};
  d.name = "North Yard (old hall)";
  REQUIRE(f.store->update_depot(d).ok());
  CHECK(f.store->get_depot(d.id)->design_low_c.value == -32.0);
  CHECK(f.store->get_depot(d.id)->name == "North Yard (old hall)");
  d.id = 999;
  CHECK(f.store->update_depot(d).error().code == StoreErrc::not_found);
  CHECK(f.store->get_depot(999).error().code == StoreErrc::not_found);
}

STORE_TEST_CASE("SQL meta characters and unicode are stored verbatim") {
  Fleet<Backend> f;
  const std::string tricky = "Robert'); DROP TABLE depots;-- \"quoted\" % _ \\ ;";
  const std::string nordic = "Fjellvik Ø-stasjon — Tromsø 北 🚚";
  const auto a = f.store->create_depot({0, tricky, "Europe/Oslo", models::Celsius{-10}});
  const auto b = f.store->create_depot({0, nordic, "Europe/Oslo", models::Celsius{-28}});
  REQUIRE(a.ok());
  REQUIRE(b.ok());
  CHECK(f.store->get_depot(a->id)->name == tricky);
  CHECK(f.store->get_depot(b->id)->name == nordic);
  CHECK(f.store->list_depots({}).value().items.size() == 3);

  auto battery = testing::make_battery("SN'; DELETE FROM batteries; --");
  REQUIRE(f.store->create_battery(battery, at(0)).ok());
  CHECK(f.store->get_battery("SN'; DELETE FROM batteries; --").ok());
  CHECK(f.store->get_battery("NY-0001").ok());
  CHECK(f.store->get_battery("SN%").error().code == StoreErrc::not_found);  // no LIKE matching
}

STORE_TEST_CASE("a vehicle needs an existing depot and a unique code") {
  Fleet<Backend> f;
  const auto orphan = f.store->create_vehicle({0, "TR-200", 999, Engine::diesel, {}, {}});
  REQUIRE_FALSE(orphan.ok());
  CHECK(orphan.error().code == StoreErrc::constraint);
  CHECK(orphan.error().field == "depot_id");
  const auto dup = f.store->create_vehicle({0, "TR-104", f.depot.id, Engine::gasoline, {}, {}});
  CHECK(dup.error().code == StoreErrc::conflict);
  CHECK(dup.error().field == "code");
}

STORE_TEST_CASE("a vehicle keeps its engine, displacement and required cranking current") {
  Fleet<Backend> f;
  const auto v = f.store->create_vehicle(
      {0, "VN-7", f.depot.id, Engine::gasoline, std::nullopt, models::Amperes{540}});
  REQUIRE(v.ok());
  const auto got = f.store->get_vehicle(v->id).value();
  CHECK(got.engine == Engine::gasoline);
  CHECK_FALSE(got.displacement_l.has_value());
  REQUIRE(got.required_cca_a.has_value());
  CHECK(got.required_cca_a->value == 540.0);
  CHECK(f.store->get_vehicle(f.vehicle.id)->displacement_l == 7.7);
}

STORE_TEST_CASE("vehicles list by depot") {
  Fleet<Backend> f;
  const Id harbour =
      f.store->create_depot({0, "Harbour", "Europe/Oslo", models::Celsius{-12}}).value().id;
  REQUIRE(f.store->create_vehicle({0, "HB-1", harbour, Engine::diesel, {}, {}}).ok());
  REQUIRE(f.store->create_vehicle({0, "HB-2", harbour, Engine::diesel, {}, {}}).ok());
  CHECK(f.store->list_vehicles({harbour}, {}).value().items.size() == 2);
  CHECK(f.store->list_vehicles({f.depot.id}, {}).value().items.size() == 1);
  CHECK(f.store->list_vehicles({}, {}).value().items.size() == 3);
}

STORE_TEST_CASE("a battery is stored with its ratings and the depot of its vehicle") {
  Fleet<Backend> f;
  const Battery b = f.store->get_battery("NY-0001").value();
  CHECK(b.chemistry == models::Chemistry::flooded);
  CHECK(b.cells == 6);
  CHECK(b.rated_cca_a.value == 800.0);
  CHECK(b.reserve_capacity_min == 160.0);
  CHECK_FALSE(b.capacity_ah.has_value());
  CHECK(b.full_charge_sg->value == 1.265);
  CHECK(b.installed_on == std::chrono::sys_days{std::chrono::year{2023} / 10 / 2});
  CHECK(b.vehicle_id == f.vehicle.id);
  CHECK(b.depot_id == f.depot.id);
  CHECK(b.status == BatteryStatus::in_service);
}

STORE_TEST_CASE("a duplicate serial is a conflict, an unknown vehicle a constraint") {
  Fleet<Backend> f;
  CHECK(f.store->create_battery(testing::make_battery("NY-0001"), at(0)).error().code ==
        StoreErrc::conflict);
  const auto bad = f.store->create_battery(testing::make_battery("NY-0009", 404), at(0));
  CHECK(bad.error().code == StoreErrc::constraint);
  CHECK(bad.error().field == "vehicle_id");
  CHECK(f.store->get_battery("NY-0009").error().code == StoreErrc::not_found);
}

STORE_TEST_CASE("updating a battery changes ratings but not its fitting or status") {
  Fleet<Backend> f;
  Battery b = f.battery;
  b.rated_cca_a = models::Amperes{760};
  b.chemistry = models::Chemistry::efb;
  b.vehicle_id.reset();  // ignored by update
  REQUIRE(f.store->update_battery(b).ok());
  const Battery got = f.store->get_battery("NY-0001").value();
  CHECK(got.rated_cca_a.value == 760.0);
  CHECK(got.chemistry == models::Chemistry::efb);
  CHECK(got.vehicle_id == f.vehicle.id);
}

STORE_TEST_CASE("fitting and retiring record events and retiring unfits the battery") {
  Fleet<Backend> f;
  const Id other =
      f.store->create_vehicle({0, "TR-105", f.depot.id, Engine::diesel, 12.8, {}}).value().id;
  REQUIRE(f.store->fit_battery("NY-0001", other, at(3)).ok());
  CHECK(f.store->get_battery("NY-0001")->vehicle_id == other);
  const auto retired = f.store->retire_battery("NY-0001", "cell 4 shorted", at(10));
  REQUIRE(retired.ok());
  CHECK(retired->status == BatteryStatus::retired);
  CHECK_FALSE(retired->vehicle_id.has_value());
  CHECK(retired->retired_at == at(10));
  CHECK(retired->retire_reason == "cell 4 shorted");

  const auto events = f.store->battery_events("NY-0001").value();
  REQUIRE(events.size() == 3);
  CHECK(events[0].kind == EventKind::fitted);
  CHECK(events[0].vehicle_id == f.vehicle.id);
  // Registered with its vehicle on day 0: fitted on its install date, 2023-10-02.
  CHECK(events[0].at == std::chrono::sys_days{std::chrono::year{2023} / 10 / 2});
  CHECK(events[1].at == at(3));
  CHECK(events[1].vehicle_id == other);
  CHECK(events[2].kind == EventKind::retired);
  CHECK(events[2].vehicle_id == other);
  CHECK(events[2].detail == "cell 4 shorted");

  CHECK(f.store->retire_battery("NY-0001", "again", at(11)).error().code == StoreErrc::conflict);
  CHECK(f.store->fit_battery("NY-0001", other, at(11)).error().code == StoreErrc::conflict);
}

STORE_TEST_CASE("get_battery answers from its cache only while no fleet write came in between") {
  // Every posted reading looks its battery up, so the store keeps the last
  // answer per serial; each change below must still show at once.
  Fleet<Backend> f;
  CHECK(f.store->get_battery("NY-0001")->status == BatteryStatus::in_service);
  CHECK(f.store->get_battery("NY-0001")->depot_id == f.depot.id);  // served from the cache

  Battery b = f.battery;
  b.rated_cca_a = models::Amperes{700};
  REQUIRE(f.store->update_battery(b).ok());
  CHECK(f.store->get_battery("NY-0001")->rated_cca_a.value == 700.0);

  // Moving the vehicle to another depot moves the battery with it.
  const Id south = f.store->create_depot({0, "South Quay", "Europe/Oslo", models::Celsius{-12}})
                       .value()
                       .id;
  Vehicle moved = f.store->get_vehicle(f.vehicle.id).value();
  moved.depot_id = south;
  REQUIRE(f.store->update_vehicle(moved).ok());
  CHECK(f.store->get_battery("NY-0001")->depot_id == south);

  REQUIRE(f.store->retire_battery("NY-0001", "case cracked", at(5)).ok());
  CHECK(f.store->get_battery("NY-0001")->status == BatteryStatus::retired);

  // A serial registered after a miss is found.
  CHECK(f.store->get_battery("NY-0077").error().code == StoreErrc::not_found);
  REQUIRE(f.store->create_battery(testing::make_battery("NY-0077"), at(6)).ok());
  CHECK(f.store->get_battery("NY-0077").ok());
}

STORE_TEST_CASE("batteries filter by depot, status and chemistry") {
  Fleet<Backend> f;
  auto agm = testing::make_battery("NY-0002", f.vehicle.id);
  agm.chemistry = models::Chemistry::agm;
  REQUIRE(f.store->create_battery(agm, at(0)).ok());
  REQUIRE(f.store->create_battery(testing::make_battery("STOCK-1"), at(0)).ok());
  REQUIRE(f.store->retire_battery("STOCK-1", "dropped", at(1)).ok());

  CHECK(f.store->list_batteries({f.depot.id, {}, {}}, {}).value().items.size() == 2);
  CHECK(f.store->list_batteries({{}, BatteryStatus::retired, {}}, {}).value().items.size() == 1);
  const auto agms = f.store->list_batteries({{}, {}, models::Chemistry::agm}, {}).value();
  REQUIRE(agms.items.size() == 1);
  CHECK(agms.items[0].serial == "NY-0002");
  CHECK(f.store->list_batteries({}, {}).value().items.size() == 3);
}

STORE_TEST_CASE("keyset pages list every existing object exactly once while others are inserted") {
  Fleet<Backend> f;
  std::set<Id> before{f.depot.id};
  for (int i = 0; i < 24; ++i) {
    before.insert(
        f.store->create_depot({0, "Depot " + std::to_string(i), "UTC", models::Celsius{0}})
            .value()
            .id);
  }
  std::multiset<Id> seen;
  PageRequest page{10, ""};
  int pages = 0;
  for (;;) {
    const auto got = f.store->list_depots(page);
    REQUIRE(got.ok());
    CHECK(got->items.size() <= 10);
    for (const auto& d : got->items) seen.insert(d.id);
    // Another client inserts between our pages.
    REQUIRE(f.store->create_depot({0, "Late " + std::to_string(pages), "UTC", models::Celsius{0}})
                .ok());
    ++pages;
    if (got->next_cursor.empty()) break;
    page.cursor = got->next_cursor;
    REQUIRE(pages < 20);
  }
  for (Id id : before) CHECK(seen.count(id) == 1);
  CHECK(std::set<Id>(seen.begin(), seen.end()).size() == seen.size());
}

STORE_TEST_CASE("page limits are clamped and a bad cursor is refused") {
  Fleet<Backend> f;
  for (int i = 0; i < 3; ++i) {
    REQUIRE(f.store->create_depot({0, "D" + std::to_string(i), "UTC", models::Celsius{0}}).ok());
  }
  CHECK(f.store->list_depots({0, ""}).value().items.size() == 1);  // 0 -> 1
  const auto bad = f.store->list_depots({10, "not-a-cursor"});
  REQUIRE_FALSE(bad.ok());
  CHECK(bad.error().code == StoreErrc::invalid);
  CHECK(bad.error().field == "cursor");
}

}  // namespace pbfleet::storage
