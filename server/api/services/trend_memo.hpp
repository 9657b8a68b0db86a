// Sulfation bases kept per battery between reports.
//
// The sulfation and replacement reports judge each battery on its last
// five years of readings: deriving them and fitting the trends is nearly
// all their cost. A battery's basis (analytics::SulfationBasis: trends,
// recovery, load test, cells, and the trusted SOC the exposure needs) only
// changes when its readings or its spec do, so the memo keeps one per
// battery with the summary revision it was built at (Store::visit_summaries)
// and the spec, and a report reads and derives only the batteries whose
// revision or spec moved on since. The exposure, level and actions, which
// depend on "now", are worked out on every report.
//
// A basis built from readings newer than the revision it is kept under is
// built again next time (the revision read first), never served stale.
// Memory: about 1 KB per battery. Safe to use from any thread.
#pragma once

#include <chrono>
#include <cstdint>
#include <functional>
#include <memory>
#include <mutex>
#include <optional>
#include <unordered_map>

#include "models/analytics/sulfation.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

class TrendMemo {
 public:
  using Visit = std::function<void(const analytics::BatteryContext& battery,
                                   const analytics::SulfationBasis& basis)>;
  // Calls `visit` for each in-service battery (of one depot, or all) in
  // battery id order with its basis (last `lookback` readings), building
  // only the missing or stale ones.
  storage::StoreResult<storage::Done> each(storage::Store& store, std::optional<storage::Id> depot,
                                           std::size_t lookback, const analytics::AnalyticsSettings& settings,
                                           const Visit& visit);

  struct Counts {
    std::uint64_t kept = 0;   // bases served from the memo
    std::uint64_t built = 0;  // bases built from readings
  };
  [[nodiscard]] Counts counts() const;

 private:
  struct Kept {
    std::int64_t revision = 0;
    models::BatterySpec spec;
    std::shared_ptr<const analytics::SulfationBasis> basis;
  };
  mutable std::mutex mutex_;
  std::unordered_map<storage::Id, Kept> kept_;  // GUARDED_BY(mutex_)
  Counts counts_;                               // GUARDED_BY(mutex_)
};

}  // namespace pbfleet::api
