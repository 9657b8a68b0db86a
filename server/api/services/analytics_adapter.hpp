// Turns what the store holds into what the analytics take: battery specs,
// compact reading points and battery contexts. No I/O.
#pragma once

#include <map>
#include <vector>

#include "models/analytics/history.hpp"
#include "server/storage/domain.hpp"
#include "server/storage/reading_facts.hpp"

namespace pbfleet::api {

// spec_of and point_of live with the store, which derives each reading's
// facts as it stores it (reading_facts.hpp).
using storage::point_of;
using storage::spec_of;
// Points of readings given newest first, returned oldest first.
std::vector<analytics::ReadingPoint> points_ascending(
    const std::vector<storage::StoredReading>& newest_first);
// Same, into `points` (cleared first; its capacity is reused).
void points_ascending(std::span<const storage::ReadingMeasurement> newest_first,
                      std::vector<analytics::ReadingPoint>& points);

// Depots and vehicles by id, for building contexts.
struct FleetIndex {
  std::map<storage::Id, storage::Depot> depots;
  std::map<storage::Id, storage::Vehicle> vehicles;
};
analytics::BatteryContext context_of(const storage::Battery& battery, const FleetIndex& fleet);

}  // namespace pbfleet::api
