// Loading the depots and vehicles the analytics need as battery context.
// Depots and vehicles are few next to readings (a fleet has hundreds to
// thousands), so a report loads them all once, page by page.
#pragma once

#include "server/api/services/analytics_adapter.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

// Every depot and vehicle (optionally only one depot's vehicles).
storage::StoreResult<FleetIndex> load_fleet_index(storage::Store& store,
                                                  std::optional<storage::Id> depot = std::nullopt);
// The context of one battery: its vehicle and that vehicle's depot only.
storage::StoreResult<analytics::BatteryContext> context_for(storage::Store& store,
                                                            const storage::Battery& battery);

}  // namespace pbfleet::api
