// Depots, vehicles and batteries (with their fitted/retired events) on
// PostgreSQL. get_battery keeps a short-lived cache (pg_store.hpp); every
// other read goes to the server.
#include <algorithm>

#include "server/storage/pg_rows.hpp"
#include "server/storage/pg_store_impl.hpp"

namespace pbfleet::storage::pg {
namespace {

using std::chrono::sys_seconds;
using Tx = pqxx::transaction_base;

// Runs an INSERT/UPDATE returning the row id, turning a unique-key clash
// into a readable conflict.
template <class... Args>
pqxx::result run_unique(Tx& tx, const std::string& field, const std::string& detail,
                        const std::string& sql, Args&&... args) {
  try {
    return tx.exec_params(sql, std::forward<Args>(args)...);
  } catch (const pqxx::unique_violation&) {
    fail(StoreErrc::conflict, detail, field);
  }
}

void require_depot(Tx& tx, Id id) {
  if (tx.exec_params("SELECT 1 FROM depots WHERE id = $1", id).empty()) {
    fail(StoreErrc::constraint, "no depot with id " + std::to_string(id), "depot_id");
  }
}

void require_vehicle(Tx& tx, Id id) {
  if (tx.exec_params("SELECT 1 FROM vehicles WHERE id = $1", id).empty()) {
    fail(StoreErrc::constraint, "no vehicle with id " + std::to_string(id), "vehicle_id");
  }
}

Depot depot_by_id(Tx& tx, Id id) {
  const auto rows = tx.exec_params(std::string(kDepotSelect) + " WHERE d.id = $1", id);
  if (rows.empty()) fail(StoreErrc::not_found, "no depot with id " + std::to_string(id));
  return read_depot(rows[0]);
}

Vehicle vehicle_by_id(Tx& tx, Id id) {
  const auto rows = tx.exec_params(std::string(kVehicleSelect) + " WHERE v.id = $1", id);
  if (rows.empty()) fail(StoreErrc::not_found, "no vehicle with id " + std::to_string(id));
  return read_vehicle(rows[0]);
}

void add_event(Tx& tx, Id battery_id, sys_seconds at, EventKind kind, std::optional<Id> vehicle,
               std::string_view detail) {
  tx.exec_params(
      "INSERT INTO battery_events (battery_id, at, kind, vehicle_id, detail)"
      " VALUES ($1, $2, $3, $4, $5)",
      battery_id, to_db(at), std::string(to_string(kind)), vehicle, std::string(detail));
}

Battery require_in_service(Tx& tx, std::string_view serial) {
  Battery b = battery_by_serial(tx, serial);
  if (b.status == BatteryStatus::retired) {
    fail(StoreErrc::conflict, "battery '" + b.serial + "' is retired", "serial");
  }
  return b;
}

std::optional<std::string> status_text(const BatteryFilter& f) {
  if (!f.status) return std::nullopt;
  return std::string(to_string(*f.status));
}

std::optional<std::string> chemistry_text(const BatteryFilter& f) {
  if (!f.chemistry) return std::nullopt;
  return std::string(models::to_string(*f.chemistry));
}

}  // namespace

Battery battery_by_serial(Tx& tx, std::string_view serial) {
  const auto rows = tx.exec_prepared("battery_by_serial", std::string(serial));
  if (rows.empty()) {
    fail(StoreErrc::not_found, "no battery with serial '" + std::string(serial) + "'", "serial");
  }
  return read_battery(rows[0]);
}

std::vector<Battery> batteries_matching(Tx& tx, const BatteryFilter& f) {
  const auto rows = tx.exec_params(
      std::string(kBatterySelect) +
          " WHERE ($1::bigint IS NULL OR v.depot_id = $1) AND ($2::text IS NULL OR b.status = $2)"
          " AND ($3::text IS NULL OR b.chemistry = $3) ORDER BY b.id",
      f.depot_id, status_text(f), chemistry_text(f));
  std::vector<Battery> out;
  out.reserve(rows.size());
  for (const auto& row : rows) out.push_back(read_battery(row));
  return out;
}

// ---- depots -------------------------------------------------------------------

StoreResult<Depot> PgStore::create_depot(const Depot& d) {
  return write_fleet([&](pqxx::transaction_base& tx) {
    const auto id = run_unique(tx, "name", "a depot named '" + d.name + "' already exists",
                               "INSERT INTO depots (name, time_zone, design_low_c)"
                               " VALUES ($1, $2, $3) RETURNING id",
                               d.name, d.time_zone, d.design_low_c.value);
    return depot_by_id(tx, id[0][0].as<Id>());
  });
}

StoreResult<Depot> PgStore::get_depot(Id id) {
  return read_one([&](Tx& tx) { return depot_by_id(tx, id); });
}

StoreResult<Page<Depot>> PgStore::list_depots(const PageRequest& page) {
  return read_one([&](Tx& tx) {
    const auto rows = tx.exec_params(
        std::string(kDepotSelect) + " WHERE d.id > $1 ORDER BY d.id LIMIT $2", page_after(page),
        page_limit(page) + 1);
    return page_of<Depot>(rows, page_limit(page), read_depot);
  });
}

StoreResult<Depot> PgStore::update_depot(const Depot& d) {
  return write_fleet([&](pqxx::transaction_base& tx) {
    depot_by_id(tx, d.id);
    run_unique(tx, "name", "a depot named '" + d.name + "' already exists",
               "UPDATE depots SET name = $2, time_zone = $3, design_low_c = $4 WHERE id = $1",
               d.id, d.name, d.time_zone, d.design_low_c.value);
    return depot_by_id(tx, d.id);
  });
}

// ---- vehicles -----------------------------------------------------------------

StoreResult<Vehicle> PgStore::create_vehicle(const Vehicle& v) {
  return write_fleet([&](pqxx::transaction_base& tx) {
    require_depot(tx, v.depot_id);
    const auto id = run_unique(
        tx, "code", "a vehicle with code '" + v.code + "' already exists",
        "INSERT INTO vehicles (code, depot_id, engine, displacement_l, required_cca_a)"
        " VALUES ($1, $2, $3, $4, $5) RETURNING id",
        v.code, v.depot_id, std::string(to_string(v.engine)), v.displacement_l,
        raw(v.required_cca_a));
    return vehicle_by_id(tx, id[0][0].as<Id>());
  });
}

StoreResult<Vehicle> PgStore::get_vehicle(Id id) {
  return read_one([&](Tx& tx) { return vehicle_by_id(tx, id); });
}

StoreResult<Page<Vehicle>> PgStore::list_vehicles(const VehicleFilter& filter,
                                                  const PageRequest& page) {
  return read_one([&](Tx& tx) {
    const auto rows = tx.exec_params(std::string(kVehicleSelect) +
                                         " WHERE v.id > $1 AND ($2::bigint IS NULL OR v.depot_id = $2)"
                                         " ORDER BY v.id LIMIT $3",
                                     page_after(page), filter.depot_id, page_limit(page) + 1);
    return page_of<Vehicle>(rows, page_limit(page), read_vehicle);
  });
}

StoreResult<Vehicle> PgStore::update_vehicle(const Vehicle& v) {
  return write_fleet([&](pqxx::transaction_base& tx) {
    vehicle_by_id(tx, v.id);
    require_depot(tx, v.depot_id);
    run_unique(tx, "code", "a vehicle with code '" + v.code + "' already exists",
               "UPDATE vehicles SET code = $2, depot_id = $3, engine = $4, displacement_l = $5,"
               " required_cca_a = $6 WHERE id = $1",
               v.id, v.code, v.depot_id, std::string(to_string(v.engine)), v.displacement_l,
               raw(v.required_cca_a));
    return vehicle_by_id(tx, v.id);
  });
}

// ---- batteries ----------------------------------------------------------------

StoreResult<Battery> PgStore::create_battery(const Battery& b, sys_seconds at) {
  return write_fleet([&](pqxx::transaction_base& tx) {
    if (b.vehicle_id) require_vehicle(tx, *b.vehicle_id);
    const auto id = run_unique(
        tx, "serial", "a battery with serial '" + b.serial + "' already exists",
        "INSERT INTO batteries (serial, chemistry, nominal_v, cells, rated_cca_a,"
        " reserve_capacity_min, capacity_ah, full_charge_sg, installed_on, vehicle_id)"
        " VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10) RETURNING id",
        b.serial, std::string(models::to_string(b.chemistry)), b.nominal_v.value, b.cells,
        b.rated_cca_a.value, b.reserve_capacity_min, b.capacity_ah, raw(b.full_charge_sg),
        to_db(b.installed_on), b.vehicle_id);
    // Registered already in a vehicle: it was fitted on its install date
    // (never later than now), not when somebody typed it in.
    const sys_seconds fitted_at = std::min(sys_seconds{b.installed_on}, at);
    if (b.vehicle_id) add_event(tx, id[0][0].as<Id>(), fitted_at, EventKind::fitted, b.vehicle_id, "");
    return battery_by_serial(tx, b.serial);
  });
}

StoreResult<Battery> PgStore::get_battery(std::string_view serial) {
  const std::uint64_t version = fleet_version_.load(std::memory_order_acquire);
  const auto now = std::chrono::steady_clock::now();
  std::string key(serial);
  {
    std::lock_guard lock(battery_cache_mutex_);
    if (auto it = battery_cache_.find(key); it != battery_cache_.end() &&
                                             it->second.fleet_version == version &&
                                             now < it->second.until)
      return it->second.battery;
  }
  auto found = read_one([&](Tx& tx) { return battery_by_serial(tx, serial); });
  if (found) {
    std::lock_guard lock(battery_cache_mutex_);
    if (battery_cache_.size() >= kMaxCachedBatteries) battery_cache_.clear();
    battery_cache_.insert_or_assign(std::move(key),
                                    CachedBattery{*found, version, now + kBatteryCacheTtl});
  }
  return found;
}

StoreResult<Page<Battery>> PgStore::list_batteries(const BatteryFilter& f,
                                                   const PageRequest& page) {
  return read_one([&](Tx& tx) {
    const auto rows = tx.exec_params(
        std::string(kBatterySelect) +
            " WHERE b.id > $1 AND ($2::bigint IS NULL OR v.depot_id = $2)"
            " AND ($3::text IS NULL OR b.status = $3) AND ($4::text IS NULL OR b.chemistry = $4)"
            " ORDER BY b.id LIMIT $5",
        page_after(page), f.depot_id, status_text(f), chemistry_text(f), page_limit(page) + 1);
    return page_of<Battery>(rows, page_limit(page), read_battery);
  });
}

StoreResult<Battery> PgStore::update_battery(const Battery& b) {
  return write_fleet([&](pqxx::transaction_base& tx) {
    battery_by_serial(tx, b.serial);
    tx.exec_params(
        "UPDATE batteries SET chemistry = $2, nominal_v = $3, cells = $4, rated_cca_a = $5,"
        " reserve_capacity_min = $6, capacity_ah = $7, full_charge_sg = $8, installed_on = $9"
        " WHERE serial = $1",
        b.serial, std::string(models::to_string(b.chemistry)), b.nominal_v.value, b.cells,
        b.rated_cca_a.value, b.reserve_capacity_min, b.capacity_ah, raw(b.full_charge_sg),
        to_db(b.installed_on));
    Battery updated = battery_by_serial(tx, b.serial);
    refresh_battery_facts(tx, updated);  // its readings were derived with the old spec
    return updated;
  });
}

StoreResult<Battery> PgStore::fit_battery(std::string_view serial, Id vehicle_id, sys_seconds at) {
  return write_fleet([&](pqxx::transaction_base& tx) {
    const Battery b = require_in_service(tx, serial);
    require_vehicle(tx, vehicle_id);
    tx.exec_params("UPDATE batteries SET vehicle_id = $2 WHERE id = $1", b.id, vehicle_id);
    add_event(tx, b.id, at, EventKind::fitted, vehicle_id, "");
    return battery_by_serial(tx, serial);
  });
}

StoreResult<Battery> PgStore::retire_battery(std::string_view serial, std::string_view reason,
                                             sys_seconds at) {
  return write_fleet([&](pqxx::transaction_base& tx) {
    const Battery b = require_in_service(tx, serial);
    tx.exec_params(
        "UPDATE batteries SET status = 'retired', retired_at = $2, retire_reason = $3,"
        " vehicle_id = NULL WHERE id = $1",
        b.id, to_db(at), std::string(reason));
    add_event(tx, b.id, at, EventKind::retired, b.vehicle_id, reason);
    return battery_by_serial(tx, serial);
  });
}

StoreResult<std::vector<BatteryEvent>> PgStore::battery_events(std::string_view serial) {
  return read([&](pqxx::dbtransaction& tx) {
    const Battery b = battery_by_serial(tx, serial);
    const auto rows = tx.exec_params(
        "SELECT id, battery_id, at, kind, vehicle_id, detail FROM battery_events"
        " WHERE battery_id = $1 ORDER BY at, id",
        b.id);
    std::vector<BatteryEvent> events;
    for (const auto& r : rows) {
      events.push_back(BatteryEvent{r[0].as<Id>(), r[1].as<Id>(),
                                    seconds_from_db(r[2].as<std::int64_t>()),
                                    text_view(r[3]) == "retired" ? EventKind::retired
                                                                 : EventKind::fitted,
                                    opt_int(r[4]), text(r[5])});
    }
    return events;
  });
}

}  // namespace pbfleet::storage::pg
