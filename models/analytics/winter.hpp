// Winter risk: will each battery crank, and stay unfrozen, at the coming low?
//
// For every in-service battery: take its latest trusted reading (no surface
// charge suspected, and a settled OCV or hydrometer readings; see
// DerivedReading::trusted), project its SOC to the cold date with
// models::project_soc, then judge the crank margin (models::available_cca vs
// models::required_current_at) and the freeze margin (models::freeze_margin_c)
// at the low. Temperature assumption for the self-discharge: daily mean
// temperature falls linearly from the reading's electrolyte temperature (25
// degC if not measured) on the reading day to the low on the cold date, one
// value per day (a plain assumption; a forecast profile can replace it).
#pragma once

#include <chrono>
#include <cstdint>
#include <map>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "models/analytics/history.hpp"
#include "models/analytics/safety.hpp"

namespace pbfleet::analytics {

// Plain-word risk levels, most urgent first in ranking.
enum class RiskLevel {
  act_now,   // will likely not crank, or may freeze, at the low
  watch,     // thin margin, low SOC, or stale data
  no_data,   // no trusted reading to judge from
  ok,
};
// "act_now", "watch", "no_data", "ok".
std::string_view to_string(RiskLevel level);

// Where the low temperature comes from, in order of precedence:
// a single low for every depot, a forecast low per depot id, else each
// depot's design low.
struct ColdSpec {
  std::chrono::sys_days cold_date{};              // date the low is expected
  std::optional<models::Celsius> low;             // one low for all depots
  std::map<std::int64_t, models::Celsius> depot_lows;  // forecast low per depot id
};

// The low that applies to a battery under a ColdSpec.
models::Celsius low_for(const BatteryContext& battery, const ColdSpec& cold);

// How many of a battery's newest readings the report looks back through
// for a trusted one (a quarter of weekly rounds). The store's per-battery
// summaries keep exactly what this look-back finds (schema 0004).
inline constexpr std::size_t kWinterLookback = 13;

// What the server hands in per battery: context plus its latest few
// readings (ascending taken_at; the report looks back for a trusted one).
struct WinterInput {
  const BatteryContext* battery = nullptr;        // REQUIRES: not null
  std::span<const ReadingPoint> recent;
};

// The newest trusted reading's values the judgement rests on.
struct TrustedBasis {
  std::chrono::sys_seconds taken_at{};
  double soc_percent = 0.0;
  double electrolyte_c = 25.0;                     // used for the corrections (25 if not measured)
};

// All the winter judgement needs of a battery's readings: the newest
// reading's time, how many readings were looked at, and the newest trusted
// one among them. Kept per battery by the store, or worked out from the
// readings with winter_basis.
struct WinterBasis {
  std::optional<std::chrono::sys_seconds> latest_at;  // newest reading of any kind
  std::size_t recent = 0;                          // readings looked at (<= kWinterLookback)
  std::optional<TrustedBasis> trusted;             // newest trusted among them
};

// The basis from a battery's newest readings (ascending taken_at, ties in
// storage order; at most kWinterLookback are looked at, the newest).
WinterBasis winter_basis(std::span<const ReadingPoint> recent, const models::BatterySpec& spec,
                         const AnalyticsSettings& settings);

// One battery and its basis.
struct WinterCase {
  const BatteryContext* battery = nullptr;        // REQUIRES: not null
  WinterBasis basis;
};

struct WinterRisk {
  std::string serial;
  std::int64_t depot_id = 0;
  std::string depot_name;
  std::string vehicle_code;
  RiskLevel level = RiskLevel::no_data;
  double low_c = 0.0;                              // low judged at
  // Basis
  std::optional<std::chrono::sys_seconds> reading_at;  // latest trusted reading
  std::optional<double> data_age_days;             // now - latest reading of any kind
  std::optional<double> soc_at_reading_percent;
  std::optional<double> projected_soc_percent;     // at the cold date
  // Cranking (when rated CCA and the engine need are known)
  std::optional<double> available_a;               // at the low and projected SOC
  std::optional<double> required_a;                // engine need at the low
  std::optional<double> crank_margin;              // available / required
  std::optional<double> crank_margin_full;         // same, if fully charged
  // Freezing
  std::optional<double> freezing_point_c;          // at the projected SOC
  std::optional<double> freeze_margin_c;           // low above freezing point: + safe
  bool replacement_expected = false;               // would not crank even fully charged
  std::vector<std::string> reasons;                // sentences, most important first
  std::string action;                              // one recommended step, in words
  std::vector<std::string_view> cautions;          // safety texts for the action, if any
};

struct DepotWinterSummary {
  std::int64_t depot_id = 0;
  std::string depot_name;
  double low_c = 0.0;
  int batteries = 0;
  int act_now = 0;
  int watch = 0;
  int no_data = 0;
  int ok = 0;
  int expected_replacements = 0;
  std::optional<double> oldest_data_days;          // stalest battery's data age
};

struct WinterReport {
  std::chrono::sys_days cold_date{};
  std::vector<WinterRisk> batteries;               // ranked: most at risk first
  std::vector<DepotWinterSummary> depots;          // by depot name
};

// Judges one battery. `now` is the report time (data age is measured to it).
WinterRisk assess_winter(const BatteryContext& battery, const WinterBasis& basis,
                         const ColdSpec& cold, std::chrono::sys_seconds now,
                         const AnalyticsSettings& settings);
// Same, from its readings (winter_basis first).
WinterRisk assess_winter(const WinterInput& input, const ColdSpec& cold,
                         std::chrono::sys_seconds now, const AnalyticsSettings& settings);

// Judges every in-service battery, ranks them (level, then crank margin, then
// freeze margin, then serial) and summarises per depot.
WinterReport winter_report(std::span<const WinterInput> inputs, const ColdSpec& cold,
                           std::chrono::sys_seconds now, const AnalyticsSettings& settings);
// Same, from bases (the store's summaries): no reading is derived here.
WinterReport winter_report(std::span<const WinterCase> cases, const ColdSpec& cold,
                           std::chrono::sys_seconds now, const AnalyticsSettings& settings);

// Ordering used by the ranking: true when `a` is more urgent than `b`.
bool more_urgent(const WinterRisk& a, const WinterRisk& b);

}  // namespace pbfleet::analytics
