// GET /v1/reports/{winter,sulfation,replacements,overdue}: JSON, or CSV
// with Accept: text/csv. A depot-scoped token sees its depot only.

#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"
#include "server/api/report_codec.hpp"
#include "server/api/services/reports.hpp"

namespace pbfleet::api::handlers {

namespace {

// Longest overdue threshold accepted (a year).
constexpr int kMaxOverdueDays = 366;

// ?depot_id=, narrowed to the token's depot when it is scoped. nullopt in
// `depot` = all depots; false when the query is bad or outside the scope.
bool report_depot(const Call& call, std::optional<storage::Id>& depot,
                  std::vector<ProblemField>& errors) {
  if (const auto* text = call.query("depot_id")) {
    depot = parse_id(*text);
    if (!depot) errors.push_back({"depot_id", "not a depot id", "a positive whole number", {}});
  }
  if (call.caller && call.caller->depot_id) {
    if (depot && depot != call.caller->depot_id)
      errors.push_back({"depot_id", "outside the token's depot", "the token's depot", {}});
    depot = call.caller->depot_id;
  }
  return errors.empty();
}

// A strong validator for one rendered report (report, scope, parameters,
// format, data version). Reports measure data ages against now: a tag
// lasts the minute at most.
std::string report_etag(const std::string& key, std::int64_t version, std::chrono::sys_seconds now) {
  return strong_etag(key + "|minute=" + std::to_string(now.time_since_epoch().count() / 60), version);
}

// The report's body in the format asked for, rendered once per data
// version and kept beside the report (report_cache.hpp). `report()` gives
// the cached report, `json` and `csv` render it. Answers carry an ETag; a
// request whose If-None-Match names it gets 304 and no body.
template <class Report, class Json, class Csv>
http::Response answer(const Call& call, const std::string& key, Report&& report, Json&& json, Csv&& csv) {
  const bool as_csv = wants_csv(call.request);
  auto version = call.ctx.store.data_version();
  if (!version) return store_problem(version.error());
  const std::string format_key = key + (as_csv ? "|csv" : "|json");
  const std::string etag = report_etag(format_key, *version, call.ctx.clock.now());
  const std::vector<std::pair<std::string, std::string>> validators{
      {"ETag", etag}, {"Cache-Control", "private, no-cache"}};
  const char* content_type = as_csv ? "text/csv; charset=utf-8" : "application/json";
  if (auto unchanged = not_modified(call, etag, content_type, validators)) return std::move(*unchanged);
  auto body = call.ctx.reports.get<std::string>(
      format_key, *version, call.ctx.clock.now(),
      [&]() -> storage::StoreResult<std::string> {
        auto built = report();
        if (!built) return built.error();
        return as_csv ? std::string(csv(**built)) : std::string(json(**built));
      });
  if (!body) return store_problem(body.error());
  // The cached text itself goes out, not a copy (reports run to megabytes).
  http::Response r;
  r.content_type = content_type;
  r.shared_body = *body;
  r.headers = validators;
  return r;
}

http::Response bad_query(const std::vector<ProblemField>& errors) {
  return problem(ProblemKind::bad_query, "bad report query", errors);
}

// Winter: ?low_c= (one low for all depots), ?on=YYYY-MM-DD (cold date,
// default today).
bool read_cold(const Call& call, analytics::ColdSpec& cold, std::vector<ProblemField>& errors) {
  cold.cold_date = std::chrono::floor<std::chrono::days>(call.ctx.clock.now());
  if (const auto* on = call.query("on"); on && !on->empty()) {
    if (auto d = parse_date(*on)) {
      cold.cold_date = *d;
    } else {
      errors.push_back({"on", "not a calendar date", "YYYY-MM-DD", {}});
    }
  }
  if (const auto* low = call.query("low_c"); low && !low->empty()) {
    auto t = models::wire::parse_temperature(*low, "low_c");
    if (t) {
      cold.low = t->value;
    } else {
      errors.push_back({"low_c", t.error().detail, t.error().allowed, {}});
    }
  }
  return errors.empty();
}

}  // namespace

http::Response winter_report(const Call& call) {
  std::optional<storage::Id> depot;
  analytics::ColdSpec cold;
  std::vector<ProblemField> errors;
  if (!report_depot(call, depot, errors) || !read_cold(call, cold, errors)) return bad_query(errors);
  return answer(
      call, winter_key(depot, cold),
      [&] { return cached_winter_report(call.ctx.reports, call.ctx.store, depot, cold, call.ctx.clock.now()); },
      [](const analytics::WinterReport& r) { return winter_json(r); },
      [](const analytics::WinterReport& r) { return winter_csv(r); });
}

http::Response sulfation_report(const Call& call) {
  std::optional<storage::Id> depot;
  std::vector<ProblemField> errors;
  if (!report_depot(call, depot, errors)) return bad_query(errors);
  using Report = std::vector<analytics::SulfationAssessment>;
  return answer(
      call, trend_key("sulfation", depot),
      [&] { return cached_sulfation_report(call.ctx.reports, call.ctx.trends, call.ctx.store, depot, call.ctx.clock.now()); },
      [](const Report& r) { return sulfation_json(r); }, [](const Report& r) { return sulfation_csv(r); });
}

http::Response replacement_report(const Call& call) {
  std::optional<storage::Id> depot;
  std::vector<ProblemField> errors;
  if (!report_depot(call, depot, errors)) return bad_query(errors);
  using Report = std::vector<analytics::ReplacementForecast>;
  return answer(
      call, trend_key("replacements", depot),
      [&] { return cached_replacement_report(call.ctx.reports, call.ctx.trends, call.ctx.store, depot, call.ctx.clock.now()); },
      [](const Report& r) { return replacement_json(r); }, [](const Report& r) { return replacement_csv(r); });
}

http::Response overdue_report(const Call& call) {
  std::optional<storage::Id> depot;
  std::vector<ProblemField> errors;
  int days = analytics::AnalyticsSettings{}.overdue_days;
  if (const auto* text = call.query("days"); text && !text->empty()) {
    auto id = parse_id(*text);
    if (!id || *id > kMaxOverdueDays) {
      errors.push_back({"days", "not a number of days", "1 to " + std::to_string(kMaxOverdueDays), {}});
    } else {
      days = static_cast<int>(*id);
    }
  }
  if (!report_depot(call, depot, errors)) return bad_query(errors);
  using Report = std::vector<analytics::DepotOverdue>;
  return answer(
      call, overdue_key(depot, days),
      [&] { return cached_overdue_report(call.ctx.reports, call.ctx.store, depot, call.ctx.clock.now(), days); },
      [days](const Report& r) { return overdue_json(r, days); }, [](const Report& r) { return overdue_csv(r); });
}

}  // namespace pbfleet::api::handlers
