// Report use cases: read what each report needs from the store (never whole
// histories for the winter report), build battery contexts, run the
// analytics.
//
// Look-back per battery: winter reads the store's per-battery summaries,
// which hold what a look-back over the last kWinterLookback readings finds
// (the latest trusted one); sulfation and replacement take the last
// kTrendLookback (five years of weekly rounds); overdue takes only the
// latest.
#pragma once

#include <optional>
#include <vector>

#include "models/analytics/overdue.hpp"
#include "models/analytics/replacement.hpp"
#include "models/analytics/sulfation.hpp"
#include "models/analytics/winter.hpp"
#include "server/api/services/report_cache.hpp"
#include "server/api/services/trend_memo.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

inline constexpr std::size_t kWinterLookback = analytics::kWinterLookback;
inline constexpr std::size_t kTrendLookback = 5 * 52;   // five years of weekly rounds

storage::StoreResult<analytics::WinterReport> build_winter_report(
    storage::Store& store, std::optional<storage::Id> depot, const analytics::ColdSpec& cold,
    std::chrono::sys_seconds now, const analytics::AnalyticsSettings& settings);

// Sulfation and replacement judge each battery from its basis kept in
// `memo` (trend_memo.hpp), built from its last kTrendLookback readings
// when missing or stale.
storage::StoreResult<std::vector<analytics::SulfationAssessment>> build_sulfation_report(
    storage::Store& store, TrendMemo& memo, std::optional<storage::Id> depot,
    std::chrono::sys_seconds now, const analytics::AnalyticsSettings& settings);

storage::StoreResult<std::vector<analytics::ReplacementForecast>> build_replacement_report(
    storage::Store& store, TrendMemo& memo, std::optional<storage::Id> depot,
    std::chrono::sys_seconds now, const analytics::AnalyticsSettings& settings);

storage::StoreResult<std::vector<analytics::DepotOverdue>> build_overdue_report(
    storage::Store& store, std::optional<storage::Id> depot, std::chrono::sys_seconds now, int days);

// The same reports through the cache: built once per depot scope,
// parameters and data version (report_cache.hpp), with default settings.
// `key` of each is the report's cache key, for callers that keep rendered
// forms beside it.
std::string winter_key(std::optional<storage::Id> depot, const analytics::ColdSpec& cold);
std::string trend_key(std::string_view report, std::optional<storage::Id> depot);
std::string overdue_key(std::optional<storage::Id> depot, int days);

storage::StoreResult<std::shared_ptr<const analytics::WinterReport>> cached_winter_report(
    ReportCache& cache, storage::Store& store, std::optional<storage::Id> depot,
    const analytics::ColdSpec& cold, std::chrono::sys_seconds now);
storage::StoreResult<std::shared_ptr<const std::vector<analytics::SulfationAssessment>>>
cached_sulfation_report(ReportCache& cache, TrendMemo& memo, storage::Store& store,
                        std::optional<storage::Id> depot, std::chrono::sys_seconds now);
storage::StoreResult<std::shared_ptr<const std::vector<analytics::ReplacementForecast>>>
cached_replacement_report(ReportCache& cache, TrendMemo& memo, storage::Store& store,
                          std::optional<storage::Id> depot, std::chrono::sys_seconds now);
storage::StoreResult<std::shared_ptr<const std::vector<analytics::DepotOverdue>>> cached_overdue_report(
    ReportCache& cache, storage::Store& store, std::optional<storage::Id> depot,
    std::chrono::sys_seconds now, int days);

}  // namespace pbfleet::api
