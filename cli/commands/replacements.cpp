// `pbfleet replacements`: when each battery is expected to need replacing,
// from its full-charge SG trend.
#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"

namespace pbfleet::cli {
namespace {

struct ReplacementFlags {
  std::string depot;
  OutputFlags output;
};

int run_replacements(const ReplacementFlags& f, Context& ctx) {
  static const std::vector<Section> kSections = {
      {"", "",
       {"serial", "depot_name", "criterion", "date", "earliest", "latest", "already_crossed", "slope_sg_per_30d",
        "reason"}}};
  return run_report(ctx, "/v1/reports/replacements", {{"depot_id", f.depot}}, f.output.mode(), kSections);
}

}  // namespace

void install_replacements(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<ReplacementFlags>();
  cmd.add_option("--depot", f->depot, "Only this depot (id)")->type_name("ID");
  add_output_flags(cmd, f->output, true);
  cmd.footer(example("pbfleet replacements --csv > budget.csv"));
  cmd.callback([f, &ctx] { ctx.exit_code = run_replacements(*f, ctx); });
}

}  // namespace pbfleet::cli
