#include "server/api/services/fleet_index.hpp"

namespace pbfleet::api {

storage::StoreResult<FleetIndex> load_fleet_index(storage::Store& store,
                                                  std::optional<storage::Id> depot) {
  FleetIndex index;
  storage::PageRequest page{storage::kMaxPageLimit, {}};
  do {
    auto depots = store.list_depots(page);
    if (!depots) return depots.error();
    for (auto& d : depots->items) index.depots.emplace(d.id, std::move(d));
    page.cursor = depots->next_cursor;
  } while (!page.cursor.empty());
  storage::VehicleFilter filter{depot};
  do {
    auto vehicles = store.list_vehicles(filter, page);
    if (!vehicles) return vehicles.error();
    for (auto& v : vehicles->items) index.vehicles.emplace(v.id, std::move(v));
    page.cursor = vehicles->next_cursor;
  } while (!page.cursor.empty());
  return index;
}

storage::StoreResult<analytics::BatteryContext> context_for(storage::Store& store,
                                                            const storage::Battery& battery) {
  FleetIndex index;
  if (battery.vehicle_id) {
    auto vehicle = store.get_vehicle(*battery.vehicle_id);
    if (!vehicle) return vehicle.error();
    auto depot = store.get_depot(vehicle->depot_id);
    if (!depot) return depot.error();
    index.vehicles.emplace(vehicle->id, vehicle.value());
    index.depots.emplace(depot->id, depot.value());
  }
  return context_of(battery, index);
}

}  // namespace pbfleet::api
