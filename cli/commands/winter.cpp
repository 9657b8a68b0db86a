// `pbfleet winter [--low TEMP]`: which batteries will not crank, or may
// freeze, at the coming low; ranked, most urgent first.
#include <fmt/format.h>

#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::cli {
namespace {

struct WinterFlags {
  std::string low;
  std::string depot;
  std::string on;
  OutputFlags output;
};

const std::vector<Section>& sections() {
  static const std::vector<Section> kSections = {
      {"batteries", "Batteries, most at risk first",
       {"serial", "depot_name", "vehicle_code", "level", "low_c", "projected_soc_percent", "crank_margin",
        "freeze_margin_c", "action"}},
      {"depots", "By depot",
       {"depot_name", "low_c", "batteries", "act_now", "watch", "no_data", "ok", "expected_replacements"}},
  };
  return kSections;
}

int run_winter(const WinterFlags& f, Context& ctx) {
  std::string low_c;
  if (!f.low.empty()) {
    auto low = models::wire::parse_temperature(f.low, "--low");
    if (!low) return ctx.fail(kExitRejected, describe(low.error()));
    low_c = fmt::format("{:.2f}", low->value.value);
  }
  Query query{{"low_c", low_c}, {"depot_id", f.depot}, {"on", f.on}};
  return run_report(ctx, "/v1/reports/winter", query, f.output.mode(), sections());
}

}  // namespace

void install_winter(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<WinterFlags>();
  cmd.add_option("--low", f->low, "Coming low for every depot, e.g. -25C or -13F (default: each depot's design low)")
      ->type_name("TEMP");
  cmd.add_option("--depot", f->depot, "Only this depot (id)")->type_name("ID");
  cmd.add_option("--on", f->on, "Date the low is expected (YYYY-MM-DD)")->type_name("DATE");
  add_output_flags(cmd, f->output, true);
  cmd.footer(example("pbfleet winter --low -30C --depot 3\npbfleet winter --csv > winter.csv"));
  cmd.callback([f, &ctx] { ctx.exit_code = run_winter(*f, ctx); });
}

}  // namespace pbfleet::cli
