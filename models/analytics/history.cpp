#include "models/analytics/history.hpp"

#include <cmath>

namespace pbfleet::analytics {

CellSgs::CellSgs(std::span<const models::SpecificGravity> sgs) {
  for (const auto sg : sgs) push_back(sg);
}

CellSgs::CellSgs(std::initializer_list<double> sgs) {
  for (const double sg : sgs) push_back(models::SpecificGravity{sg});
}

void CellSgs::push_back(models::SpecificGravity sg) {
  assert(count_ < kMaxCellsPerReading);
  assert(sg.value >= 0.0 && sg.value <= 6.5);
  tenth_points_[count_++] = static_cast<std::uint16_t>(std::lround(sg.value * kScale));
}

std::string_view to_string(EventKind kind) {
  switch (kind) {
    case EventKind::fitted: return "fitted";
    case EventKind::charged: return "charged";
    case EventKind::water_added: return "water_added";
    case EventKind::retired: return "retired";
  }
  return "unknown";
}

std::optional<models::Amperes> required_cca_at_test(const BatteryContext& battery) {
  if (battery.required_cca && battery.required_cca->value > 0.0) return battery.required_cca;
  if (battery.engine && battery.displacement_l && *battery.displacement_l > 0.0) {
    return models::required_cca_for_engine(*battery.engine, *battery.displacement_l);
  }
  return std::nullopt;
}

double undercharge_threshold_pct(const AnalyticsSettings& settings, models::Chemistry chemistry) {
  return settings.undercharge_soc_pct.at(static_cast<std::size_t>(chemistry));
}

double days_between(std::chrono::sys_seconds from, std::chrono::sys_seconds to) {
  return static_cast<double>((to - from).count()) / 86400.0;
}

}  // namespace pbfleet::analytics
