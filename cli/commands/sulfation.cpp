// `pbfleet sulfation`: batteries showing signs of sulfation or ageing, with
// the recommended step (and its safety caution).
#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"

namespace pbfleet::cli {
namespace {

struct SulfationFlags {
  std::string depot;
  OutputFlags output;
};

int run_sulfation(const SulfationFlags& f, Context& ctx) {
  static const std::vector<Section> kSections = {
      {"", "",
       {"serial", "depot_name", "level", "latest_spread", "weak_cell", "charges_not_recovered", "actions",
        "reasons"}}};
  return run_report(ctx, "/v1/reports/sulfation", {{"depot_id", f.depot}}, f.output.mode(), kSections);
}

}  // namespace

void install_sulfation(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<SulfationFlags>();
  cmd.add_option("--depot", f->depot, "Only this depot (id)")->type_name("ID");
  add_output_flags(cmd, f->output, true);
  cmd.footer(example("pbfleet sulfation --depot 2\npbfleet sulfation --json"));
  cmd.callback([f, &ctx] { ctx.exit_code = run_sulfation(*f, ctx); });
}

}  // namespace pbfleet::cli
