#include "cli/commands/log.hpp"

#include <algorithm>
#include <ostream>

#include <fmt/format.h>

#include "cli/commands/estimate.hpp"
#include "cli/commands/remote.hpp"
#include "cli/commands/sg_flags.hpp"
#include "cli/commands/table.hpp"
#include "cli/client/reading_json.hpp"
#include "cli/import/reading_id.hpp"
#include "models/analytics/safety.hpp"

namespace pbfleet::cli {
namespace {

using client::Json;
using models::Error;

constexpr std::string_view kLogSource = "cli";

models::Result<std::optional<models::wire::EnteredTemperature>> optional_temperature(const std::string& text,
                                                                                   std::string_view flag) {
  if (text.empty()) return std::optional<models::wire::EnteredTemperature>();
  auto t = models::wire::parse_temperature(text, flag);
  if (!t) return t.error();
  return std::optional<models::wire::EnteredTemperature>(*t);
}

std::string who(const LogFlags& f, Context& ctx) {
  if (!f.by.empty()) return f.by;
  return ctx.io().getenv("USER").value_or("");
}

bool has_flag(const Json& derived, std::string_view word) {
  auto flags = derived.value("flags", Json::array());
  return std::any_of(flags.begin(), flags.end(), [&](const Json& f) { return f.is_string() && f.get<std::string>() == word; });
}

int print_feedback(const client::Reply& reply, const LogFlags& f, Context& ctx) {
  if (f.json) {
    ctx.out() << reply.json.dump(2) << '\n';
    return kExitOk;
  }
  auto readings = reply.json.value("readings", Json::array());
  if (readings.empty()) return ctx.fail(kExitFailure, "the server stored the reading but sent no details back");
  const auto& stored = readings.front();
  if (reply.json.value("replayed", 0) > 0) ctx.err() << "already stored earlier (same reading id): nothing changed\n";
  ctx.out() << feedback_text(stored, ctx.out_style().unicode);
  auto derived = stored.value("derived", Json::object());
  if (has_flag(derived, "ocv_unsettled") || derived.value("ocv_settled", true) == false) {
    ctx.warn("the OCV is not settled: after driving or charging it reads high for hours. "
             "Trust the SG, or read the OCV again after 6 to 24 h at rest.");
  }
  if (has_flag(derived, "low_soc")) {
    ctx.out() << "\nRecommendation: recharge this battery before the cold.\n\nSafety: "
              << analytics::kChargeCaution << '\n';
  }
  return kExitOk;
}

}  // namespace

models::Result<models::wire::ReadingInput> reading_from_flags(const LogFlags& f, Context& ctx) {
  models::wire::ReadingInput r;
  r.serial = f.serial;
  r.taken_at = ctx.now();
  if (!f.at.empty()) {
    auto at = models::wire::parse_timestamp(f.at, "--at");
    if (!at) return at.error();
    r.taken_at = *at;
  }
  if (f.sg) r.cell_sg.push_back({*f.sg});
  for (double v : f.cell_sg) r.cell_sg.push_back({v});
  if (f.ocv_v) r.ocv = models::Volts{*f.ocv_v};
  auto electrolyte = optional_temperature(f.temp, "--temp");
  if (!electrolyte) return electrolyte.error();
  r.electrolyte = *electrolyte;
  auto ambient = optional_temperature(f.ambient, "--ambient");
  if (!ambient) return ambient.error();
  r.ambient = *ambient;
  if (f.rest_h) r.rest = models::Hours{*f.rest_h};
  if (f.load_test_a) r.load_test_current = models::Amperes{*f.load_test_a};
  if (f.load_test_end_v) r.load_test_end = models::Volts{*f.load_test_end_v};
  r.logged_by = who(f, ctx);
  r.source = kLogSource;
  r.note = f.note;
  r.after_charge = f.after_charge;
  r.water_added = f.water_added;
  r.reading_id = f.id.empty() ? import::derive_reading_id(r) : f.id;
  return r;
}

std::string feedback_text(const Json& stored, bool unicode) {
  auto d = stored.value("derived", Json::object());
  const char* deg = unicode ? "°C" : " C";
  std::string s = fmt::format("Stored {} for {}\n", stored.value("reading_id", std::string("reading")),
                              stored.value("serial", std::string("?")));
  auto number = [&](const char* key) { return d.contains(key) && d[key].is_number(); };
  if (number("corrected_sg")) s += fmt::format("  corrected SG    {:.3f} (at 25{})\n", d["corrected_sg"].get<double>(), deg);
  if (number("soc_percent")) {
    s += fmt::format("  state of charge {:.0f} % {} {:.0f}\n", d["soc_percent"].get<double>(), unicode ? "±" : "+/-",
                     d.value("soc_uncertainty_percent", 0.0));
  }
  if (number("soc_from_ocv_percent")) s += fmt::format("  SOC from OCV    {:.0f} %\n", d["soc_from_ocv_percent"].get<double>());
  if (number("cell_spread")) {
    auto weak = d.contains("weak_cell") && d["weak_cell"].is_number() ? fmt::format(", weak cell {}", d["weak_cell"].dump()) : "";
    s += fmt::format("  cell spread     {:.3f}{}\n", d["cell_spread"].get<double>(), weak);
  }
  auto flags = d.value("flags", Json::array());
  std::string words;
  for (const auto& f : flags) words += (words.empty() ? "" : ", ") + (f.is_string() ? f.get<std::string>() : f.dump());
  s += "  flags           " + (words.empty() ? std::string("none") : words) + "\n";
  return s;
}

namespace {

int run_log(LogFlags f, Context& ctx) {
  if (!f.has_values()) {
    if (!ctx.io().in_tty) return ctx.fail(kExitUsage, "give --sg, --cell-sg or --ocv (or run on a terminal to be asked)");
    if (!ask_for_reading(f, ctx)) return ctx.fail(kExitUsage, "no reading entered");
  }
  auto reading = reading_from_flags(f, ctx);
  if (!reading) return ctx.fail(kExitRejected, describe(reading.error()));
  auto problems = models::wire::validate_reading(*reading, ctx.now());
  if (!problems.empty()) {
    for (const auto& p : problems) ctx.fail(kExitRejected, describe({flag_for_field(p.field, reading->cell_sg.size()), p.detail, p.allowed}));
    return kExitRejected;
  }
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto reply = api->post("/v1/readings", client::reading_to_json(*reading));
  if (!reply.ok) return ctx.fail(reply);
  return print_feedback(reply, f, ctx);
}

}  // namespace

void install_log(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<LogFlags>();
  cmd.add_option("serial", f->serial, "Battery serial")->required();
  auto* sg = cmd.add_option("--sg", f->sg, "Hydrometer SG as read (one value)")->type_name("SG")->check(one_sg_value());
  auto* cells = cmd.add_option("--cell-sg", f->cell_sg, "Hydrometer SG per cell, cell 1 first")
                    ->delimiter(',')->type_name("SG,SG,...");
  sg->excludes(cells);
  cmd.add_option("--ocv", f->ocv_v, "Open-circuit voltage")->type_name("VOLTS");
  cmd.add_option("--temp", f->temp, "Electrolyte temperature: 41F, 5C or bare Celsius")->type_name("TEMP");
  cmd.add_option("--ambient", f->ambient, "Air temperature")->type_name("TEMP");
  cmd.add_option("--rest-hours", f->rest_h, "Hours at rest before the OCV")->type_name("HOURS");
  cmd.add_option("--load-test-a", f->load_test_a, "Load test current (A)")->type_name("A");
  cmd.add_option("--load-test-end-v", f->load_test_end_v, "Voltage at the end of the load test")->type_name("VOLTS");
  cmd.add_option("--at", f->at, "When it was read (RFC 3339; default now)")->type_name("TIME");
  cmd.add_option("--by", f->by, "Who read it (default $USER)")->type_name("NAME");
  cmd.add_option("--note", f->note, "A short note");
  cmd.add_option("--id", f->id, "Reading id (default: derived from the reading, so a retry is safe)");
  cmd.add_option("--cells", f->cells, "Cells to ask for on a terminal")->check(CLI::Range(1, models::wire::kMaxCells))
      ->capture_default_str();
  cmd.add_flag("--water-added", f->water_added, "Water was added today (holds the spread alarm)");
  cmd.add_flag("--after-charge", f->after_charge, "The battery was charged since the last reading");
  cmd.add_flag("--json", f->json, "Print the server's answer as JSON");
  cmd.footer(example("pbfleet log NB-2023-0001 --cell-sg 1.250,1.245,1.250,1.190,1.250,1.245 --temp 41F \\\n"
                     "    --ocv 12.41 --rest-hours 14\n"
                     "pbfleet log NB-2023-0001        (on a terminal: asks cell by cell)"));
  cmd.callback([f, &ctx] { ctx.exit_code = run_log(*f, ctx); });
}

}  // namespace pbfleet::cli
