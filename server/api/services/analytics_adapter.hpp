// Turns what the store holds into what the analytics take: battery specs,
// compact reading points and battery contexts. No I/O.
#pragma once

#include <map>
#include <vector>

#include "models/analytics/history.hpp"
#include "server/storage/domain.hpp"

namespace pbfleet::api {

// The model spec of a stored battery: chemistry defaults, then its own
// cell count, full-charge SG and ratings.
models::BatterySpec spec_of(const storage::Battery& battery);
// A reading as a compact analytics point (Celsius, raw SG per cell).
analytics::ReadingPoint point_of(const models::wire::ReadingInput& reading);
analytics::ReadingPoint point_of(const storage::ReadingMeasurement& reading);
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
