#include "server/api/report_codec.hpp"

#include <cstdio>

#include "models/wire/csv.hpp"
#include "models/wire/reading.hpp"
#include "server/api/json_fields.hpp"

namespace pbfleet::api {

using nlohmann::json;
namespace wire = models::wire;

namespace {

template <class T>
json opt(const std::optional<T>& v) {
  return v ? json(*v) : json(nullptr);
}
json opt_time(const std::optional<std::chrono::sys_seconds>& t) {
  return t ? json(wire::format_timestamp(*t)) : json(nullptr);
}
json opt_day(const std::optional<std::chrono::sys_days>& d) {
  return d ? json(format_date(*d)) : json(nullptr);
}
template <class List>
json words(const List& list) {
  json out = json::array();
  for (const auto& w : list) out.push_back(std::string(w));
  return out;
}

// Builds a CSV document; text cells guarded, number cells plain.
class Csv {
 public:
  explicit Csv(const std::vector<std::string>& header) {
    for (const auto& h : header) text(h);
    end_row();
  }
  Csv& text(std::string_view s) { return cell(wire::csv_cell(s)); }
  Csv& number(std::optional<double> v) {
    if (!v) return cell("");
    char buffer[32];
    std::snprintf(buffer, sizeof buffer, "%.6g", *v);
    return cell(buffer);
  }
  Csv& whole(long long v) { return cell(std::to_string(v)); }
  Csv& boolean(bool v) { return cell(v ? "true" : "false"); }
  void end_row() {
    out_ += "\r\n";
    first_ = true;
  }
  [[nodiscard]] const std::string& str() const { return out_; }

