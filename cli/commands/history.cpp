#include "cli/commands/history.hpp"

#include <algorithm>
#include <cmath>
#include <ostream>

#include <fmt/format.h>

#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"

namespace pbfleet::cli {
namespace {

using client::Json;

constexpr int kChartHeight = 8;                // rows of plot per chart
constexpr double kMinSgSpan = 0.020;           // smallest SG axis span shown
constexpr double kSgAxisStep = 0.010;          // SG axis ends on whole hundredths
constexpr std::size_t kMinuteChars = 16;       // "2026-11-30T07:15"

const std::vector<std::string> kColumns = {"taken_at", "ocv_v", "rest_h", "temp", "raw_sg", "corrected_sg",
                                           "soc_percent", "soc_uncertainty_percent", "cell_spread", "weak_cell",
                                           "flags"};

std::string when(const Json& r) {
  auto t = r.value("taken_at", std::string());
  if (t.size() >= kMinuteChars) t = t.substr(0, kMinuteChars);
  std::replace(t.begin(), t.end(), 'T', ' ');
  return t;
}

// The electrolyte temperature in the unit it was entered in, to 0.1
// degree: the server keeps Celsius (electrolyte_temp_c) beside that unit
// (electrolyte_temp_unit), so 27F reads back as 27F, not -2.77778C.
Json entered_temperature(const Json& r) {
  const auto c = r.find("electrolyte_temp_c");
  if (c == r.end() || !c->is_number()) return nullptr;
  const auto unit = r.find("electrolyte_temp_unit");
  const bool fahrenheit = unit != r.end() && unit->is_string() && *unit == "F";
  const double value = fahrenheit ? c->get<double>() * 9.0 / 5.0 + 32.0 : c->get<double>();
  const double tenths = std::round(value * 10.0) / 10.0;
  return fmt::format("{:g}{}", tenths == 0.0 ? 0.0 : tenths, fahrenheit ? "F" : "C");
}

Json mean_sg(const Json& r) {
  auto cells = r.value("cell_sg", Json::array());
  double sum = 0;
  int n = 0;
  for (const auto& c : cells) {
    if (c.is_number()) sum += c.get<double>(), ++n;
  }
  return n > 0 ? Json(sum / n) : Json();
}

double number_or_nan(const Json& row, const char* key) {
  auto it = row.find(key);
  return it != row.end() && it->is_number() ? it->get<double>() : NAN;
}

std::vector<bool> flagged(const std::vector<Json>& rows) {
  std::vector<bool> marks;
  for (const auto& r : rows) {
    auto it = r.find("flags");
    marks.push_back(it != r.end() && it->is_array() && !it->empty());
  }
  return marks;
}

std::string date_of(const Json& row) { return row.value("taken_at", std::string()).substr(0, 10); }

format::ChartSeries series(const std::vector<Json>& rows, const char* key, std::string title) {
  format::ChartSeries s;
  s.title = std::move(title);
  for (const auto& r : rows) s.values.push_back(number_or_nan(r, key));
  s.flagged = flagged(rows);
  if (!rows.empty()) {
    s.first_label = date_of(rows.front());
    s.last_label = date_of(rows.back());
  }
  return s;
}

}  // namespace

std::vector<Json> history_rows(const Json& body) {
  std::vector<Json> rows;
  auto readings = body.value("readings", Json::array());
  for (const auto& r : readings) {
    Json row = Json::object();
    row["taken_at"] = r.value("taken_at", std::string());
    row["ocv_v"] = r.value("ocv_v", Json());
    row["rest_h"] = r.value("rest_h", Json());
    row["temp"] = entered_temperature(r);
    row["raw_sg"] = mean_sg(r);
    auto derived = r.value("derived", Json::object());
    for (const auto& key : {"corrected_sg", "soc_percent", "soc_uncertainty_percent", "cell_spread", "weak_cell"}) {
      row[key] = derived.value(key, Json());
    }
    row["flags"] = derived.value("flags", Json::array());
    rows.push_back(std::move(row));
  }
  return rows;
}

format::ChartSeries soc_series(const std::vector<Json>& rows) {
  auto s = series(rows, "soc_percent", "State of charge (%)");
  s.lo = 0;
  s.hi = 100;
  return s;
}

format::ChartSeries sg_series(const std::vector<Json>& rows) {
  auto s = series(rows, "corrected_sg", "Corrected SG (at 25 C)");
  s.decimals = 3;
  double lo = INFINITY;
  double hi = -INFINITY;
  for (double v : s.values) {
    if (!std::isnan(v)) lo = std::min(lo, v), hi = std::max(hi, v);
  }
  if (!std::isfinite(lo)) lo = 1.100, hi = 1.300;  // no SG at all: a plain full range
  s.lo = std::floor((lo - kSgAxisStep / 2) / kSgAxisStep) * kSgAxisStep;
  s.hi = std::max(std::ceil((hi + kSgAxisStep / 2) / kSgAxisStep) * kSgAxisStep, s.lo + kMinSgSpan);
  return s;
}

namespace {

struct HistoryFlags {
  std::string serial;
  std::string from;
  std::string to;
  bool no_chart = false;
  OutputFlags output;
};

std::string battery_line(const Json& battery) {
  if (!battery.is_object()) return "";
  std::string s = battery.value("serial", std::string("?"));
  s += fmt::format("  {}", battery.value("chemistry", std::string()));
  if (battery.contains("rated_cca_a") && battery["rated_cca_a"].is_number()) {
    s += fmt::format(", {:g} A CCA", battery["rated_cca_a"].get<double>());
  }
  if (battery.contains("installed_on") && battery["installed_on"].is_string())
    s += ", installed " + battery["installed_on"].get<std::string>();
  if (battery.contains("status") && battery["status"].is_string()) s += ", " + battery["status"].get<std::string>();
  return s + "\n\n";
}

void print_text(const Json& body, const std::vector<Json>& rows, bool charts, Context& ctx) {
  auto style = ctx.out_style();
  ctx.out() << battery_line(body.value("battery", Json()));
  if (rows.empty()) {
    ctx.out() << "(no readings in this period)\n";
    return;
  }
  auto shown = rows;
  for (auto& r : shown) r["taken_at"] = when(r);  // minutes are enough on screen
  auto table = rows_table(shown, kColumns, style.unicode);
  ctx.out() << table.render(style);
  if (charts) {
    const int width = std::max(40, ctx.io().terminal_columns - 2);
    ctx.out() << '\n' << format::render_chart(soc_series(rows), style.unicode, width, kChartHeight);
    ctx.out() << '\n' << format::render_chart(sg_series(rows), style.unicode, width, kChartHeight);
  }
  auto events = body.value("events", Json::array());
  if (!events.empty()) {
    ctx.out() << "\nEvents\n" << rows_table(rows_of(events), {"at", "kind", "detail"}, style.unicode).render(style);
  }
}

// A bare YYYY-MM-DD means the whole day in UTC; anything else goes as given
// (RFC 3339) and the server judges it.
std::string day_bound(const std::string& when, bool end_of_day) {
  const bool bare_date = when.size() == 10 && when[4] == '-' && when[7] == '-';
  if (!bare_date) return when;
  return when + (end_of_day ? "T23:59:59Z" : "T00:00:00Z");
}

int run_history(const HistoryFlags& f, Context& ctx) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto path = client::with_query("/v1/batteries/" + client::url_encode(f.serial) + "/history",
                                 {{"from", day_bound(f.from, false)}, {"to", day_bound(f.to, true)}});
  auto reply = api->get(path);
  if (!reply.ok) return ctx.fail(reply);
  auto rows = history_rows(reply.json);
  switch (f.output.mode()) {
    case OutputMode::json: ctx.out() << reply.json.dump(2) << '\n'; break;
    case OutputMode::csv: ctx.out() << rows_table(rows, kColumns, false).render_csv(); break;
    case OutputMode::text: print_text(reply.json, rows, !f.no_chart, ctx); break;
  }
  return kExitOk;
}

}  // namespace

void install_history(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<HistoryFlags>();
  cmd.add_option("serial", f->serial, "Battery serial")->required();
  cmd.add_option("--from", f->from, "First day or time (RFC 3339 or YYYY-MM-DD)")->type_name("WHEN");
  cmd.add_option("--to", f->to, "Last day or time")->type_name("WHEN");
  cmd.add_flag("--no-chart", f->no_chart, "Table only");
  add_output_flags(cmd, f->output, true);
  cmd.footer(example("pbfleet history NB-2023-0001 --from 2026-09-01\npbfleet history NB-2023-0001 --ascii"));
  cmd.callback([f, &ctx] { ctx.exit_code = run_history(*f, ctx); });
}

}  // namespace pbfleet::cli
