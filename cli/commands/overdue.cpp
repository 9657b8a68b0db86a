// `pbfleet overdue`: batteries nobody has read for too long, by depot, so a
// skipped round shows.
#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"

namespace pbfleet::cli {
namespace {

// A weekly round plus a few days' grace (common practice).
constexpr int kDefaultOverdueDays = 10;

struct OverdueFlags {
  int days = kDefaultOverdueDays;
  std::string depot;
  OutputFlags output;
};

int run_overdue(const OverdueFlags& f, Context& ctx) {
  static const std::vector<Section> kSections = {
      {"", "", {"depot_name", "serial", "vehicle_code", "last_reading", "days_overdue_basis", "never_read"}}};
  Query query{{"days", std::to_string(f.days)}, {"depot_id", f.depot}};
  return run_report(ctx, "/v1/reports/overdue", query, f.output.mode(), kSections);
}

}  // namespace

void install_overdue(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<OverdueFlags>();
  cmd.add_option("--days", f->days, "Overdue after this many days without a reading")
      ->check(CLI::Range(1, 366))
      ->capture_default_str();
  cmd.add_option("--depot", f->depot, "Only this depot (id)")->type_name("ID");
  add_output_flags(cmd, f->output, true);
  cmd.footer(example("pbfleet overdue --days 8"));
  cmd.callback([f, &ctx] { ctx.exit_code = run_overdue(*f, ctx); });
}

}  // namespace pbfleet::cli
