#include "models/analytics/sulfation.hpp"

#include <algorithm>
#include <cassert>

#include "models/analytics/derive.hpp"
#include "models/analytics/text.hpp"

namespace pbfleet::analytics {
namespace {

constexpr double kDaysPerMonth = 30.0;
constexpr double kDaysPerYear = 365.0;

struct Series {
  std::vector<double> x, y;
  std::chrono::sys_seconds origin{};
  void add(std::chrono::sys_seconds t, double v) {
    if (x.empty()) origin = t;
    x.push_back(days_between(origin, t));
    y.push_back(v);
  }
};

// What the assessment works from: readings and their derived values.
struct Walk {
  std::span<const ReadingPoint> readings;
  std::span<const DerivedReading> derived;
};

// Days in the window ending at `now` during which the latest trusted SOC
// was below `threshold`; each trusted SOC (ascending taken_at) is held
// until the next one or now.
double undercharge_days(std::span<const std::pair<std::chrono::sys_seconds, double>> trusted_soc,
                        std::chrono::sys_seconds now, double threshold, int window_days) {
  const double window_start = -static_cast<double>(window_days);
  double total = 0.0;
  std::optional<std::pair<double, double>> held;  // (since, soc) relative to now, days
  auto close = [&](double until) {
    if (!held || held->second >= threshold) return;
    total += std::max(0.0, until - std::max(held->first, window_start));
  };
  for (const auto& [taken_at, soc] : trusted_soc) {
    const double at = -days_between(taken_at, now);
    close(std::min(at, 0.0));
    held = std::pair{at, soc};
  }
  close(0.0);
  return total;
}

// The trusted readings' SOC a window of `window_days` ending at or after
// the newest reading can reach: those within it, and the last one before.
std::vector<std::pair<std::chrono::sys_seconds, double>> reachable_trusted_soc(const Walk& w, int window_days) {
  std::vector<std::pair<std::chrono::sys_seconds, double>> all;
  for (std::size_t i = 0; i < w.readings.size(); ++i) {
    if (w.derived[i].trusted) all.emplace_back(w.readings[i].taken_at, *w.derived[i].soc_percent);
  }
  if (w.readings.empty()) return all;
  std::chrono::sys_seconds newest = w.readings.front().taken_at;
  for (const auto& r : w.readings) newest = std::max(newest, r.taken_at);
  // A day's margin: a "now" up to a day before the newest reading (clocks
  // of two servers apart) still finds every reading it needs.
  const auto start = newest - std::chrono::days{window_days + 1};
  std::size_t first = 0;
  while (first + 1 < all.size() && all[first + 1].first <= start) ++first;
  all.erase(all.begin(), all.begin() + static_cast<long>(first));
  return all;
}

void fit_full_charge_trend(const Walk& w, const AnalyticsSettings& s, SulfationAssessment& a) {
  Series after, all;
  for (std::size_t i = 0; i < w.readings.size(); ++i) {
    const auto& d = w.derived[i];
    if (!d.trusted || !d.sg_equivalent) continue;
    all.add(w.readings[i].taken_at, *d.sg_equivalent);
    if (w.readings[i].after_charge) after.add(w.readings[i].taken_at, *d.sg_equivalent);
  }
  const auto min = static_cast<std::size_t>(s.min_trend_readings);
  const Series* chosen = after.x.size() >= min ? &after : (all.x.size() >= min ? &all : nullptr);
  a.trend_basis = chosen == &after ? TrendBasis::after_charge : chosen ? TrendBasis::all_trusted : TrendBasis::none;
  a.trend_points = static_cast<int>(chosen ? chosen->x.size() : all.x.size());
  if (!chosen) {
    a.reasons.push_back("too few readings for a trend: " + std::to_string(all.x.size()) + " trusted of " +
                        std::to_string(s.min_trend_readings) + " needed");
    return;
  }
  a.trend_origin = chosen->origin;
  a.sg_trend = theil_sen(chosen->x, chosen->y, s.trend_confidence);
}

void fit_spread_trend(const Walk& w, const AnalyticsSettings& s, SulfationAssessment& a) {
  Series spread;
  for (std::size_t i = 0; i < w.readings.size(); ++i) {
    const auto& d = w.derived[i];
    if (!d.cell_spread || d.flags.has(Flag::water_added_hold)) continue;
    spread.add(w.readings[i].taken_at, *d.cell_spread);
    a.latest_spread = d.cell_spread;
    a.weak_cell = d.weak_cell;
  }
  if (spread.x.size() >= static_cast<std::size_t>(s.min_trend_readings)) {
    a.spread_trend = theil_sen(spread.x, spread.y, s.trend_confidence);
  }
}

void check_recovery(const Walk& w, const models::BatterySpec& spec, const AnalyticsSettings& s,
                    SulfationAssessment& a) {
  const double floor_sg = spec.full_charge_sg.value - s.recovery_sg_gap;
  std::optional<std::size_t> latest_miss;
  for (std::size_t i = 0; i < w.readings.size(); ++i) {
    const auto& d = w.derived[i];
    if (!w.readings[i].after_charge || !d.trusted || !d.sg_equivalent) continue;
    ++a.charges_seen;
    a.latest_charge_recovered = *d.sg_equivalent >= floor_sg;
    if (!a.latest_charge_recovered) {
      ++a.charges_not_recovered;
      latest_miss = i;
    }
  }
  if (!latest_miss) return;
  a.reasons.push_back("did not recover after " + std::to_string(a.charges_not_recovered) + " of " +
                      std::to_string(a.charges_seen) + " recorded charges; latest " +
                      text::date(w.readings[*latest_miss].taken_at) + ": SG " +
                      text::fixed(*w.derived[*latest_miss].sg_equivalent, 3) + " vs full " +
                      text::fixed(spec.full_charge_sg.value, 3));
}

void check_load_test(const Walk& w, SulfationAssessment& a) {
  for (std::size_t i = w.readings.size(); i-- > 0;) {
    if (!w.readings[i].load_test_end_v) continue;
    a.load_test_failed = w.derived[i].flags.has(Flag::load_test_failed);
    if (a.load_test_failed) {
      a.reasons.push_back("failed a load test on " + text::date(w.readings[i].taken_at) + ": " +
                          text::fixed(w.readings[i].load_test_end_v.value(), 2) + " V vs " +
                          text::fixed(*w.derived[i].load_test_min_v, 2) + " V minimum");
    }
    return;  // only the latest load test counts
  }
}

bool material_fall(const SulfationAssessment& a, const AnalyticsSettings& s) {
  return a.sg_trend && a.sg_trend->significant_fall() &&
         -a.sg_trend->slope * kDaysPerYear >= s.min_trend_drop_sg_per_year;
}

bool hint_of_fall(const SulfationAssessment& a, const AnalyticsSettings& s) {
  return a.sg_trend && a.sg_trend->slope < 0.0 && a.sg_trend->same_sign_fraction >= s.trend_hint_same_sign &&
         -a.sg_trend->slope * kDaysPerYear >= s.min_trend_drop_sg_per_year;
}

bool spread_growing(const SulfationAssessment& a) { return a.spread_trend && a.spread_trend->significant_rise(); }

// A weak cell on a trusted reading right after a charge: recharging did not
// cure it (US Army TM 5-3740-214-14: replace).
bool weak_cell_after_charge(const Walk& w) {
  for (std::size_t i = w.readings.size(); i-- > 0;) {
    if (w.readings[i].after_charge && w.derived[i].trusted) return w.derived[i].flags.has(Flag::cell_spread);
  }
  return false;
}

SulfationClass classify(const SulfationAssessment& a, const AnalyticsSettings& s, bool weak_after_charge) {
  const bool fall = material_fall(a, s);
  if (a.load_test_failed || weak_after_charge) return SulfationClass::likely_permanent;
  if (!a.latest_charge_recovered && (fall || a.charges_not_recovered >= 2)) return SulfationClass::likely_permanent;
  if (fall || !a.latest_charge_recovered || a.undercharge_days >= s.exposure_advancing_days) {
    return SulfationClass::advancing;
  }
  if (a.undercharge_days >= s.exposure_early_days || hint_of_fall(a, s) || spread_growing(a)) {
    return SulfationClass::early;
  }
  return SulfationClass::none;
}

void describe_exposure(SulfationAssessment& a) {
  if (a.undercharge_days <= 0.0) return;
  a.reasons.push_back("undercharged (below " + text::percent(a.undercharge_threshold_pct) + ") for " +
                      text::fixed(a.undercharge_days, 0) + " of the last " +
                      std::to_string(a.exposure_window_days) + " days");
}

void describe_trends(SulfationAssessment& a) {
  if (a.sg_trend) {
    const auto& t = *a.sg_trend;
    a.reasons.push_back(
        std::string(t.slope < 0.0 ? "full-charge SG falling: " : "full-charge SG steady or rising: ") +
        text::fixed(t.slope * kDaysPerMonth, 4) + " per 30 days (Theil-Sen over " + std::to_string(t.points) +
        " readings, " + text::percent(t.confidence * 100.0) + " interval " +
        text::fixed(t.slope_low * kDaysPerMonth, 4) + " to " + text::fixed(t.slope_high * kDaysPerMonth, 4) +
        ", " + text::percent(t.same_sign_fraction * 100.0) + " of pairs agree)");
  }
  if (spread_growing(a)) {
    a.reasons.push_back("cell spread growing " + text::fixed(a.spread_trend->slope * kDaysPerMonth, 4) +
                        " per 30 days, now " + text::fixed(a.latest_spread.value_or(0.0), 3));
  }
  if (a.weak_cell) {
    a.reasons.push_back("cell " + std::to_string(*a.weak_cell) + " is weak: spread " +
                        text::fixed(a.latest_spread.value_or(0.0), 3));
  }
}

void recommend(SulfationAssessment& a, models::Chemistry chemistry) {
  auto add = [&](Action act, std::optional<std::string_view> caution) {
    a.actions.push_back(act);
    if (caution) a.cautions.push_back(*caution);
  };
  switch (a.level) {
    case SulfationClass::none: break;
    case SulfationClass::early: add(Action::recharge, kChargeCaution); break;
    case SulfationClass::advancing:
      add(Action::recharge, kChargeCaution);
      if (chemistry == models::Chemistry::flooded) add(Action::equalise, kEqualiseCaution);
      add(Action::load_test, kLoadTestCaution);
      break;
    case SulfationClass::likely_permanent:
      if (!a.load_test_failed) add(Action::load_test, kLoadTestCaution);
      add(Action::replace, std::nullopt);
      break;
  }
}

}  // namespace

std::string_view to_string(SulfationClass c) {
  switch (c) {
    case SulfationClass::none: return "none";
    case SulfationClass::early: return "early";
    case SulfationClass::advancing: return "advancing";
    case SulfationClass::likely_permanent: return "likely_permanent";
  }
  return "unknown";
}

std::string_view to_string(Action a) {
  switch (a) {
    case Action::keep_watching: return "keep_watching";
    case Action::recharge: return "recharge";
    case Action::equalise: return "equalise";
    case Action::load_test: return "load_test";
    case Action::replace: return "replace";
  }
  return "unknown";
}

std::string_view to_string(TrendBasis b) {
  switch (b) {
    case TrendBasis::after_charge: return "after_charge";
    case TrendBasis::all_trusted: return "all_trusted";
    case TrendBasis::none: return "none";
  }
  return "unknown";
}

SulfationBasis sulfation_basis(const BatteryHistory& history, const AnalyticsSettings& s) {
  const auto derived = derive_all(history.readings, history.battery.spec, s);
  return sulfation_basis(history, derived, s);
}

SulfationBasis sulfation_basis(const BatteryHistory& history, std::span<const DerivedReading> derived,
                               const AnalyticsSettings& s) {
  assert(derived.size() == history.readings.size());
  const Walk w{history.readings, derived};
  SulfationBasis basis;
  SulfationAssessment& a = basis.fixed;
  fit_full_charge_trend(w, s, a);
  fit_spread_trend(w, s, a);
  describe_trends(a);
  check_recovery(w, history.battery.spec, s, a);
  check_load_test(w, a);
  basis.weak_after_charge = weak_cell_after_charge(w);
  basis.trusted_soc = reachable_trusted_soc(w, s.exposure_window_days);
  for (const auto& r : history.readings) {
    if (!basis.newest_reading || r.taken_at > *basis.newest_reading) basis.newest_reading = r.taken_at;
  }
  return basis;
}

SulfationAssessment assess_sulfation(const BatteryContext& battery, const SulfationBasis& basis,
                                     std::chrono::sys_seconds now, const AnalyticsSettings& s) {
  SulfationAssessment a = basis.fixed;
  a.serial = battery.serial;
  a.depot_id = battery.depot_id;
  a.depot_name = battery.depot_name;
  a.exposure_window_days = s.exposure_window_days;
  a.undercharge_threshold_pct = undercharge_threshold_pct(s, battery.spec.chemistry);
  a.undercharge_days =
      undercharge_days(basis.trusted_soc, now, a.undercharge_threshold_pct, s.exposure_window_days);
  // The exposure reason comes first, then the trends, recovery and load test.
  std::vector<std::string> reasons;
  std::swap(reasons, a.reasons);
  describe_exposure(a);
  a.reasons.insert(a.reasons.end(), reasons.begin(), reasons.end());
  a.level = classify(a, s, basis.weak_after_charge);
  recommend(a, battery.spec.chemistry);
  return a;
}

SulfationAssessment assess_sulfation(const BatteryHistory& history, std::chrono::sys_seconds now,
                                     const AnalyticsSettings& s) {
  const auto derived = derive_all(history.readings, history.battery.spec, s);
  return assess_sulfation(history, derived, now, s);
}

SulfationAssessment assess_sulfation(const BatteryHistory& history, std::span<const DerivedReading> derived,
                                     std::chrono::sys_seconds now, const AnalyticsSettings& s) {
  SulfationBasis basis = sulfation_basis(history, derived, s);
  // Every trusted SOC, so any "now" (also one before the newest reading) is judged as always.
  basis.trusted_soc.clear();
  for (std::size_t i = 0; i < derived.size(); ++i) {
    if (derived[i].trusted) basis.trusted_soc.emplace_back(history.readings[i].taken_at, *derived[i].soc_percent);
  }
  return assess_sulfation(history.battery, basis, now, s);
}

std::vector<SulfationAssessment> sulfation_report(std::span<const BatteryHistory> fleet,
                                                  std::chrono::sys_seconds now, const AnalyticsSettings& s) {
  std::vector<SulfationAssessment> out;
  for (const auto& h : fleet) {
    if (h.battery.in_service) out.push_back(assess_sulfation(h, now, s));
  }
  sort_sulfation_report(out);
  return out;
}

void sort_sulfation_report(std::vector<SulfationAssessment>& report) {
  std::sort(report.begin(), report.end(), [](const auto& a, const auto& b) {
    if (a.level != b.level) return a.level > b.level;
    if (a.undercharge_days != b.undercharge_days) return a.undercharge_days > b.undercharge_days;
    return a.serial < b.serial;
  });
}

}  // namespace pbfleet::analytics
