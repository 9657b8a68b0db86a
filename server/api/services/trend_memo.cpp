#include "server/api/services/trend_memo.hpp"

#include <vector>

#include "server/api/services/analytics_adapter.hpp"
#include "server/api/services/fleet_index.hpp"

namespace pbfleet::api {

namespace {

bool same_spec(const models::BatterySpec& a, const models::BatterySpec& b) {
  return a.chemistry == b.chemistry && a.cells == b.cells && a.full_charge_sg.value == b.full_charge_sg.value &&
         a.discharged_sg.value == b.discharged_sg.value && a.rated_cca.value == b.rated_cca.value &&
         a.reserve_capacity_min == b.reserve_capacity_min && a.capacity_ah == b.capacity_ah;
}

struct Wanted {
  analytics::BatteryContext context;
  std::int64_t revision = 0;
  std::shared_ptr<const analytics::SulfationBasis> basis;  // null: to build
};

}  // namespace

storage::StoreResult<storage::Done> TrendMemo::each(storage::Store& store, std::optional<storage::Id> depot,
                                                    std::size_t lookback,
                                                    const analytics::AnalyticsSettings& settings,
                                                    const Visit& visit) {
  auto index = load_fleet_index(store);
  if (!index) return index.error();
  storage::BatteryFilter filter{depot, storage::BatteryStatus::in_service, std::nullopt};
  std::vector<Wanted> wanted;
  std::unordered_map<storage::Id, std::size_t> stale;  // battery id -> place in `wanted`
  {
    auto done = store.visit_summaries(filter, [&](const storage::Battery& b, const storage::BatterySummary& s) {
      Wanted w{context_of(b, *index), s.revision, nullptr};
      {
        std::lock_guard lock(mutex_);
        const auto it = kept_.find(b.id);
        if (it != kept_.end() && it->second.revision == s.revision && same_spec(it->second.spec, w.context.spec)) {
          w.basis = it->second.basis;
        }
      }
      if (!w.basis) stale.emplace(b.id, wanted.size());
      wanted.push_back(std::move(w));
    });
    if (!done) return done.error();
  }
  if (!stale.empty()) {
    std::vector<storage::Id> ids;
    ids.reserve(stale.size());
    for (const auto& [id, place] : stale) ids.push_back(id);
    analytics::BatteryHistory history;
    auto done = store.visit_last_measurements_of(
        ids, lookback, [&](const storage::Battery& b, std::span<const storage::ReadingMeasurement> newest_first) {
          Wanted& w = wanted[stale.at(b.id)];
          history.battery = w.context;
          points_ascending(newest_first, history.readings);
          w.basis = std::make_shared<const analytics::SulfationBasis>(analytics::sulfation_basis(history, settings));
        });
    if (!done) return done.error();
    std::lock_guard lock(mutex_);
    for (const auto& [id, place] : stale) {
      const Wanted& w = wanted[place];
      if (w.basis) kept_.insert_or_assign(id, Kept{w.revision, w.context.spec, w.basis});
    }
    counts_.built += stale.size();
  }
  {
    std::lock_guard lock(mutex_);
    counts_.kept += wanted.size() - stale.size();
  }
  for (const Wanted& w : wanted) {
    if (w.basis) {
      visit(w.context, *w.basis);
    } else {  // gone between the two reads: judged on no readings
      visit(w.context, analytics::sulfation_basis(analytics::BatteryHistory{w.context, {}, {}}, settings));
    }
  }
  return storage::Done{};
}

TrendMemo::Counts TrendMemo::counts() const {
  std::lock_guard lock(mutex_);
  return counts_;
}

}  // namespace pbfleet::api
