#include "server/api/services/analytics_adapter.hpp"

namespace pbfleet::api {

void points_ascending(std::span<const storage::ReadingMeasurement> newest_first,
                      std::vector<analytics::ReadingPoint>& points) {
  points.clear();
  for (auto it = newest_first.rbegin(); it != newest_first.rend(); ++it)
    points.push_back(point_of(*it));
}

std::vector<analytics::ReadingPoint> points_ascending(
    const std::vector<storage::StoredReading>& newest_first) {
  std::vector<analytics::ReadingPoint> points;
  points.reserve(newest_first.size());
  for (auto it = newest_first.rbegin(); it != newest_first.rend(); ++it)
    points.push_back(point_of(*it));
  return points;
}

analytics::BatteryContext context_of(const storage::Battery& b, const FleetIndex& fleet) {
  analytics::BatteryContext c;
  c.serial = b.serial;
  c.spec = spec_of(b);
  c.installed_on = b.installed_on;
  c.in_service = b.status == storage::BatteryStatus::in_service;
  if (b.vehicle_id) {
    if (auto v = fleet.vehicles.find(*b.vehicle_id); v != fleet.vehicles.end()) {
      c.vehicle_code = v->second.code;
      c.required_cca = v->second.required_cca_a;
      c.engine = v->second.engine == storage::Engine::diesel ? models::EngineKind::diesel
                                                             : models::EngineKind::gasoline;
      c.displacement_l = v->second.displacement_l;
      c.depot_id = v->second.depot_id;
    }
  }
  if (auto d = fleet.depots.find(c.depot_id); d != fleet.depots.end()) {
    c.depot_name = d->second.name;
    c.depot_design_low = d->second.design_low_c;
  }
  return c;
}

}  // namespace pbfleet::api
