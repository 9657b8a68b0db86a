#include "models/analytics/replacement.hpp"

#include <algorithm>
#include <cmath>

#include "models/analytics/derive.hpp"
#include "models/analytics/text.hpp"

namespace pbfleet::analytics {
namespace {

using std::chrono::sys_days;
constexpr double kDaysPerMonth = 30.0;

double margin_at(const BatteryContext& b, models::Celsius low, models::Amperes required, double soc) {
  return models::crank_margin(models::available_cca(b.spec.rated_cca, low, models::Percent{soc}), required);
}

sys_days day_at(std::chrono::sys_seconds origin, double x_days) {
  const auto t = origin + std::chrono::seconds(std::llround(x_days * 86400.0));
  return std::chrono::floor<std::chrono::days>(t);
}

// x where a line through the fit's centre with `slope` reaches `sg`.
double crossing_x(const TrendFit& fit, double slope, double sg) {
  return fit.centre_x + (sg - fit.at(fit.centre_x)) / slope;
}

void choose_threshold(const BatteryContext& b, const AnalyticsSettings& s, ReplacementForecast& f) {
  const double capacity_sg = sg_for_soc(models::Percent{s.replace_capacity_pct}, b.spec).value;
  const auto crank_sg = cranking_threshold_sg(b, b.depot_design_low);
  f.criterion = crank_sg && *crank_sg > capacity_sg ? ReplaceCriterion::cranking : ReplaceCriterion::capacity;
  f.threshold_sg = std::max(capacity_sg, crank_sg.value_or(capacity_sg));
}

std::string threshold_words(const ReplacementForecast& f) {
  return text::fixed(f.threshold_sg, 3) + " (" +
         (f.criterion == ReplaceCriterion::cranking ? "cranking at " + text::celsius(f.design_low_c)
                                                    : std::string("capacity")) +
         ")";
}

void date_crossing(const TrendFit& fit, double x_now, std::chrono::sys_seconds origin,
                   const AnalyticsSettings& s, ReplacementForecast& f) {
  const double x = crossing_x(fit, fit.slope, f.threshold_sg);
  if (x - x_now > s.forecast_horizon_days) {
    f.reason = "full-charge SG reaches " + threshold_words(f) + " beyond the " +
               std::to_string(s.forecast_horizon_days) + "-day horizon";
    return;
  }
  f.date = day_at(origin, x);
  f.earliest = day_at(origin, std::max(x_now, crossing_x(fit, fit.slope_low, f.threshold_sg)));
  if (fit.slope_high < 0.0) f.latest = day_at(origin, crossing_x(fit, fit.slope_high, f.threshold_sg));
  f.reason = "full-charge SG " + text::fixed(fit.at(x_now), 3) + " falling " +
             text::fixed(fit.slope * kDaysPerMonth, 4) + " per 30 days reaches " + threshold_words(f) +
             " around " + text::date(*f.date) + " (" + text::date(*f.earliest) + " to " +
             (f.latest ? text::date(*f.latest) : std::string("not in sight")) + ")";
}

}  // namespace

std::string_view to_string(ReplaceCriterion c) {
  return c == ReplaceCriterion::cranking ? "cranking" : "capacity";
}

std::optional<double> cranking_threshold_sg(const BatteryContext& b, models::Celsius low) {
  const auto need = required_cca_at_test(b);
  if (!need || b.spec.rated_cca.value <= 0.0) return std::nullopt;
  const auto required = models::required_current_at(*need, low);
  if (margin_at(b, low, required, 100.0) < 1.0) return b.spec.full_charge_sg.value;
  if (margin_at(b, low, required, 0.0) >= 1.0) return b.spec.discharged_sg.value;
  double lo = 0.0, hi = 100.0;  // margin(lo) < 1 <= margin(hi)
  constexpr int kBisectionSteps = 30;  // 100 % / 2^30: far below 0.01 %
  for (int i = 0; i < kBisectionSteps; ++i) {
    const double mid = 0.5 * (lo + hi);
    (margin_at(b, low, required, mid) < 1.0 ? lo : hi) = mid;
  }
  return sg_for_soc(models::Percent{hi}, b.spec).value;
}

ReplacementForecast forecast_replacement(const BatteryContext& b, const SulfationAssessment& a,
                                         std::chrono::sys_seconds now, const AnalyticsSettings& s) {
  ReplacementForecast f;
  f.serial = b.serial;
  f.depot_id = b.depot_id;
  f.depot_name = b.depot_name;
  f.design_low_c = b.depot_design_low.value;
  choose_threshold(b, s, f);
  if (!a.sg_trend) {
    f.reason = "no trend yet: " + std::to_string(a.trend_points) + " trusted readings of " +
               std::to_string(s.min_trend_readings) + " needed";
    return f;
  }
  const auto& fit = *a.sg_trend;
  f.slope_sg_per_30d = fit.slope * kDaysPerMonth;
  const double x_now = days_between(a.trend_origin, now);
  if (fit.at(x_now) <= f.threshold_sg) {
    f.already_crossed = true;
    f.date = f.earliest = f.latest = std::chrono::floor<std::chrono::days>(now);
    f.reason = "fitted full-charge SG " + text::fixed(fit.at(x_now), 3) + " is already at or below " +
               threshold_words(f);
    return f;
  }
  if (fit.slope >= 0.0) {
    f.reason = "full-charge SG not falling (" + text::fixed(fit.slope * kDaysPerMonth, 4) + " per 30 days)";
    return f;
  }
  date_crossing(fit, x_now, a.trend_origin, s, f);
  return f;
}

void sort_for_budget(std::vector<ReplacementForecast>& forecasts) {
  std::sort(forecasts.begin(), forecasts.end(), [](const auto& a, const auto& b) {
    if (a.date.has_value() != b.date.has_value()) return a.date.has_value();
    if (a.date && *a.date != *b.date) return *a.date < *b.date;
    return a.serial < b.serial;
  });
}

std::vector<ReplacementForecast> replacement_report(std::span<const BatteryHistory> fleet,
                                                    std::chrono::sys_seconds now, const AnalyticsSettings& s) {
  std::vector<ReplacementForecast> out;
  for (const auto& h : fleet) {
    if (!h.battery.in_service) continue;
    out.push_back(forecast_replacement(h.battery, assess_sulfation(h, now, s), now, s));
  }
  sort_for_budget(out);
  return out;
}

}  // namespace pbfleet::analytics
