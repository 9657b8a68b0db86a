#include "models/analytics/winter.hpp"

#include <algorithm>
#include <map>

#include "models/analytics/derive.hpp"
#include "models/analytics/text.hpp"
#include "models/freeze_point.hpp"
#include "models/self_discharge.hpp"

namespace pbfleet::analytics {
namespace {

using models::Celsius;
using models::Percent;
using std::chrono::floor;
using std::chrono::sys_days;

// Longest self-discharge projection (days): beyond a year the data says
// nothing about today's charge anyway.
constexpr int kMaxProjectionDays = 366;
constexpr double kFullSocPct = 100.0;


// Daily means falling linearly from `start` on the reading day to `low` on
// the cold date (the documented temperature assumption).
std::vector<Celsius> daily_profile(Celsius start, Celsius low, int days) {
  std::vector<Celsius> temps;
  temps.reserve(static_cast<std::size_t>(days));
  for (int i = 1; i <= days; ++i) {
    const double f = static_cast<double>(i) / days;
    temps.push_back(Celsius{start.value + f * (low.value - start.value)});
  }
  return temps;
}

double project(const TrustedBasis& b, const BatteryContext& battery, const ColdSpec& cold, Celsius low) {
  const double soc = b.soc_percent;
  const auto days = (cold.cold_date - floor<std::chrono::days>(b.taken_at)).count();
  if (days <= 0) return soc;
  const int n = static_cast<int>(std::min<long long>(days, kMaxProjectionDays));
  const auto temps = daily_profile(Celsius{b.electrolyte_c}, low, n);
  return models::project_soc(Percent{soc}, temps, battery.spec.chemistry).value;
}

void judge_cranking(const BatteryContext& battery, Celsius low, WinterRisk& r) {
  const auto need = required_cca_at_test(battery);
  const std::string projected =
      "projected " + text::percent(*r.projected_soc_percent) + " SOC at " + text::celsius(low.value);
  if (battery.spec.rated_cca.value <= 0.0 || !need) {
    r.reasons.push_back(projected + (battery.spec.rated_cca.value <= 0.0
                                         ? "; cranking not judged: rated CCA not recorded"
                                         : "; cranking not judged: engine cranking need not recorded"));
    return;
  }
  const auto required = models::required_current_at(*need, low);
  const auto available = models::available_cca(battery.spec.rated_cca, low, Percent{*r.projected_soc_percent});
  const auto full = models::available_cca(battery.spec.rated_cca, low, Percent{kFullSocPct});
  r.available_a = available.value;
  r.required_a = required.value;
  r.crank_margin = models::crank_margin(available, required);
  r.crank_margin_full = models::crank_margin(full, required);
  r.replacement_expected = *r.crank_margin_full < 1.0;
  r.reasons.push_back(projected + "; available " + text::amperes(available.value) + " vs " +
                      text::amperes(required.value) + " needed");
  if (r.replacement_expected) {
    r.reasons.push_back("would not crank even fully charged: " + text::amperes(full.value) + " vs " +
                        text::amperes(required.value) + " needed");
  }
}

void judge_freezing(const BatteryContext& battery, Celsius low, WinterRisk& r) {
  const auto sg = sg_for_soc(Percent{*r.projected_soc_percent}, battery.spec);
  const auto fp = models::freezing_point(sg);
  const auto margin = models::freeze_margin_c(sg, low);
  if (!fp || !margin) return;
  r.freezing_point_c = fp->value;
  r.freeze_margin_c = *margin;
  if (*margin <= 0.0) {
    r.reasons.push_back("electrolyte at SG " + text::fixed(sg.value, 3) + " freezes at " +
                        text::celsius(fp->value) + ", above the " + text::celsius(low.value) + " low");
  }
}

RiskLevel level_of(const WinterRisk& r, double threshold_pct, const AnalyticsSettings& s) {
  if (r.crank_margin && *r.crank_margin < 1.0) return RiskLevel::act_now;
  if (r.freeze_margin_c && *r.freeze_margin_c <= 0.0) return RiskLevel::act_now;
  const bool thin_crank = r.crank_margin && *r.crank_margin < s.crank_watch_margin;
  const bool thin_freeze = r.freeze_margin_c && *r.freeze_margin_c < s.freeze_watch_margin_c;
  const bool low_soc = *r.projected_soc_percent < threshold_pct;
  const bool stale = r.data_age_days && *r.data_age_days > s.overdue_days;
  return (thin_crank || thin_freeze || low_soc || stale) ? RiskLevel::watch : RiskLevel::ok;
}

void add_watch_reasons(const WinterRisk& r, double threshold_pct, const AnalyticsSettings& s,
                       std::vector<std::string>& out) {
  if (r.crank_margin && *r.crank_margin >= 1.0 && *r.crank_margin < s.crank_watch_margin) {
    out.push_back("crank margin " + text::fixed(*r.crank_margin, 2) + " is thin (watch below " +
                  text::fixed(s.crank_watch_margin, 2) + ")");
  }
  if (r.freeze_margin_c && *r.freeze_margin_c > 0.0 && *r.freeze_margin_c < s.freeze_watch_margin_c) {
    out.push_back("electrolyte freezes at " + text::celsius(*r.freezing_point_c) + ", only " +
                  text::fixed(*r.freeze_margin_c, 0) + " C below the low");
  }
  if (*r.projected_soc_percent < threshold_pct) {
    out.push_back("projected SOC " + text::percent(*r.projected_soc_percent) + " is below the " +
                  text::percent(threshold_pct) + " recharge threshold");
  }
}

void choose_action(WinterRisk& r, double threshold_pct, const AnalyticsSettings& s) {
  if (r.replacement_expected) {
    r.action = "will not crank at the low even fully charged: fit a higher-rated battery or plan engine and battery heating before the cold date";
  } else if (r.level == RiskLevel::act_now || *r.projected_soc_percent < threshold_pct) {
    r.action = "recharge fully before the cold date, then take a settled reading";
    r.cautions.push_back(kChargeCaution);
  } else if (r.level == RiskLevel::watch) {
    // Say what to do about what made it a watch, most serious first: a
    // fresh settled reading does not widen a thin crank margin.
    if (r.crank_margin && *r.crank_margin < s.crank_watch_margin) {
      r.action = "keep it fully charged and load-test it before the cold date; if it fails, fit a higher-rated battery";
      r.cautions.push_back(kChargeCaution);
      r.cautions.push_back(kLoadTestCaution);
    } else if (r.freeze_margin_c && *r.freeze_margin_c < s.freeze_watch_margin_c) {
      r.action = "keep it fully charged through the cold spell: a charged battery freezes far lower";
      r.cautions.push_back(kChargeCaution);
    } else {
      r.action = "take a settled reading (rest 4 h or more) on the next round";
    }
  } else {
    r.action = "none";
  }
}

WinterRisk base_of(const BatteryContext& b, Celsius low) {
  WinterRisk r;
  r.serial = b.serial;
  r.depot_id = b.depot_id;
  r.depot_name = b.depot_name;
  r.vehicle_code = b.vehicle_code;
  r.low_c = low.value;
  return r;
}

void note_staleness(WinterRisk& r, const AnalyticsSettings& s) {
  if (r.data_age_days && *r.data_age_days > s.overdue_days) {
    r.reasons.push_back("latest reading " + text::fixed(*r.data_age_days, 0) + " days old");
  }
}

WinterRisk no_data(WinterRisk r, const WinterBasis& basis, const AnalyticsSettings& s) {
  r.level = RiskLevel::no_data;
  r.reasons.push_back(basis.recent == 0
                          ? std::string("no readings on record")
                          : "no trusted reading among the latest " + std::to_string(basis.recent) +
                                " (surface charge, unsettled OCV or no SOC)");
  note_staleness(r, s);
  r.action = "take a settled reading (rest 4 h or more) on the next round";
  return r;
}

void add_to_summary(const WinterRisk& r, DepotWinterSummary& d) {
  ++d.batteries;
  switch (r.level) {
    case RiskLevel::act_now: ++d.act_now; break;
    case RiskLevel::watch: ++d.watch; break;
    case RiskLevel::no_data: ++d.no_data; break;
    case RiskLevel::ok: ++d.ok; break;
  }
  if (r.replacement_expected) ++d.expected_replacements;
  if (r.data_age_days && (!d.oldest_data_days || *r.data_age_days > *d.oldest_data_days)) {
    d.oldest_data_days = r.data_age_days;
  }
}

std::vector<DepotWinterSummary> summarise(const std::vector<WinterRisk>& risks) {
  std::map<std::int64_t, DepotWinterSummary> by_id;
  for (const auto& r : risks) {
    auto& d = by_id[r.depot_id];
    d.depot_id = r.depot_id;
    d.depot_name = r.depot_name;
    d.low_c = r.low_c;
    add_to_summary(r, d);
  }
  std::vector<DepotWinterSummary> out;
  for (auto& [id, d] : by_id) out.push_back(std::move(d));
  std::sort(out.begin(), out.end(), [](const auto& a, const auto& b) {
    return a.depot_name != b.depot_name ? a.depot_name < b.depot_name : a.depot_id < b.depot_id;
  });
  return out;
}

// Missing values rank after present ones.
int compare_ascending(const std::optional<double>& a, const std::optional<double>& b) {
  if (a && b) return *a < *b ? -1 : (*b < *a ? 1 : 0);
  return a ? -1 : (b ? 1 : 0);
}

}  // namespace

std::string_view to_string(RiskLevel level) {
  switch (level) {
    case RiskLevel::act_now: return "act_now";
    case RiskLevel::watch: return "watch";
    case RiskLevel::no_data: return "no_data";
    case RiskLevel::ok: return "ok";
  }
  return "unknown";
}

models::Celsius low_for(const BatteryContext& battery, const ColdSpec& cold) {
  if (cold.low) return *cold.low;
  const auto it = cold.depot_lows.find(battery.depot_id);
  return it != cold.depot_lows.end() ? it->second : battery.depot_design_low;
}

WinterBasis winter_basis(std::span<const ReadingPoint> recent, const models::BatterySpec& spec,
                         const AnalyticsSettings& s) {
  if (recent.size() > kWinterLookback) recent = recent.last(kWinterLookback);
  WinterBasis basis;
  basis.recent = recent.size();
  if (!recent.empty()) basis.latest_at = recent.back().taken_at;
  for (auto it = recent.rbegin(); it != recent.rend(); ++it) {
    const auto d = derive(*it, spec, s);
    if (d.trusted) {
      basis.trusted = TrustedBasis{it->taken_at, *d.soc_percent, d.electrolyte_c};
      break;
    }
  }
  return basis;
}

WinterRisk assess_winter(const WinterInput& in, const ColdSpec& cold, std::chrono::sys_seconds now,
                         const AnalyticsSettings& s) {
  return assess_winter(*in.battery, winter_basis(in.recent, in.battery->spec, s), cold, now, s);
}

WinterRisk assess_winter(const BatteryContext& battery, const WinterBasis& basis, const ColdSpec& cold,
                         std::chrono::sys_seconds now, const AnalyticsSettings& s) {
  const Celsius low = low_for(battery, cold);
  WinterRisk r = base_of(battery, low);
  if (basis.latest_at) r.data_age_days = days_between(*basis.latest_at, now);
  if (!basis.trusted) return no_data(std::move(r), basis, s);
  r.reading_at = basis.trusted->taken_at;
  r.soc_at_reading_percent = basis.trusted->soc_percent;
  r.projected_soc_percent = project(*basis.trusted, battery, cold, low);
  judge_cranking(battery, low, r);
  judge_freezing(battery, low, r);
  const double threshold = undercharge_threshold_pct(s, battery.spec.chemistry);
  r.level = level_of(r, threshold, s);
  add_watch_reasons(r, threshold, s, r.reasons);
  note_staleness(r, s);
  choose_action(r, threshold, s);
  return r;
}

bool more_urgent(const WinterRisk& a, const WinterRisk& b) {
  if (a.level != b.level) return static_cast<int>(a.level) < static_cast<int>(b.level);
  if (const int c = compare_ascending(a.crank_margin, b.crank_margin)) return c < 0;
  if (const int c = compare_ascending(a.freeze_margin_c, b.freeze_margin_c)) return c < 0;
  return a.serial < b.serial;
}

WinterReport winter_report(std::span<const WinterInput> inputs, const ColdSpec& cold,
                           std::chrono::sys_seconds now, const AnalyticsSettings& settings) {
  std::vector<WinterCase> cases;
  cases.reserve(inputs.size());
  for (const auto& in : inputs) {
    cases.push_back({in.battery, winter_basis(in.recent, in.battery->spec, settings)});
  }
  return winter_report(cases, cold, now, settings);
}

WinterReport winter_report(std::span<const WinterCase> cases, const ColdSpec& cold,
                           std::chrono::sys_seconds now, const AnalyticsSettings& settings) {
  WinterReport report;
  report.cold_date = cold.cold_date;
  report.batteries.reserve(cases.size());
  for (const auto& c : cases) {
    if (c.battery->in_service) report.batteries.push_back(assess_winter(*c.battery, c.basis, cold, now, settings));
  }
  std::sort(report.batteries.begin(), report.batteries.end(), more_urgent);
  report.depots = summarise(report.batteries);
  return report;
}

}  // namespace pbfleet::analytics