 private:
  Csv& cell(std::string_view s) {
    if (!first_) out_ += ',';
    out_ += s;
    first_ = false;
    return *this;
  }
  std::string out_;
  bool first_ = true;
};

std::string joined(const std::vector<std::string>& parts) {
  std::string out;
  for (const auto& p : parts) out += (out.empty() ? "" : "; ") + p;
  return out;
}

json risk_json(const analytics::WinterRisk& r) {
  return {{"serial", r.serial},
          {"depot_id", r.depot_id},
          {"depot_name", r.depot_name},
          {"vehicle_code", r.vehicle_code},
          {"level", analytics::to_string(r.level)},
          {"low_c", r.low_c},
          {"reading_at", opt_time(r.reading_at)},
          {"data_age_days", opt(r.data_age_days)},
          {"soc_at_reading_percent", opt(r.soc_at_reading_percent)},
          {"projected_soc_percent", opt(r.projected_soc_percent)},
          {"available_a", opt(r.available_a)},
          {"required_a", opt(r.required_a)},
          {"crank_margin", opt(r.crank_margin)},
          {"crank_margin_full", opt(r.crank_margin_full)},
          {"freezing_point_c", opt(r.freezing_point_c)},
          {"freeze_margin_c", opt(r.freeze_margin_c)},
          {"replacement_expected", r.replacement_expected},
          {"reasons", r.reasons},
          {"action", r.action},
          {"cautions", words(r.cautions)}};
}

json depot_json(const analytics::DepotWinterSummary& d) {
  return {{"depot_id", d.depot_id},   {"depot_name", d.depot_name},
          {"low_c", d.low_c},         {"batteries", d.batteries},
          {"act_now", d.act_now},     {"watch", d.watch},
          {"no_data", d.no_data},     {"ok", d.ok},
          {"expected_replacements", d.expected_replacements},
          {"oldest_data_days", opt(d.oldest_data_days)}};
}

json trend_json(const std::optional<analytics::TrendFit>& t) {
  if (!t) return nullptr;
  return {{"points", t->points},         {"slope_per_day", t->slope},
          {"slope_low", t->slope_low},   {"slope_high", t->slope_high},
          {"confidence", t->confidence}, {"same_sign_fraction", t->same_sign_fraction}};
}

json sulfation_item(const analytics::SulfationAssessment& a) {
  json actions = json::array();
  for (auto act : a.actions) actions.push_back(analytics::to_string(act));
  return {{"serial", a.serial},
          {"depot_id", a.depot_id},
          {"depot_name", a.depot_name},
          {"level", analytics::to_string(a.level)},
          {"undercharge_days", a.undercharge_days},
          {"exposure_window_days", a.exposure_window_days},
          {"undercharge_threshold_pct", a.undercharge_threshold_pct},
          {"trend_basis", analytics::to_string(a.trend_basis)},
          {"trend_points", a.trend_points},
          {"sg_trend", trend_json(a.sg_trend)},
          {"spread_trend", trend_json(a.spread_trend)},
          {"latest_spread", opt(a.latest_spread)},
          {"weak_cell", opt(a.weak_cell)},
          {"charges_seen", a.charges_seen},
          {"charges_not_recovered", a.charges_not_recovered},
          {"latest_charge_recovered", a.latest_charge_recovered},
          {"load_test_failed", a.load_test_failed},
          {"reasons", a.reasons},
          {"actions", std::move(actions)},
          {"cautions", words(a.cautions)}};
}

json replacement_item(const analytics::ReplacementForecast& f) {
  return {{"serial", f.serial},
          {"depot_id", f.depot_id},
          {"depot_name", f.depot_name},
          {"criterion", analytics::to_string(f.criterion)},
          {"threshold_sg", f.threshold_sg},
          {"design_low_c", f.design_low_c},
          {"date", opt_day(f.date)},
          {"earliest", opt_day(f.earliest)},
          {"latest", opt_day(f.latest)},
          {"already_crossed", f.already_crossed},
          {"slope_sg_per_30d", opt(f.slope_sg_per_30d)},
          {"reason", f.reason}};
}

}  // namespace

json winter_json(const analytics::WinterReport& report) {
  json batteries = json::array(), depots = json::array();
  for (const auto& r : report.batteries) batteries.push_back(risk_json(r));
  for (const auto& d : report.depots) depots.push_back(depot_json(d));
  return {{"cold_date", format_date(report.cold_date)},
          {"batteries", std::move(batteries)},
          {"depots", std::move(depots)}};
}

json sulfation_json(const std::vector<analytics::SulfationAssessment>& report) {
  json items = json::array();
  for (const auto& a : report) items.push_back(sulfation_item(a));
  return {{"items", std::move(items)}};
}

json replacement_json(const std::vector<analytics::ReplacementForecast>& report) {
  json items = json::array();
  for (const auto& f : report) items.push_back(replacement_item(f));
  return {{"items", std::move(items)}};
}

json overdue_json(const std::vector<analytics::DepotOverdue>& report, int days) {
  json items = json::array();
  for (const auto& d : report)
    for (const auto& b : d.batteries)
      items.push_back({{"depot_id", d.depot_id},
                       {"depot_name", d.depot_name},
                       {"serial", b.serial},
                       {"vehicle_code", b.vehicle_code},
                       {"last_reading", opt_time(b.last_reading)},
                       {"days_overdue_basis", opt(b.days_overdue_basis)},
                       {"never_read", b.never_read}});
  return {{"days", days}, {"items", std::move(items)}};
}

std::string winter_csv(const analytics::WinterReport& report) {
  Csv csv({"serial", "depot_name", "vehicle_code", "level", "low_c", "projected_soc_percent",
           "crank_margin", "freeze_margin_c", "reading_at", "action", "reasons"});
  for (const auto& r : report.batteries) {
    csv.text(r.serial).text(r.depot_name).text(r.vehicle_code).text(analytics::to_string(r.level));
    csv.number(r.low_c).number(r.projected_soc_percent).number(r.crank_margin);
    csv.number(r.freeze_margin_c);
    csv.text(r.reading_at ? wire::format_timestamp(*r.reading_at) : "");
    csv.text(r.action).text(joined(r.reasons));
    csv.end_row();
  }
  return csv.str();
}

std::string sulfation_csv(const std::vector<analytics::SulfationAssessment>& report) {
  Csv csv({"serial", "depot_name", "level", "undercharge_days", "latest_spread", "weak_cell",
           "charges_not_recovered", "actions", "reasons"});
  for (const auto& a : report) {
    std::vector<std::string> actions;
    for (auto act : a.actions) actions.emplace_back(analytics::to_string(act));
    csv.text(a.serial).text(a.depot_name).text(analytics::to_string(a.level));
    csv.number(a.undercharge_days).number(a.latest_spread);
    csv.number(a.weak_cell ? std::optional<double>(*a.weak_cell) : std::nullopt);
    csv.whole(a.charges_not_recovered).text(joined(actions)).text(joined(a.reasons));
    csv.end_row();
  }
  return csv.str();
}

std::string replacement_csv(const std::vector<analytics::ReplacementForecast>& report) {
  Csv csv({"serial", "depot_name", "criterion", "date", "earliest", "latest", "already_crossed",
           "slope_sg_per_30d", "reason"});
  auto day = [](const std::optional<std::chrono::sys_days>& d) {
    return d ? format_date(*d) : std::string{};
  };
  for (const auto& f : report) {
    csv.text(f.serial).text(f.depot_name).text(analytics::to_string(f.criterion));
    csv.text(day(f.date)).text(day(f.earliest)).text(day(f.latest));
    csv.boolean(f.already_crossed).number(f.slope_sg_per_30d).text(f.reason);
    csv.end_row();
  }
  return csv.str();
}

std::string overdue_csv(const std::vector<analytics::DepotOverdue>& report) {
  Csv csv({"depot_name", "serial", "vehicle_code", "last_reading", "days_overdue_basis",
           "never_read"});
  for (const auto& d : report) {
    for (const auto& b : d.batteries) {
      csv.text(d.depot_name).text(b.serial).text(b.vehicle_code);
      csv.text(b.last_reading ? wire::format_timestamp(*b.last_reading) : "");
      csv.number(b.days_overdue_basis).boolean(b.never_read);
      csv.end_row();
    }
  }
  return csv.str();
}

}  // namespace pbfleet::api
