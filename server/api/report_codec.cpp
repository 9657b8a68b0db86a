#include "server/api/report_codec.hpp"

#include <cstdio>

#include "models/wire/csv.hpp"
#include "models/wire/precision.hpp"
#include "models/wire/reading.hpp"
#include "server/api/json_fields.hpp"
#include "server/api/json_text.hpp"

namespace pbfleet::api {

namespace wire = models::wire;

namespace {

// Published decimals (models/wire/precision.hpp): percentages, degrees,
// days and ratios alike, amperes, specific gravities. Trend slopes and
// their statistics are left whole: they are small numbers whose digits
// matter.
template <class Number>
Number as_derived(const Number& v) { return wire::rounded(v, wire::kDerivedDecimals); }
template <class Number>
Number as_amperes(const Number& v) { return wire::rounded(v, wire::kAmpDecimals); }
template <class Number>
Number as_sg(const Number& v) { return wire::rounded(v, wire::kSgDecimals); }

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

template <class List>
void write_strings(JsonText& w, const List& list) {
  w.begin_array();
  for (const auto& s : list) w.value(std::string_view(s));
  w.end_array();
}

void write_risk(JsonText& w, const analytics::WinterRisk& r) {
  w.begin_object();
  w.key("serial").value(r.serial).key("depot_id").value(r.depot_id);
  w.key("depot_name").value(r.depot_name).key("vehicle_code").value(r.vehicle_code);
  w.key("level").value(analytics::to_string(r.level)).key("low_c").value(as_derived(r.low_c));
  w.key("reading_at");
  r.reading_at ? w.value(wire::timestamp_text(*r.reading_at).view()) : w.null();
  w.key("data_age_days").value(as_derived(r.data_age_days));
  w.key("soc_at_reading_percent").value(as_derived(r.soc_at_reading_percent));
  w.key("projected_soc_percent").value(as_derived(r.projected_soc_percent));
  w.key("available_a").value(as_amperes(r.available_a)).key("required_a").value(as_amperes(r.required_a));
  w.key("crank_margin").value(as_derived(r.crank_margin));
  w.key("crank_margin_full").value(as_derived(r.crank_margin_full));
  w.key("freezing_point_c").value(as_derived(r.freezing_point_c));
  w.key("freeze_margin_c").value(as_derived(r.freeze_margin_c));
  w.key("replacement_expected").value(r.replacement_expected);
  w.key("reasons");
  write_strings(w, r.reasons);
  w.key("action").value(r.action).key("cautions");
  write_strings(w, r.cautions);
  w.end_object();
}

void write_depot(JsonText& w, const analytics::DepotWinterSummary& d) {
  w.begin_object();
  w.key("depot_id").value(d.depot_id).key("depot_name").value(d.depot_name);
  w.key("low_c").value(as_derived(d.low_c)).key("batteries").value(d.batteries);
  w.key("act_now").value(d.act_now).key("watch").value(d.watch);
  w.key("no_data").value(d.no_data).key("ok").value(d.ok);
  w.key("expected_replacements").value(d.expected_replacements);
  w.key("oldest_data_days").value(as_derived(d.oldest_data_days));
  w.end_object();
}

void write_trend(JsonText& w, const std::optional<analytics::TrendFit>& t) {
  if (!t) {
    w.null();
    return;
  }
  w.begin_object();
  w.key("points").value(t->points).key("slope_per_day").value(t->slope);
  w.key("slope_low").value(t->slope_low).key("slope_high").value(t->slope_high);
  w.key("confidence").value(t->confidence).key("same_sign_fraction").value(t->same_sign_fraction);
  w.end_object();
}

void write_sulfation(JsonText& w, const analytics::SulfationAssessment& a) {
  w.begin_object();
  w.key("serial").value(a.serial).key("depot_id").value(a.depot_id);
  w.key("depot_name").value(a.depot_name).key("level").value(analytics::to_string(a.level));
  w.key("undercharge_days").value(as_derived(a.undercharge_days));
  w.key("exposure_window_days").value(a.exposure_window_days);
  w.key("undercharge_threshold_pct").value(as_derived(a.undercharge_threshold_pct));
  w.key("trend_basis").value(analytics::to_string(a.trend_basis));
  w.key("trend_points").value(a.trend_points);
  w.key("sg_trend");
  write_trend(w, a.sg_trend);
  w.key("spread_trend");
  write_trend(w, a.spread_trend);
  w.key("latest_spread").value(as_sg(a.latest_spread)).key("weak_cell").value(a.weak_cell);
  w.key("charges_seen").value(a.charges_seen);
  w.key("charges_not_recovered").value(a.charges_not_recovered);
  w.key("latest_charge_recovered").value(a.latest_charge_recovered);
  w.key("load_test_failed").value(a.load_test_failed);
  w.key("reasons");
  write_strings(w, a.reasons);
  w.key("actions").begin_array();
  for (auto act : a.actions) w.value(analytics::to_string(act));
  w.end_array();
  w.key("cautions");
  write_strings(w, a.cautions);
  w.end_object();
}

void write_day(JsonText& w, const std::optional<std::chrono::sys_days>& d) {
  d ? w.value(format_date(*d)) : w.null();
}

void write_replacement(JsonText& w, const analytics::ReplacementForecast& f) {
  w.begin_object();
  w.key("serial").value(f.serial).key("depot_id").value(f.depot_id);
  w.key("depot_name").value(f.depot_name).key("criterion").value(analytics::to_string(f.criterion));
  w.key("threshold_sg").value(as_sg(f.threshold_sg)).key("design_low_c").value(as_derived(f.design_low_c));
  w.key("date");
  write_day(w, f.date);
  w.key("earliest");
  write_day(w, f.earliest);
  w.key("latest");
  write_day(w, f.latest);
  w.key("already_crossed").value(f.already_crossed);
  w.key("slope_sg_per_30d").value(f.slope_sg_per_30d).key("reason").value(f.reason);
  w.end_object();
}

// About this many bytes of JSON per battery (a winter item with two
// reasons is ~750): reserving once avoids regrowing a multi-MB string.
constexpr std::size_t kBytesPerItem = 800;
}  // namespace

std::string winter_json(const analytics::WinterReport& report) {
  std::string out;
  JsonText w(out);
  out.reserve(kBytesPerItem * report.batteries.size() + 256 * report.depots.size() + 64);
  w.begin_object().key("cold_date").value(format_date(report.cold_date));
  w.key("batteries").begin_array();
  for (const auto& r : report.batteries) write_risk(w, r);
  w.end_array().key("depots").begin_array();
  for (const auto& d : report.depots) write_depot(w, d);
  w.end_array().end_object();
  return out;
}

std::string sulfation_json(const std::vector<analytics::SulfationAssessment>& report) {
  std::string out;
  JsonText w(out);
  out.reserve(kBytesPerItem * report.size() + 64);
  w.begin_object().key("items").begin_array();
  for (const auto& a : report) write_sulfation(w, a);
  w.end_array().end_object();
  return out;
}

std::string replacement_json(const std::vector<analytics::ReplacementForecast>& report) {
  std::string out;
  JsonText w(out);
  out.reserve(kBytesPerItem / 2 * report.size() + 64);
  w.begin_object().key("items").begin_array();
  for (const auto& f : report) write_replacement(w, f);
  w.end_array().end_object();
  return out;
}

std::string overdue_json(const std::vector<analytics::DepotOverdue>& report, int days) {
  std::string out;
  JsonText w(out);
  w.begin_object().key("days").value(days).key("items").begin_array();
  for (const auto& d : report) {
    for (const auto& b : d.batteries) {
      w.begin_object();
      w.key("depot_id").value(d.depot_id).key("depot_name").value(d.depot_name);
      w.key("serial").value(b.serial).key("vehicle_code").value(b.vehicle_code);
      w.key("last_reading");
      b.last_reading ? w.value(wire::timestamp_text(*b.last_reading).view()) : w.null();
      w.key("days_overdue_basis").value(as_derived(b.days_overdue_basis));
      w.key("never_read").value(b.never_read);
      w.end_object();
    }
  }
  w.end_array().end_object();
  return out;
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
