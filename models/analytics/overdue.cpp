#include "models/analytics/overdue.hpp"

#include <algorithm>
#include <cassert>
#include <map>

namespace pbfleet::analytics {
namespace {

OverdueBattery entry_for(const LastSeen& seen, std::chrono::sys_seconds now) {
  OverdueBattery e;
  e.serial = seen.battery->serial;
  e.vehicle_code = seen.battery->vehicle_code;
  e.last_reading = seen.last_reading;
  e.never_read = !seen.last_reading;
  if (seen.last_reading) {
    e.days_overdue_basis = days_between(*seen.last_reading, now);
  } else if (seen.battery->installed_on) {
    e.days_overdue_basis = days_between(std::chrono::sys_seconds{*seen.battery->installed_on}, now);
  }
  return e;
}

// Longest silence first; never-read batteries without a date go last.
bool longer_silence(const OverdueBattery& a, const OverdueBattery& b) {
  if (a.days_overdue_basis.has_value() != b.days_overdue_basis.has_value()) return a.days_overdue_basis.has_value();
  if (a.days_overdue_basis && *a.days_overdue_basis != *b.days_overdue_basis) {
    return *a.days_overdue_basis > *b.days_overdue_basis;
  }
  return a.serial < b.serial;
}

}  // namespace

bool is_overdue(std::optional<std::chrono::sys_seconds> last, std::chrono::sys_seconds now, int days) {
  return !last || days_between(*last, now) > days;
}

std::vector<DepotOverdue> overdue_report(std::span<const LastSeen> fleet, std::chrono::sys_seconds now, int days) {
  assert(days > 0);
  std::map<std::int64_t, DepotOverdue> by_id;
  for (const auto& seen : fleet) {
    const auto& b = *seen.battery;
    if (!b.in_service || !is_overdue(seen.last_reading, now, days)) continue;
    auto& depot = by_id[b.depot_id];
    depot.depot_id = b.depot_id;
    depot.depot_name = b.depot_name;
    depot.batteries.push_back(entry_for(seen, now));
  }
  std::vector<DepotOverdue> out;
  for (auto& [id, depot] : by_id) {
    std::sort(depot.batteries.begin(), depot.batteries.end(), longer_silence);
    out.push_back(std::move(depot));
  }
  std::sort(out.begin(), out.end(), [](const auto& a, const auto& b) {
    return a.depot_name != b.depot_name ? a.depot_name < b.depot_name : a.depot_id < b.depot_id;
  });
  return out;
}

}  // namespace pbfleet::analytics
