// Overdue readings: in-service batteries with no reading for more than N
// days (default 10: weekly rounds plus a few days' grace, common practice),
// grouped by depot so each depot's crew sees its own list.
#pragma once

#include <chrono>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "models/analytics/history.hpp"

namespace pbfleet::analytics {

// What the server hands in per battery: context and its latest reading time.
struct LastSeen {
  const BatteryContext* battery = nullptr;          // REQUIRES: not null
  std::optional<std::chrono::sys_seconds> last_reading;
};

struct OverdueBattery {
  std::string serial;
  std::string vehicle_code;
  std::optional<std::chrono::sys_seconds> last_reading;  // nullopt: never read
  // Days since the last reading, or since installation when never read
  // (nullopt when neither is known).
  std::optional<double> days_overdue_basis;
  bool never_read = false;
};

struct DepotOverdue {
  std::int64_t depot_id = 0;
  std::string depot_name;
  std::vector<OverdueBattery> batteries;            // longest silence first
};

// Groups overdue in-service batteries by depot (depots by name; depots with
// none overdue are left out). `days` > 0.
std::vector<DepotOverdue> overdue_report(std::span<const LastSeen> fleet,
                                         std::chrono::sys_seconds now, int days);

// True when a battery last read at `last` is overdue at `now`.
bool is_overdue(std::optional<std::chrono::sys_seconds> last, std::chrono::sys_seconds now, int days);

}  // namespace pbfleet::analytics
