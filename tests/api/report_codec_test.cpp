// The report bodies are written as text (JsonText); each must parse to the
// document the reference below builds member by member with nlohmann, the
// way the handlers built it before (same names, same value kinds: whole
// numbers as integers, measurements as doubles, missing values as null).
#include "server/api/report_codec.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include <nlohmann/json.hpp>

#include "models/wire/precision.hpp"
#include "models/wire/reading.hpp"
#include "server/api/json_fields.hpp"

namespace pbfleet::api {
namespace {

using nlohmann::json;
using std::chrono::sys_days;
using std::chrono::sys_seconds;

template <class T>
json opt(const std::optional<T>& v) {
  return v ? json(*v) : json(nullptr);
}

template <class List>
json words(const List& list) {
  json out = json::array();
  for (const auto& w : list) out.push_back(std::string(w));
  return out;
}

constexpr sys_days kDay{std::chrono::year{2026} / 12 / 14};

analytics::WinterRisk full_risk() {
  analytics::WinterRisk r;
  r.serial = "FV-\"0001\"";                 // escaped quote
  r.depot_id = 3;
  r.depot_name = "Fjellvik \xC3\xB8st \xFF";  // UTF-8 kept, a bad byte replaced
  r.vehicle_code = "BUS-7";
  r.level = analytics::RiskLevel::act_now;
  r.low_c = -25.0;
  r.reading_at = sys_seconds{kDay} - std::chrono::hours{24 * 20};
  r.data_age_days = 20.5;
  r.soc_at_reading_percent = 61.25;
  r.projected_soc_percent = 48.0;
  r.available_a = 312.5;
  r.required_a = 410.0;
  r.crank_margin = 312.5 / 410.0;
  r.crank_margin_full = 1.0e-5;
  r.freezing_point_c = -17.3;
  r.freeze_margin_c = -7.7;
  r.replacement_expected = true;
  r.reasons = {"projected 48 % SOC at -25 degC", "line\nbreak\ttab"};
  r.action = "recharge now";
  r.cautions = {analytics::kChargeCaution};
  return r;
}

// A value as the reports publish it (models/wire/precision.hpp): ratios,
// percentages, degrees and days to 3 decimals, amperes to 1.
json published(const std::optional<double>& v, int decimals = models::wire::kDerivedDecimals) {
  return opt(models::wire::rounded(v, decimals));
}

json risk_reference(const analytics::WinterRisk& r) {
  return {{"serial", r.serial},
          {"depot_id", r.depot_id},
          {"depot_name", r.depot_name},
          {"vehicle_code", r.vehicle_code},
          {"level", analytics::to_string(r.level)},
          {"low_c", r.low_c},
          {"reading_at", r.reading_at ? json(models::wire::format_timestamp(*r.reading_at)) : json(nullptr)},
          {"data_age_days", published(r.data_age_days)},
          {"soc_at_reading_percent", published(r.soc_at_reading_percent)},
          {"projected_soc_percent", published(r.projected_soc_percent)},
          {"available_a", published(r.available_a, models::wire::kAmpDecimals)},
          {"required_a", published(r.required_a, models::wire::kAmpDecimals)},
          {"crank_margin", published(r.crank_margin)},
          {"crank_margin_full", published(r.crank_margin_full)},
          {"freezing_point_c", published(r.freezing_point_c)},
          {"freeze_margin_c", published(r.freeze_margin_c)},
          {"replacement_expected", r.replacement_expected},
          {"reasons", r.reasons},
          {"action", r.action},
          {"cautions", words(r.cautions)}};
}

std::string dump(const json& j) { return j.dump(-1, ' ', false, json::error_handler_t::replace); }

// Parses `text` and compares with `expected` as the handlers' dump sent it
// (invalid UTF-8 replaced), also member kinds: an integer written as 3.0
// would compare equal to 3, but dumps as "3.0".
void check_same(const std::string& text, const json& expected) {
  const json got = json::parse(text);  // throws on malformed text
  const json sent = json::parse(dump(expected));
  CHECK(got == sent);
  CHECK(dump(got) == dump(sent));
}

TEST_CASE("report numbers are published with the stated decimals, no floating-point tails") {
  analytics::WinterReport report;
  report.cold_date = kDay;
  report.batteries.push_back(full_risk());  // crank margin 312.5 / 410 = 0.76219...
  report.batteries.back().data_age_days = 4.455949074074074;
  report.batteries.back().available_a = 127.22375620848227;
  const json got = json::parse(winter_json(report))["batteries"][0];
  CHECK(got["crank_margin"].get<double>() == 0.762);
  CHECK(got["crank_margin_full"].get<double>() == 0.0);  // 1e-5 is below the last decimal
  CHECK(got["data_age_days"].get<double>() == 4.456);
  CHECK(got["available_a"].get<double>() == 127.2);
  CHECK(got["soc_at_reading_percent"].get<double>() == 61.25);  // short values stay as they are
}

TEST_CASE("the winter report body is the reference document, strings escaped and nulls kept") {
  analytics::WinterReport report;
  report.cold_date = kDay;
  report.batteries.push_back(full_risk());
  analytics::WinterRisk sparse;  // no reading: every optional null
  sparse.serial = "FV-0002";
  sparse.level = analytics::RiskLevel::no_data;
  report.batteries.push_back(sparse);
  analytics::DepotWinterSummary depot;
  depot.depot_id = 3;
  depot.depot_name = "Harbour";
  depot.low_c = -25.0;
  depot.batteries = 2;
  depot.act_now = 1;
  depot.no_data = 1;
  depot.expected_replacements = 1;
  depot.oldest_data_days = 20.5;
  report.depots.push_back(depot);

  json batteries = json::array();
  for (const auto& r : report.batteries) batteries.push_back(risk_reference(r));
  const json expected = {
      {"cold_date", format_date(kDay)},
      {"batteries", batteries},
      {"depots",
       {{{"depot_id", 3}, {"depot_name", "Harbour"}, {"low_c", -25.0}, {"batteries", 2},
         {"act_now", 1}, {"watch", 0}, {"no_data", 1}, {"ok", 0}, {"expected_replacements", 1},
         {"oldest_data_days", 20.5}}}}};
  const std::string text = winter_json(report);
  check_same(text, expected);
  CHECK(text.find("\\\"0001\\\"") != std::string::npos);
  CHECK(text.find("\xC3\xB8st \xEF\xBF\xBD") != std::string::npos);  // U+FFFD for 0xFF
  CHECK(text.find("line\\nbreak\\ttab") != std::string::npos);
}

TEST_CASE("an empty winter report is an object with empty lists") {
  analytics::WinterReport report;
  report.cold_date = kDay;
  check_same(winter_json(report), {{"cold_date", format_date(kDay)},
                                   {"batteries", json::array()},
                                   {"depots", json::array()}});
}

TEST_CASE("the sulfation report body is the reference document, trends as objects or null") {
  analytics::SulfationAssessment a;
  a.serial = "FV-0003";
  a.depot_id = 2;
  a.depot_name = "North";
  a.level = analytics::SulfationClass::advancing;
  a.undercharge_days = 31.5;
  a.trend_basis = analytics::TrendBasis::after_charge;
  a.trend_points = 40;
  analytics::TrendFit fit;
  fit.points = 40;
  fit.slope = -2.5e-5;
  fit.slope_low = -4e-5;
  fit.slope_high = -1e-5;
  fit.confidence = 0.9;
  fit.same_sign_fraction = 0.8125;
  a.sg_trend = fit;
  a.latest_spread = 0.012;
  a.weak_cell = 4;
  a.charges_seen = 5;
  a.charges_not_recovered = 1;
  a.latest_charge_recovered = false;
  a.reasons = {"undercharged for 31 of the last 90 days"};
  a.actions = {analytics::Action::recharge, analytics::Action::load_test};
  a.cautions = {analytics::kChargeCaution, analytics::kLoadTestCaution};
  analytics::SulfationAssessment none;
  none.serial = "FV-0004";

  const auto item = [](const analytics::SulfationAssessment& s) {
    json actions = json::array();
    for (auto act : s.actions) actions.push_back(analytics::to_string(act));
    const auto trend = [](const std::optional<analytics::TrendFit>& t) -> json {
      if (!t) return nullptr;
      return {{"points", t->points},         {"slope_per_day", t->slope},
              {"slope_low", t->slope_low},   {"slope_high", t->slope_high},
              {"confidence", t->confidence}, {"same_sign_fraction", t->same_sign_fraction}};
    };
    return json{{"serial", s.serial},
                {"depot_id", s.depot_id},
                {"depot_name", s.depot_name},
                {"level", analytics::to_string(s.level)},
                {"undercharge_days", s.undercharge_days},
                {"exposure_window_days", s.exposure_window_days},
                {"undercharge_threshold_pct", s.undercharge_threshold_pct},
                {"trend_basis", analytics::to_string(s.trend_basis)},
                {"trend_points", s.trend_points},
                {"sg_trend", trend(s.sg_trend)},
                {"spread_trend", trend(s.spread_trend)},
                {"latest_spread", opt(s.latest_spread)},
                {"weak_cell", opt(s.weak_cell)},
                {"charges_seen", s.charges_seen},
                {"charges_not_recovered", s.charges_not_recovered},
                {"latest_charge_recovered", s.latest_charge_recovered},
                {"load_test_failed", s.load_test_failed},
                {"reasons", s.reasons},
                {"actions", actions},
                {"cautions", words(s.cautions)}};
  };
  check_same(sulfation_json({a, none}), {{"items", {item(a), item(none)}}});
  check_same(sulfation_json({}), {{"items", json::array()}});
}

TEST_CASE("the replacement and overdue bodies are the reference documents") {
  analytics::ReplacementForecast f;
  f.serial = "FV-0005";
  f.depot_id = 1;
  f.depot_name = "Harbour";
  f.criterion = analytics::ReplaceCriterion::cranking;
  f.threshold_sg = 1.2;
  f.design_low_c = -18.0;
  f.date = kDay + std::chrono::days{100};
  f.earliest = kDay + std::chrono::days{60};
  f.slope_sg_per_30d = -0.0015;
  f.reason = "falling";
  const json replacement = {{"serial", "FV-0005"},
                            {"depot_id", 1},
                            {"depot_name", "Harbour"},
                            {"criterion", "cranking"},
                            {"threshold_sg", 1.2},
                            {"design_low_c", -18.0},
                            {"date", format_date(*f.date)},
                            {"earliest", format_date(*f.earliest)},
                            {"latest", nullptr},
                            {"already_crossed", false},
                            {"slope_sg_per_30d", -0.0015},
                            {"reason", "falling"}};
  check_same(replacement_json({f}), {{"items", {replacement}}});

  analytics::DepotOverdue d;
  d.depot_id = 4;
  d.depot_name = "Ridge";
  analytics::OverdueBattery seen;
  seen.serial = "FV-0006";
  seen.vehicle_code = "VAN-1";
  seen.last_reading = sys_seconds{kDay};
  seen.days_overdue_basis = 12.25;
  analytics::OverdueBattery never;
  never.serial = "FV-0007";
  never.never_read = true;
  d.batteries = {seen, never};
  const json overdue = {
      {"days", 10},
      {"items",
       {{{"depot_id", 4}, {"depot_name", "Ridge"}, {"serial", "FV-0006"}, {"vehicle_code", "VAN-1"},
         {"last_reading", models::wire::format_timestamp(sys_seconds{kDay})},
         {"days_overdue_basis", 12.25}, {"never_read", false}},
        {{"depot_id", 4}, {"depot_name", "Ridge"}, {"serial", "FV-0007"}, {"vehicle_code", ""},
         {"last_reading", nullptr}, {"days_overdue_basis", nullptr}, {"never_read", true}}}}};
  check_same(overdue_json({d}, 10), overdue);
}

}  // namespace
}  // namespace pbfleet::api
