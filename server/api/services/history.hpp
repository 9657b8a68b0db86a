// One battery's history as the bay terminal sees it: every reading raw and
// derived, and its events, for the API's history route and the dashboard's
// battery page alike.
#pragma once

#include <chrono>
#include <optional>
#include <vector>

#include "models/analytics/history_view.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

struct LoadedHistory {
  std::vector<storage::StoredReading> readings;  // taken in [from, to], oldest first
  analytics::HistoryView view;                   // rows match `readings` one to one
  analytics::BatteryContext context;
};

// Reads the battery's readings up to `to` (derived values carry state, the
// water hold, from before `from`), its events and context, and builds the view.
storage::StoreResult<LoadedHistory> load_history(storage::Store& store,
                                                 const storage::Battery& battery,
                                                 std::optional<std::chrono::sys_seconds> from,
                                                 std::optional<std::chrono::sys_seconds> to);

}  // namespace pbfleet::api
