#include "server/api/services/analytics_adapter.hpp"

namespace pbfleet::api {

models::BatterySpec spec_of(const storage::Battery& b) {
  models::BatterySpec spec = models::default_spec(b.chemistry, b.cells);
  if (b.full_charge_sg) spec.full_charge_sg = *b.full_charge_sg;
  spec.rated_cca = b.rated_cca_a;
  spec.reserve_capacity_min = b.reserve_capacity_min;
  spec.capacity_ah = b.capacity_ah;
  return spec;
}

namespace {

// The fields both reading shapes share; the electrolyte in Celsius given.
template <class Reading>
analytics::ReadingPoint point_with(const Reading& r, std::optional<double> electrolyte_c) {
  analytics::ReadingPoint p;
  p.taken_at = r.taken_at;
  if (r.ocv) p.ocv_v = r.ocv->value;
  if (electrolyte_c) p.electrolyte_c = *electrolyte_c;
  if (r.rest) p.rest_h = r.rest->value;
  if (r.load_test_current) p.load_test_a = r.load_test_current->value;
  if (r.load_test_end) p.load_test_end_v = r.load_test_end->value;
  p.cells = analytics::CellSgs(r.cell_sg);
  p.after_charge = r.after_charge;
  p.water_added = r.water_added;
  return p;
}

}  // namespace

analytics::ReadingPoint point_of(const models::wire::ReadingInput& r) {
  return point_with(r, r.electrolyte ? std::optional<double>(r.electrolyte->value.value) : std::nullopt);
}

analytics::ReadingPoint point_of(const storage::ReadingMeasurement& r) {
  return point_with(r, r.electrolyte ? std::optional<double>(r.electrolyte->value) : std::nullopt);
}

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
