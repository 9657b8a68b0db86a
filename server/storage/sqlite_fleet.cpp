// Depots, vehicles and batteries (with their fitted/retired events).
#include <algorithm>

#include "server/storage/sqlite_rows.hpp"
#include "server/storage/sqlite_store_impl.hpp"

namespace pbfleet::storage::sqlite {
namespace {

using std::chrono::sys_seconds;

// Reads up to limit+1 rows: the extra one only says another page exists.
template <class T, class Reader>
Page<T> read_page(Statement& s, std::int64_t limit, Reader reader) {
  Page<T> page;
  while (s.step()) {
    if (static_cast<std::int64_t>(page.items.size()) == limit) {
      page.next_cursor = encode_cursor(page.items.back().id);
      break;
    }
    page.items.push_back(reader(s));
  }
  return page;
}

// Runs an INSERT/UPDATE, turning a unique-key clash into a readable conflict.
void run_unique(Statement& s, std::string field, std::string detail) {
  try {
    s.run();
  } catch (const DbError& e) {
    if (e.error().code == StoreErrc::conflict) fail(StoreErrc::conflict, detail, field);
    throw;
  }
}

void require_depot(Db& db, Id id) {
  auto s = db.prepare("SELECT 1 FROM depots WHERE id = ?1");
  if (!s.bind(1, id).step()) {
    fail(StoreErrc::constraint, "no depot with id " + std::to_string(id), "depot_id");
  }
}

void require_vehicle(Db& db, Id id) {
  auto s = db.prepare("SELECT 1 FROM vehicles WHERE id = ?1");
  if (!s.bind(1, id).step()) {
    fail(StoreErrc::constraint, "no vehicle with id " + std::to_string(id), "vehicle_id");
  }
}

Depot depot_by_id(Db& db, Id id) {
  auto s = db.prepare(std::string(kDepotSelect) + " WHERE d.id = ?1");
  if (!s.bind(1, id).step()) fail(StoreErrc::not_found, "no depot with id " + std::to_string(id));
  return read_depot(s);
}

Vehicle vehicle_by_id(Db& db, Id id) {
  auto s = db.prepare(std::string(kVehicleSelect) + " WHERE v.id = ?1");
  if (!s.bind(1, id).step()) fail(StoreErrc::not_found, "no vehicle with id " + std::to_string(id));
  return read_vehicle(s);
}

void add_event(Db& db, Id battery_id, sys_seconds at, EventKind kind, std::optional<Id> vehicle,
               std::string_view detail) {
  db.prepare(
        "INSERT INTO battery_events (battery_id, at, kind, vehicle_id, detail)"
        " VALUES (?1, ?2, ?3, ?4, ?5)")
      .bind(1, battery_id)
      .bind(2, to_db(at))
      .bind(3, to_string(kind))
      .bind(4, vehicle)
      .bind(5, detail)
      .run();
}

// Binds the rating and type fields of a battery to ?2..?9 (see the SQL below).
void bind_battery_fields(Statement& s, const Battery& b) {
  s.bind(2, models::to_string(b.chemistry))
      .bind(3, b.nominal_v.value)
      .bind(4, b.cells)
      .bind(5, b.rated_cca_a.value)
      .bind(6, b.reserve_capacity_min)
      .bind(7, b.capacity_ah)
      .bind(8, b.full_charge_sg ? std::optional<double>(b.full_charge_sg->value) : std::nullopt)
      .bind(9, to_db(b.installed_on));
}

Battery require_in_service(Db& db, std::string_view serial) {
  Battery b = battery_by_serial(db, serial);
  if (b.status == BatteryStatus::retired) {
    fail(StoreErrc::conflict, "battery '" + b.serial + "' is retired", "serial");
  }
  return b;
}

}  // namespace

Battery battery_by_serial(Db& db, std::string_view serial) {
  auto s = db.prepare(std::string(kBatterySelect) + " WHERE b.serial = ?1");
  if (!s.bind(1, serial).step()) {
    fail(StoreErrc::not_found, "no battery with serial '" + std::string(serial) + "'", "serial");
  }
  return read_battery(s);
}

std::vector<Battery> batteries_matching(Db& db, const BatteryFilter& f) {
  auto s = db.prepare(std::string(kBatterySelect) +
                      " WHERE (?1 IS NULL OR v.depot_id = ?1) AND (?2 IS NULL OR b.status = ?2)"
                      " AND (?3 IS NULL OR b.chemistry = ?3) ORDER BY b.id");
  s.bind(1, f.depot_id);
  if (f.status) s.bind(2, to_string(*f.status));
  if (f.chemistry) s.bind(3, models::to_string(*f.chemistry));
  std::vector<Battery> out;
  while (s.step()) out.push_back(read_battery(s));
  return out;
}

// ---- depots -------------------------------------------------------------------

StoreResult<Depot> SqliteStore::create_depot(const Depot& d) {
  return write_fleet([&](Db& db) {
    auto s = db.prepare("INSERT INTO depots (name, time_zone, design_low_c) VALUES (?1, ?2, ?3)");
    s.bind(1, d.name).bind(2, d.time_zone).bind(3, d.design_low_c.value);
    run_unique(s, "name", "a depot named '" + d.name + "' already exists");
    return depot_by_id(db, db.last_insert_id());
  });
}

StoreResult<Depot> SqliteStore::get_depot(Id id) {
  return read([&](Db& db) { return depot_by_id(db, id); });
}

StoreResult<Page<Depot>> SqliteStore::list_depots(const PageRequest& page) {
  return read([&](Db& db) {
    auto s = db.prepare(std::string(kDepotSelect) + " WHERE d.id > ?1 ORDER BY d.id LIMIT ?2");
    s.bind(1, page_after(page)).bind(2, page_limit(page) + 1);
    return read_page<Depot>(s, page_limit(page), read_depot);
  });
}

StoreResult<Depot> SqliteStore::update_depot(const Depot& d) {
  return write_fleet([&](Db& db) {
    depot_by_id(db, d.id);
    auto s =
        db.prepare("UPDATE depots SET name = ?2, time_zone = ?3, design_low_c = ?4 WHERE id = ?1");
    s.bind(1, d.id).bind(2, d.name).bind(3, d.time_zone).bind(4, d.design_low_c.value);
    run_unique(s, "name", "a depot named '" + d.name + "' already exists");
    return depot_by_id(db, d.id);
  });
}

// ---- vehicles -----------------------------------------------------------------

StoreResult<Vehicle> SqliteStore::create_vehicle(const Vehicle& v) {
  return write_fleet([&](Db& db) {
    require_depot(db, v.depot_id);
    auto s = db.prepare(
        "INSERT INTO vehicles (code, depot_id, engine, displacement_l, required_cca_a)"
        " VALUES (?1, ?2, ?3, ?4, ?5)");
    s.bind(1, v.code).bind(2, v.depot_id).bind(3, to_string(v.engine)).bind(4, v.displacement_l);
    s.bind(5, v.required_cca_a ? std::optional<double>(v.required_cca_a->value) : std::nullopt);
    run_unique(s, "code", "a vehicle with code '" + v.code + "' already exists");
    return vehicle_by_id(db, db.last_insert_id());
  });
}

StoreResult<Vehicle> SqliteStore::get_vehicle(Id id) {
  return read([&](Db& db) { return vehicle_by_id(db, id); });
}

StoreResult<Page<Vehicle>> SqliteStore::list_vehicles(const VehicleFilter& filter,
                                                      const PageRequest& page) {
  return read([&](Db& db) {
    auto s = db.prepare(std::string(kVehicleSelect) +
                        " WHERE v.id > ?1 AND (?2 IS NULL OR v.depot_id = ?2)"
                        " ORDER BY v.id LIMIT ?3");
    s.bind(1, page_after(page)).bind(2, filter.depot_id).bind(3, page_limit(page) + 1);
    return read_page<Vehicle>(s, page_limit(page), read_vehicle);
  });
}

StoreResult<Vehicle> SqliteStore::update_vehicle(const Vehicle& v) {
  return write_fleet([&](Db& db) {
    vehicle_by_id(db, v.id);
    require_depot(db, v.depot_id);
    auto s = db.prepare(
        "UPDATE vehicles SET code = ?2, depot_id = ?3, engine = ?4, displacement_l = ?5,"
        " required_cca_a = ?6 WHERE id = ?1");
    s.bind(1, v.id).bind(2, v.code).bind(3, v.depot_id).bind(4, to_string(v.engine));
    s.bind(5, v.displacement_l);
    s.bind(6, v.required_cca_a ? std::optional<double>(v.required_cca_a->value) : std::nullopt);
    run_unique(s, "code", "a vehicle with code '" + v.code + "' already exists");
    return vehicle_by_id(db, v.id);
  });
}

// ---- batteries ----------------------------------------------------------------

StoreResult<Battery> SqliteStore::create_battery(const Battery& b, sys_seconds at) {
  return write_fleet([&](Db& db) {
    if (b.vehicle_id) require_vehicle(db, *b.vehicle_id);
    auto s = db.prepare(
        "INSERT INTO batteries (serial, chemistry, nominal_v, cells, rated_cca_a,"
        " reserve_capacity_min, capacity_ah, full_charge_sg, installed_on, vehicle_id)"
        " VALUES (?1, ?2, ?3, ?4, ?5, ?6, ?7, ?8, ?9, ?10)");
    s.bind(1, b.serial).bind(10, b.vehicle_id);
    bind_battery_fields(s, b);
    run_unique(s, "serial", "a battery with serial '" + b.serial + "' already exists");
    const Id id = db.last_insert_id();
    // Registered already in a vehicle: it was fitted on its install date
    // (never later than now), not when somebody typed it in.
    const sys_seconds fitted_at = std::min(sys_seconds{b.installed_on}, at);
    if (b.vehicle_id) add_event(db, id, fitted_at, EventKind::fitted, b.vehicle_id, "");
    return battery_by_serial(db, b.serial);
  });
}

StoreResult<Battery> SqliteStore::get_battery(std::string_view serial) {
  const std::uint64_t version = fleet_version_.load(std::memory_order_acquire);
  std::string key(serial);
  {
    std::lock_guard lock(battery_cache_mutex_);
    if (auto it = battery_cache_.find(key);
        it != battery_cache_.end() && it->second.fleet_version == version)
      return it->second.battery;
  }
  auto found = read([&](Db& db) { return battery_by_serial(db, serial); });
  if (found) {
    std::lock_guard lock(battery_cache_mutex_);
    if (battery_cache_.size() >= kMaxCachedBatteries) battery_cache_.clear();
    battery_cache_.insert_or_assign(std::move(key), CachedBattery{*found, version});
  }
  return found;
}

StoreResult<Page<Battery>> SqliteStore::list_batteries(const BatteryFilter& f,
                                                       const PageRequest& page) {
  return read([&](Db& db) {
    auto s = db.prepare(std::string(kBatterySelect) +
                        " WHERE b.id > ?1 AND (?2 IS NULL OR v.depot_id = ?2)"
                        " AND (?3 IS NULL OR b.status = ?3) AND (?4 IS NULL OR b.chemistry = ?4)"
                        " ORDER BY b.id LIMIT ?5");
    s.bind(1, page_after(page)).bind(2, f.depot_id).bind(5, page_limit(page) + 1);
    if (f.status) s.bind(3, to_string(*f.status));
    if (f.chemistry) s.bind(4, models::to_string(*f.chemistry));
    return read_page<Battery>(s, page_limit(page), read_battery);
  });
}

StoreResult<Battery> SqliteStore::update_battery(const Battery& b) {
  return write_fleet([&](Db& db) {
    battery_by_serial(db, b.serial);
    auto s = db.prepare(
        "UPDATE batteries SET chemistry = ?2, nominal_v = ?3, cells = ?4, rated_cca_a = ?5,"
        " reserve_capacity_min = ?6, capacity_ah = ?7, full_charge_sg = ?8, installed_on = ?9"
        " WHERE serial = ?1");
    s.bind(1, b.serial);
    bind_battery_fields(s, b);
    s.run();
    Battery updated = battery_by_serial(db, b.serial);
    refresh_battery_facts(db, updated);  // its readings were derived with the old spec
    return updated;
  });
}

StoreResult<Battery> SqliteStore::fit_battery(std::string_view serial, Id vehicle_id,
                                              sys_seconds at) {
  return write_fleet([&](Db& db) {
    const Battery b = require_in_service(db, serial);
    require_vehicle(db, vehicle_id);
    db.prepare("UPDATE batteries SET vehicle_id = ?2 WHERE id = ?1")
        .bind(1, b.id)
        .bind(2, vehicle_id)
        .run();
    add_event(db, b.id, at, EventKind::fitted, vehicle_id, "");
    return battery_by_serial(db, serial);
  });
}

StoreResult<Battery> SqliteStore::retire_battery(std::string_view serial, std::string_view reason,
                                                 sys_seconds at) {
  return write_fleet([&](Db& db) {
    const Battery b = require_in_service(db, serial);
    db.prepare(
          "UPDATE batteries SET status = 'retired', retired_at = ?2, retire_reason = ?3,"
          " vehicle_id = NULL WHERE id = ?1")
        .bind(1, b.id)
        .bind(2, to_db(at))
        .bind(3, reason)
        .run();
    add_event(db, b.id, at, EventKind::retired, b.vehicle_id, reason);
    return battery_by_serial(db, serial);
  });
}

StoreResult<std::vector<BatteryEvent>> SqliteStore::battery_events(std::string_view serial) {
  return read([&](Db& db) {
    const Battery b = battery_by_serial(db, serial);
    auto s = db.prepare(
        "SELECT id, battery_id, at, kind, vehicle_id, detail FROM battery_events"
        " WHERE battery_id = ?1 ORDER BY at, id");
    s.bind(1, b.id);
    std::vector<BatteryEvent> events;
    while (s.step()) {
      events.push_back(
          BatteryEvent{s.int_at(0), s.int_at(1), seconds_from_db(s.int_at(2)),
                       s.text_at(3) == "retired" ? EventKind::retired : EventKind::fitted,
                       s.opt_int_at(4), s.text_at(5)});
    }
    return events;
  });
}

}  // namespace pbfleet::storage::sqlite
